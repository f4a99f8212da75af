import { describe, expect, it } from 'vitest';
import { thinDiagram } from '../../../../src/lib/server/results/thin.ts';
import type { Branch, Diagram } from '../../../../src/lib/atlas/types.ts';

/** A branch along the S-curve p = x - x^3/3 ... built by hand: p rises, turns at x = 1, falls, turns at x = 3 back up. */
function sCurve(n: number): Branch {
  const points = [];
  for (let i = 0; i < n; i++) {
    const x = -2 + (4 * i) / (n - 1);
    // p(x) = x^3/3 - x has turning points (dp/dx = x^2 - 1 = 0) at x = -1 and x = 1; stability flips there.
    points.push({ p: x ** 3 / 3 - x, x: [x], unstable: Math.abs(x) < 1 ? 1 : 0 });
  }
  return { id: 'b1', points, origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'] };
}

const diagram = (branches: Branch[]): Diagram => ({ parameter: 'r', variables: ['x'], branches, bifurcations: [], diagnostics: [], settings: {}, engineVersion: 'test' });

describe('thinDiagram', () => {
  it('returns the diagram itself when it is within the budget', () => {
    const d = diagram([sCurve(50)]);
    expect(thinDiagram(d, 100)).toBe(d);
  });

  it('keeps both ends, both turning points and both sides of every stability change, within about the budget', () => {
    const d = diagram([sCurve(10001)]);
    const t = thinDiagram(d, 200);
    const pts = t.branches[0].points;
    expect(pts.length).toBeLessThanOrEqual(210);
    expect(pts[0]).toBe(d.branches[0].points[0]);
    expect(pts[pts.length - 1]).toBe(d.branches[0].points[10000]);
    // Local extrema of p survive: the thinned curve turns exactly where the full one does.
    const turns = (arr: { p: number }[]) => arr.filter((_, i) => i > 0 && i < arr.length - 1 && (arr[i].p - arr[i - 1].p) * (arr[i + 1].p - arr[i].p) < 0);
    expect(turns(pts)).toEqual(turns(d.branches[0].points));
    const flips = (arr: { unstable: number }[]) => arr.filter((_, i) => i > 0 && arr[i].unstable !== arr[i - 1].unstable).length;
    expect(flips(pts)).toBe(flips(d.branches[0].points));
    expect(t.thinned).toEqual({ from: 10001, to: pts.length });
  });

  it('shares the budget by branch length and never drops a branch', () => {
    const d = diagram([sCurve(9001), { ...sCurve(1001), id: 'b2' }]);
    const t = thinDiagram(d, 500);
    expect(t.branches.map((b) => b.id)).toEqual(['b1', 'b2']);
    expect(t.branches[0].points.length).toBeGreaterThan(t.branches[1].points.length);
  });
});
