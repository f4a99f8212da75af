import { describe, expect, it } from 'vitest';
import { onsetRows, rampColour, RAMP_HIGH, RAMP_LOW, sortOnsetRows } from '../../../src/lib/plot/onset-table';

const onset = {
  parameter: 'beta',
  nodes: [
    { index: 0, id: 'upper', status: 'fold' as const, critical: 0.42, next: ['middle'] },
    { index: 1, id: 'middle', status: 'none-in-range' as const, critical: null, next: null },
    { index: 2, id: 'lower', status: 'fold' as const, critical: 0.17, next: [] },
    { index: 3, id: 'pond', status: 'fold' as const, critical: 0.42, next: ['lower'] },
  ],
};

describe('sortOnsetRows(rows, sort)', () => {
  it('by critical coupling ascending: smallest first, ties in node order, nodes without a fold last', () => {
    expect(sortOnsetRows(onsetRows(onset), { key: 'critical', descending: false }).map((r) => r.id)).toEqual(['lower', 'upper', 'pond', 'middle']);
  });
  it('descending reverses the values but keeps nodes without a fold last', () => {
    expect(sortOnsetRows(onsetRows(onset), { key: 'critical', descending: true }).map((r) => r.id)).toEqual(['upper', 'pond', 'lower', 'middle']);
  });
  it('by node: document order, or reversed', () => {
    expect(sortOnsetRows(onsetRows(onset), { key: 'node', descending: false }).map((r) => r.id)).toEqual(['upper', 'middle', 'lower', 'pond']);
    expect(sortOnsetRows(onsetRows(onset), { key: 'node', descending: true }).map((r) => r.id)).toEqual(['pond', 'lower', 'middle', 'upper']);
  });
  it('onsetRows drops a critical value whose status is not a fold', () => {
    const rows = onsetRows({ parameter: 'k', nodes: [{ index: 0, id: 'a', status: 'failed', critical: 0.3, next: null }] });
    expect(rows[0].critical).toBeNull();
  });
});

describe('rampColour(v, lo, hi)', () => {
  it('gives the two ends at lo and hi, the sRGB midpoint halfway, and clamps outside', () => {
    expect(rampColour(1, 1, 3)).toBe(RAMP_LOW);
    expect(rampColour(3, 1, 3)).toBe(RAMP_HIGH);
    // Midpoint of #8c2d10 and #f3e4c4 per channel: (140+243)/2 = 191.5 -> 192 (c0), (45+228)/2 = 136.5 -> 137 (89), (16+196)/2 = 106 (6a).
    expect(rampColour(2, 1, 3)).toBe('#c0896a');
    expect(rampColour(-5, 1, 3)).toBe(RAMP_LOW);
    expect(rampColour(9, 1, 3)).toBe(RAMP_HIGH);
    expect(rampColour(2, 2, 2)).toBe(RAMP_LOW);
  });
});
