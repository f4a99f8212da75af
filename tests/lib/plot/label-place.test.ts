import { describe, expect, it } from 'vitest';
import { linesMeetBox, placeLabels, segmentMeetsBox } from '../../../src/lib/plot/label-place';

const box = { x0: 0, y0: 0, x1: 10, y1: 5 };

describe('segmentMeetsBox(ax, ay, bx, by, box)', () => {
  it('a segment crossing the box with both ends outside meets it', () => {
    expect(segmentMeetsBox(-5, 2, 15, 3, box)).toBe(true);
    expect(segmentMeetsBox(5, -10, 5, 10, box)).toBe(true);
  });
  it('a segment passing beside or stopping short does not', () => {
    expect(segmentMeetsBox(-5, 6, 15, 6, box)).toBe(false);
    expect(segmentMeetsBox(-5, 2, -1, 2, box)).toBe(false);
    // Diagonal that passes the corner (10, 0) on the outside: the line y = x - 11 at x = 10 is y = -1.
    expect(segmentMeetsBox(0, -11, 20, 9, box)).toBe(false);
  });
  it('touching the boundary counts, a point segment inside counts', () => {
    expect(segmentMeetsBox(10, -3, 10, 8, box)).toBe(true);
    expect(segmentMeetsBox(3, 3, 3, 3, box)).toBe(true);
  });
});

describe('placeLabels(count, boxAt, lines, maxRows)', () => {
  // Label boxes 40 px wide, 12 px tall, row r spans y in [100 - 12 (r + 1), 100 - 12 r].
  const boxAt = (_i: number, row: number) => ({ x0: 0, x1: 40, y0: 100 - 12 * (row + 1), y1: 100 - 12 * row });
  const line = (y: number) => ({ sx: [-10, 60], sy: [y, y], branch: [0, 0], n: 2 });

  it('takes the lowest row no branch crosses', () => {
    expect(placeLabels(1, boxAt, line(95), 5)).toEqual([1]);
    expect(placeLabels(1, boxAt, line(40), 5)).toEqual([0]);
  });
  it('stacks labels that would overlap and skips rows a branch crosses', () => {
    expect(placeLabels(3, boxAt, line(82), 6)).toEqual([0, 2, 3]);
  });
  it('every row crossed: the lowest row without another label (drawn with a halo)', () => {
    const dense = { sx: [-10, 60, -10], sy: [0, 50, 100], branch: [0, 0, 0], n: 3 };
    for (let r = 0; r < 3; r++) expect(linesMeetBox(dense, boxAt(0, r))).toBe(true);
    expect(placeLabels(2, boxAt, dense, 3)).toEqual([0, 1]);
  });
  it('grows the box by lineMargin against the lines: a line 1 px outside the box blocks the row', () => {
    expect(placeLabels(1, boxAt, line(101), 5)).toEqual([0]);
    expect(placeLabels(1, boxAt, line(101), 5, 2)).toEqual([1]);
  });
  it('vertices of different branches are not joined', () => {
    const apart = { sx: [-10, 60], sy: [95, 95], branch: [0, 1], n: 2 };
    expect(placeLabels(1, boxAt, apart, 5)).toEqual([0]);
  });
});
