import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { contrastRatio, NIGHT_PALETTE, PAPER_PALETTE } from '../../../src/lib/plot/palette';

/** Overlay identities of the compare view (compare.css) against the branch colours of the plot palette. */
const css = readFileSync('src/components/compare/compare.css', 'utf8');

function block(selectorStart: string): Record<string, string> {
  const at = css.indexOf(selectorStart);
  expect(at, selectorStart).toBeGreaterThanOrEqual(0);
  const body = css.slice(css.indexOf('{', css.indexOf(selectorStart === '@media' ? ':root' : selectorStart, at)) + 1, css.indexOf('}', at));
  const vars: Record<string, string> = {};
  for (const decl of body.split(';')) {
    const [k, v] = decl.split(':').map((s) => s.trim());
    if (k?.startsWith('--cmp-line-') && v?.startsWith('#')) vars[k] = v.toLowerCase();
  }
  return vars;
}

/** sRGB #rrggbb → CIELAB (D65), IEC 61966-2-1 and CIE 15:2004. */
function lab(hex: string): [number, number, number] {
  const ch = (c: number) => { const s = c / 255; return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4; };
  const [r, g, b] = [1, 3, 5].map((i) => ch(parseInt(hex.slice(i, i + 2), 16)));
  const X = (0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047, Y = 0.2126 * r + 0.7152 * g + 0.0722 * b, Z = (0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883;
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : (24389 / 27 * t + 16) / 116);
  return [116 * f(Y) - 16, 500 * (f(X) - f(Y)), 200 * (f(Y) - f(Z))];
}
/** CIE 1976 colour difference ΔE*ab. */
const deltaE = (a: string, b: string) => { const p = lab(a), q = lab(b); return Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]); };

const themes = [
  { name: 'light', start: '.dg-compare {', palette: PAPER_PALETTE },
  { name: 'dark (data-theme)', start: "[data-theme='dark'] .dg-compare", palette: NIGHT_PALETTE },
  { name: 'dark (system preference)', start: '@media', palette: NIGHT_PALETTE },
] as const;

describe('compare overlay identities (--cmp-line-1..4 in compare.css)', () => {
  it('deltaE is 0 for one colour and about 100 for black against white (CIE L* 0 to 100)', () => {
    expect(deltaE('#123b57', '#123b57')).toBe(0);
    expect(deltaE('#000000', '#ffffff')).toBeCloseTo(100, 0);
  });

  for (const t of themes) {
    it(`${t.name}: four colours, 3:1 on the paper, ΔE ≥ 25 from the stable and unstable colours and from each other`, () => {
      const vars = block(t.start);
      const colours = [1, 2, 3, 4].map((i) => vars[`--cmp-line-${i}`]);
      for (const c of colours) {
        expect(c, t.name).toMatch(/^#[0-9a-f]{6}$/);
        expect(contrastRatio(c, t.palette.paper)).toBeGreaterThanOrEqual(3);
        expect(c).not.toBe(t.palette.stable.toLowerCase());
        expect(c).not.toBe(t.palette.unstable.toLowerCase());
        expect(deltaE(c, t.palette.stable), `${c} vs stable`).toBeGreaterThanOrEqual(25);
        expect(deltaE(c, t.palette.unstable), `${c} vs unstable`).toBeGreaterThanOrEqual(25);
      }
      for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) expect(deltaE(colours[i], colours[j]), `${colours[i]} vs ${colours[j]}`).toBeGreaterThanOrEqual(25);
    });
  }

  it('the system-preference dark block repeats the data-theme dark block', () => {
    expect(block('@media')).toEqual(block("[data-theme='dark'] .dg-compare"));
  });
});
