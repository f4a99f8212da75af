import { describe, it, expect } from 'vitest';
import { circularLayout, linkSegment } from '../../../src/lib/editor';

describe('circularLayout', () => {
  it('puts every node at distance r from the centre, the first straight above it', () => {
    const pts = circularLayout(5, 100, 80, 40);
    for (const p of pts) expect(Math.hypot(p.x - 100, p.y - 80)).toBeCloseTo(40, 12);
    expect(pts[0].x).toBeCloseTo(100, 12);
    expect(pts[0].y).toBeCloseTo(40, 12);
  });
  it('spaces neighbours by the chord 2 r sin(pi/n) (elementary geometry)', () => {
    const pts = circularLayout(6, 0, 0, 10);
    expect(Math.hypot(pts[1].x - pts[0].x, pts[1].y - pts[0].y)).toBeCloseTo(2 * 10 * Math.sin(Math.PI / 6), 12);
  });
});

describe('linkSegment', () => {
  it('shortens both ends by the inset along the line', () => {
    const s = linkSegment({ x: 0, y: 0 }, { x: 10, y: 0 }, 2);
    expect(s).toEqual({ x1: 2, y1: 0, x2: 8, y2: 0 });
  });
  it('returns null for nodes closer than twice the inset', () => {
    expect(linkSegment({ x: 0, y: 0 }, { x: 3, y: 0 }, 2)).toBeNull();
  });
});
