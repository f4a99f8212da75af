import { describe, expect, it } from 'vitest';
import { markerPath, SPECIAL_TYPES } from '../../../src/lib/plot/markers';
import { contrastRatio, NIGHT_PALETTE, PAPER_PALETTE } from '../../../src/lib/plot/palette';

describe('contrastRatio', () => {
  it('black on white is 21:1 and a colour on itself 1:1 (WCAG 2.1 definition)', () => {
    expect(contrastRatio('#000000', '#ffffff')).toBeCloseTo(21, 10);
    expect(contrastRatio('#777777', '#777777')).toBe(1);
  });
});

describe('palettes', () => {
  for (const [name, pal] of [['paper', PAPER_PALETTE], ['night', NIGHT_PALETTE]] as const) {
    it(`${name}: text at least 4.5:1 (WCAG 2.1 AA 1.4.3), lines and glyphs at least 3:1 (1.4.11) on paper`, () => {
      expect(contrastRatio(pal.ink, pal.paper)).toBeGreaterThanOrEqual(4.5);
      expect(contrastRatio(pal.muted, pal.paper)).toBeGreaterThanOrEqual(4.5);
      expect(contrastRatio(pal.stable, pal.paper)).toBeGreaterThanOrEqual(3);
      expect(contrastRatio(pal.unstable, pal.paper)).toBeGreaterThanOrEqual(3);
      for (const t of SPECIAL_TYPES) expect(contrastRatio(pal.marker[t], pal.paper)).toBeGreaterThanOrEqual(3);
      for (const r of ['weak', 'intermediate', 'strong'] as const) {
        expect(contrastRatio(pal.bandInk[r], pal.band[r])).toBeGreaterThanOrEqual(4.5);
        // Branches stay readable over every band shade.
        expect(contrastRatio(pal.stable, pal.band[r])).toBeGreaterThanOrEqual(3);
      }
    });
  }
});

describe('markerPath', () => {
  it('gives each type its own closed glyph', () => {
    const paths = SPECIAL_TYPES.map((t) => markerPath(t, 10, 10, 6));
    expect(new Set(paths).size).toBe(SPECIAL_TYPES.length);
    for (const d of paths) { expect(d.startsWith('M')).toBe(true); expect(d.endsWith('Z')).toBe(true); }
  });
});
