import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { scalarSystem } from './helpers.js';

// Normal forms of Strogatz, Nonlinear Dynamics and Chaos (2nd ed.), ch. 3: each has its bifurcation
// at r = 0, x = 0 (§3.1 saddle-node, §3.2 transcritical, §3.4 supercritical pitchfork).
describe('traceDiagram on one-dimensional normal forms', () => {
  it('locates the saddle-node of x\' = r + x^2 at r = 0 (Strogatz §3.1) to 1e-9', () => {
    const d = traceDiagram(scalarSystem((x, r) => r + x * x, (x) => 2 * x, () => 1, { from: -1, to: 1 }, [[1]]));
    const folds = d.bifurcations.filter((b) => b.type === 'saddle-node');
    expect(folds).toHaveLength(1);
    expect(Math.abs(folds[0].p)).toBeLessThan(1e-9);
    expect(Math.abs(folds[0].x[0])).toBeLessThan(1e-9);
    expect(d.bifurcations).toHaveLength(1);
    // Both equilibria x = +-sqrt(-r) lie on the one branch that folds: one branch, both ends on r = -1.
    expect(d.branches).toHaveLength(1);
    const pts = d.branches[0].points;
    expect(pts[0].p).toBe(-1);
    expect(pts.at(-1)!.p).toBe(-1);
    // Stability: f'(x) = 2x, so x = -sqrt(-r) is stable (0 unstable) and x = +sqrt(-r) unstable (1).
    for (const q of pts) if (Math.abs(q.x[0]) > 1e-3) expect(q.unstable).toBe(q.x[0] > 0 ? 1 : 0);
  });

  it('locates the transcritical point of x\' = r x - x^2 at r = 0 (Strogatz §3.2) and links both branches', () => {
    const d = traceDiagram(scalarSystem((x, r) => r * x - x * x, (x, r) => r - 2 * x, (x) => x, { from: -1, to: 1 }, [[0]]));
    expect(d.bifurcations.map((b) => b.type)).toEqual(['transcritical']);
    const bp = d.bifurcations[0];
    expect(Math.abs(bp.p)).toBeLessThan(1e-9);
    expect(Math.abs(bp.x[0])).toBeLessThan(1e-9);
    // x = 0 and x = r (the multi-start finds x = -1 at r = -1 too), crossing once; not traced twice.
    expect(d.branches).toHaveLength(2);
    expect(bp.branches).toEqual(['b1', 'b2']);
    const zero = d.branches.find((b) => b.points.every((q) => q.x[0] === 0))!;
    const diag = d.branches.find((b) => b !== zero)!;
    for (const q of diag.points) expect(q.x[0]).toBeCloseTo(q.p, 9);
    // Exchange of stability: f' = r on x = 0 and f' = -r on x = r.
    for (const q of zero.points) if (Math.abs(q.p) > 1e-6) expect(q.unstable).toBe(q.p > 0 ? 1 : 0);
    for (const q of diag.points) if (Math.abs(q.p) > 1e-6) expect(q.unstable).toBe(q.p < 0 ? 1 : 0);
  });

  it('locates the pitchfork of x\' = r x - x^3 at r = 0 (Strogatz §3.4) with the bent branch r = x^2', () => {
    const d = traceDiagram(scalarSystem((x, r) => r * x - x ** 3, (x, r) => r - 3 * x * x, (x) => x, { from: -1, to: 1 }, [[0]]));
    expect(d.bifurcations.map((b) => b.type)).toEqual(['pitchfork']);
    expect(Math.abs(d.bifurcations[0].p)).toBeLessThan(1e-9);
    expect(d.branches).toHaveLength(2);
    const bent = d.branches[1];
    // The crossing branch is r = x^2: both halves, each ending on r = 1 at x = +-1.
    for (const q of bent.points) expect(q.p).toBeCloseTo(q.x[0] ** 2, 9);
    const xs = bent.points.map((q) => q.x[0]);
    expect(Math.min(...xs)).toBeCloseTo(-1, 9);
    expect(Math.max(...xs)).toBeCloseTo(1, 9);
    // Supercritical: x = +-sqrt(r) has f' = -2r < 0, stable.
    for (const q of bent.points) if (q.p > 1e-6) expect(q.unstable).toBe(0);
  });

  it('classifies the same pitchfork when tracing starts on the bent branch (sweep from r = 1 down)', () => {
    const d = traceDiagram(scalarSystem((x, r) => r * x - x ** 3, (x, r) => r - 3 * x * x, (x) => x, { from: 1, to: -1 }, [[1], [0], [-1]]));
    // The saddle-node test also fires on the bent branch there; it must be absorbed into the pitchfork.
    expect(d.bifurcations.map((b) => b.type)).toEqual(['pitchfork']);
    expect(Math.abs(d.bifurcations[0].p)).toBeLessThan(1e-9);
    expect(d.branches).toHaveLength(2);
  });

  it('locates both saddle-nodes of the cusp form x\' = r + x - x^3 at r = +-2/(3 sqrt 3)', () => {
    // Fold conditions: f = r + x - x^3 = 0 and f_x = 1 - 3x^2 = 0, so x = +-1/sqrt(3) and
    // r = x^3 - x = +-(1/(3 sqrt 3) - 1/sqrt 3) = -+2/(3 sqrt 3) (x = 1/sqrt 3 gives r = -2/(3 sqrt 3)).
    const rc = 2 / (3 * Math.sqrt(3));
    const d = traceDiagram(scalarSystem((x, r) => r + x - x ** 3, (x) => 1 - 3 * x * x, () => 1, { from: -1, to: 1 }, [[-1.3]]));
    const folds = d.bifurcations.filter((b) => b.type === 'saddle-node');
    expect(folds).toHaveLength(2);
    expect(d.bifurcations).toHaveLength(2);
    expect(Math.abs(folds[0].p + rc)).toBeLessThan(1e-9);
    expect(Math.abs(folds[0].x[0] - 1 / Math.sqrt(3))).toBeLessThan(1e-8);
    expect(Math.abs(folds[1].p - rc)).toBeLessThan(1e-9);
    expect(Math.abs(folds[1].x[0] + 1 / Math.sqrt(3))).toBeLessThan(1e-8);
  });

  it('resolves two saddle-nodes only 0.00133 apart on a nearly vertical branch x\' = p - 1e-3 (x - x^3/3)', () => {
    // f_x = -1e-3 (1 - x^2) = 0 at x = +-1, p = 1e-3 (x - x^3/3) = +-2e-3/3: folds 1.33e-3 apart in p
    // while x runs from about -3 to 3 (the branch is nearly vertical: dp/dx = 1e-3 (1 - x^2)).
    const eps = 1e-3;
    const d = traceDiagram(scalarSystem((x, p) => p - eps * (x - x ** 3 / 3), (x) => -eps * (1 - x * x), () => 1, { from: -0.01, to: 0.01 }, [[3]]));
    const folds = d.bifurcations.filter((b) => b.type === 'saddle-node');
    expect(folds).toHaveLength(2);
    expect(Math.abs(folds[0].p + (2 * eps) / 3)).toBeLessThan(1e-10);
    expect(Math.abs(folds[1].p - (2 * eps) / 3)).toBeLessThan(1e-10);
    expect(d.branches).toHaveLength(1);
    expect(d.branches[0].ends).toEqual(['sweep-bound', 'sweep-bound']);
  });
});
