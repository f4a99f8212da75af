import { describe, expect, it } from 'vitest';
import { crossingsAt, regionPieces } from '../../../src/lib/plot/map-regions';
import type { MapDocumentView } from '../../../src/lib/plot/map-types';

const line = (id: string, pts: [number, number][]) => ({ id, type: 'saddle-node' as const, points: pts.map((p) => ({ p, x: [0] })) });

/** Two straight curves a = 0.3 + 0.2 b and a = 0.6 + 0.2 b over b in [0, 1]; regions weak | intermediate | strong between them (invented). */
const map: MapDocumentView = {
  parameters: ['a', 'b'],
  ranges: { first: [0, 1], second: [0, 1] },
  curves: [line('c1', [[0.3, 0], [0.4, 0.5], [0.5, 1]]), line('c2', [[0.6, 0], [0.7, 0.5], [0.8, 1]])],
  points: [],
  regions: [
    { id: 'r1', regime: 'weak', samples: [[0.1, 0], [0.1, 1]] },
    { id: 'r2', regime: 'intermediate', samples: [[0.5, 0], [0.65, 1]] },
    { id: 'r3', regime: 'strong', samples: [[0.9, 0], [0.95, 1]] },
  ],
};

describe('crossingsAt(curves, y)', () => {
  it('interpolates each polyline linearly where it crosses y and sorts by the first parameter', () => {
    // On c1, b = 0.25 lies halfway along the first segment: a = 0.3 + 0.5 (0.4 - 0.3) = 0.35; on c2, 0.65.
    const c = crossingsAt(map.curves, 0.25);
    expect(c.map((x) => x.curve)).toEqual(['c1', 'c2']);
    expect(c[0].p1).toBeCloseTo(0.35, 14);
    expect(c[1].p1).toBeCloseTo(0.65, 14);
  });
  it('counts a vertex exactly on y once and returns nothing outside the curves', () => {
    expect(crossingsAt(map.curves, 0.5).map((x) => x.p1)).toEqual([0.4, 0.7]);
    expect(crossingsAt(map.curves, 1.5)).toEqual([]);
  });
});

describe('regionPieces(map)', () => {
  const pieces = regionPieces(map, { strips: 10 });
  it('cuts every strip into three pieces, labelled from the sample between the same curves', () => {
    expect(pieces).toHaveLength(30);
    for (let k = 0; k < 10; k++) expect(pieces.slice(3 * k, 3 * k + 3).map((p) => p.regime)).toEqual(['weak', 'intermediate', 'strong']);
  });
  it('puts the boundaries on the curves at the strip edges (a = 0.3 + 0.2 b on the left of the middle piece)', () => {
    for (const p of pieces.filter((q) => q.regime === 'intermediate')) {
      const [ll, lr, ur, ul] = p.corners;
      expect(ll[0]).toBeCloseTo(0.3 + 0.2 * ll[1], 12);
      expect(ul[0]).toBeCloseTo(0.3 + 0.2 * ul[1], 12);
      expect(lr[0]).toBeCloseTo(0.6 + 0.2 * lr[1], 12);
      expect(ur[0]).toBeCloseTo(0.6 + 0.2 * ur[1], 12);
    }
  });
  it('leaves the plane unshaded when no sample has a label', () => {
    expect(regionPieces({ ...map, regions: [{ id: 'r', regime: null, samples: [[0.1, 0.1]] }] })).toEqual([]);
  });
  it('tiles the whole rectangle: piece areas add up to the area of the ranges', () => {
    const area = pieces.reduce((s, p) => {
      const [ll, lr, ur, ul] = p.corners;
      return s + ((lr[0] - ll[0] + ur[0] - ul[0]) / 2) * (ul[1] - ll[1]);
    }, 0);
    expect(area).toBeCloseTo(1, 12);
  });
});
