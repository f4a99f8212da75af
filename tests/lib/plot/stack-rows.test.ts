import { describe, expect, it } from 'vitest';
import { labelWidth, stackRows } from '../../../src/lib/plot/stack-rows';

describe('stackRows', () => {
  it('keeps disjoint and end-to-end spans on row 0', () => {
    expect(stackRows([{ start: 0, end: 10 }, { start: 10, end: 20 }, { start: 30, end: 40 }])).toEqual([0, 0, 0]);
  });
  it('moves a span that overlaps an earlier one to the next free row', () => {
    expect(stackRows([{ start: 0, end: 10 }, { start: 0, end: 5 }, { start: 2, end: 8 }, { start: 12, end: 14 }])).toEqual([0, 1, 2, 0]);
  });
  it('reuses a lower row once it is free at that place', () => {
    expect(stackRows([{ start: 0, end: 10 }, { start: 5, end: 15 }, { start: 11, end: 20 }])).toEqual([0, 1, 0]);
  });
  it('returns no rows for no spans', () => {
    expect(stackRows([])).toEqual([]);
  });
});

describe('labelWidth', () => {
  it('grows with the text length and the font size', () => {
    // 10 characters at 10 px: 10 × 10 × 0.58 = 58 px.
    expect(labelWidth('abcdefghij', 10)).toBeCloseTo(58, 10);
    expect(labelWidth('', 12)).toBe(0);
  });
});
