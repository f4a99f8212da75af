import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { contrastRatio, NIGHT_PALETTE, PAPER_PALETTE, type PlotPalette } from '../../../src/lib/plot/palette';

/** The diagram CSS repeats the plot palette as variables; both themes must match palette.ts (whose contrast is tested). */
const css = readFileSync('src/components/diagram/diagram.css', 'utf8');

function block(selectorStart: string): Record<string, string> {
  const at = css.indexOf(selectorStart);
  const body = css.slice(css.indexOf('{', at) + 1, css.indexOf('}', at));
  const vars: Record<string, string> = {};
  for (const decl of body.split(';')) {
    const [k, v] = decl.split(':').map((s) => s.trim());
    if (k?.startsWith('--dg-') && v?.startsWith('#')) vars[k] = v.toLowerCase();
  }
  return vars;
}

function expected(p: PlotPalette): Record<string, string> {
  const out: Record<string, string> = { '--dg-paper': p.paper, '--dg-ink': p.ink, '--dg-grid': p.grid, '--dg-stable': p.stable, '--dg-unstable': p.unstable };
  for (const [t, c] of Object.entries(p.marker)) out[`--dg-mark-${t}`] = c;
  for (const [r, c] of Object.entries(p.band)) out[`--dg-band-${r}`] = c;
  for (const [r, c] of Object.entries(p.bandInk)) out[`--dg-band-ink-${r}`] = c;
  return out;
}

describe('diagram.css plot variables', () => {
  it('light set equals PAPER_PALETTE', () => {
    const vars = block('.dg-diagram {');
    for (const [k, v] of Object.entries(expected(PAPER_PALETTE))) expect([k, vars[k]]).toEqual([k, v]);
  });
  it('dark set equals NIGHT_PALETTE, in the data-theme block and the system-preference block', () => {
    for (const start of ["[data-theme='dark'] .dg-diagram", ':root:not(.light)']) {
      const vars = block(start);
      for (const [k, v] of Object.entries(expected(NIGHT_PALETTE))) expect([start, k, vars[k]]).toEqual([start, k, v]);
    }
  });
});
