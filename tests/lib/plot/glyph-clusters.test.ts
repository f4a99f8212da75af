import { describe, expect, it } from 'vitest';
import { clusterGlyphs, fanOut } from '../../../src/lib/plot/glyph-clusters';

describe('clusterGlyphs(glyphs, distance)', () => {
  it('keeps glyphs apart when no two are closer than the distance', () => {
    const c = clusterGlyphs([{ id: 'a', cx: 0, cy: 0 }, { id: 'b', cx: 20, cy: 0 }, { id: 'c', cx: 0, cy: 20 }], 12);
    expect(c.map((g) => g.ids)).toEqual([['a'], ['b'], ['c']]);
  });
  it('groups a chain of close pairs (single linkage) and places the group at the mean of its members', () => {
    const c = clusterGlyphs([{ id: 'a', cx: 0, cy: 0 }, { id: 'far', cx: 100, cy: 100 }, { id: 'b', cx: 10, cy: 0 }, { id: 'c', cx: 20, cy: 0 }], 12);
    expect(c.map((g) => g.ids)).toEqual([['a', 'b', 'c'], ['far']]);
    expect([c[0].cx, c[0].cy]).toEqual([10, 0]);
  });
  it('a distance exactly between two glyphs does not join them (strictly closer)', () => {
    expect(clusterGlyphs([{ id: 'a', cx: 0, cy: 0 }, { id: 'b', cx: 3, cy: 4 }], 5)).toHaveLength(2);
    expect(clusterGlyphs([{ id: 'a', cx: 0, cy: 0 }, { id: 'b', cx: 3, cy: 4 }], 5.0001)).toHaveLength(1);
  });
  it('no glyphs, no groups', () => {
    expect(clusterGlyphs([], 10)).toEqual([]);
  });
});

describe('fanOut(cx, cy, k, gap, minRadius)', () => {
  it('puts the first glyph straight above the centre and the others clockwise on one circle', () => {
    const p = fanOut(50, 50, 4, 10, 20);
    expect(p[0].x).toBeCloseTo(50, 12);
    expect(p[0].y).toBeCloseTo(30, 12);
    expect(p[1].x).toBeCloseTo(70, 12); // 90° clockwise on screen (y down): to the right
    expect(p[1].y).toBeCloseTo(50, 12);
    for (const q of p) expect(Math.hypot(q.x - 50, q.y - 50)).toBeCloseTo(20, 12);
  });
  it('grows the circle so neighbours stay `gap` apart along it: r = k gap / (2 pi)', () => {
    const p = fanOut(0, 0, 20, 22, 10);
    expect(Math.hypot(p[0].x, p[0].y)).toBeCloseTo((20 * 22) / (2 * Math.PI), 12);
  });
});
