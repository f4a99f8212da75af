import { describe, expect, it } from 'vitest';
import { compileTwoParameter, continueCurve, EquilibriumSystem, startTangent } from '../../../src/lib/maps/index';
import { BorderedWorkspace, continueBranch, tangentAt } from '../../../src/lib/numerics/index';

/**
 * The one pseudo-arclength driver (numerics/continue-curve.ts) on the equilibrium system of x' = a + b x - x^3 at
 * b = 1: the branch is a = x^3 - x (solve F = 0 for a), with folds where da/dx = 3x^2 - 1 = 0, at
 * a = ±2/(3 sqrt 3) (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §3.6, the cusp's fold values).
 */
const cusp = {
  format: 'brinkmap/ode-1', name: 'cusp normal form', variables: ['x'], rates: { x: 'a + b * x - x^3' },
  parameters: { a: 0, b: 1 }, sweep: { parameter: 'a', from: -1, to: 1 },
};

describe('continueCurve (the one driver, numerics/continue-curve.ts) on the maps equilibrium system', () => {
  const sys = compileTwoParameter(cusp, { second: 'b' });
  const ext = new EquilibriumSystem(sys, 1);
  const y0 = Float64Array.from([-1.2, (-1.2) ** 3 + 1.2]);
  const t = startTangent(ext, y0)!;
  if (t.t[0] < 0) t.t.forEach((v, i) => (t.t[i] = -v));
  const run = continueCurve(ext, y0, t.t, {
    lo: [-1], hi: [1], initialStep: 4e-3, minStep: 1e-9, maxStep: 4e-2, maxParameterStep: [2 / 600], maxTurn: 0.15,
    maxPoints: 10_000, stateBound: 1e6, residualTolerance: 1e-10, stepTolerance: 1e-10, maxCorrectorIterations: 8,
  });

  it('follows a = x^3 - x through both folds to the far bound a = 1', () => {
    expect(run.end).toBe('parameter-bound');
    for (const q of run.points.slice(1)) expect(Math.abs(q.y[1] - (q.y[0] ** 3 - q.y[0]))).toBeLessThan(1e-10);
    expect(run.points.at(-1)!.y[1]).toBeCloseTo(1, 12);
    // The parameter component of the tangent changes sign exactly twice, once near each fold.
    const flips: number[] = [];
    for (let i = 1; i < run.points.length; i++) if (Math.sign(run.points[i].t[1]) !== Math.sign(run.points[i - 1].t[1])) flips.push(run.points[i].y[1]);
    expect(flips).toHaveLength(2);
    const fold = 2 / (3 * Math.sqrt(3));
    expect(flips.map((a) => Math.abs(Math.abs(a) - fold)).every((d) => d < 1e-3)).toBe(true);
  });

  it("gives the one-parameter engine's branch (continueBranch on the document compiled at b = 1) to 1e-12, with the engine's policies", () => {
    // Independent route: today's one-parameter compiler (atSecond) and continueBranch; the maps' system
    // uses the two-parameter compiler. Same driver, same start, same options and policies.
    const one = sys.atSecond(1);
    const ws = new BorderedWorkspace(1);
    const tan = tangentAt(one, y0, t.t, ws);
    const o = { lo: -1, hi: 1, initialStep: 4e-3, minStep: 1e-9, maxStep: 4e-2, maxParameterStep: 2 / 600, maxTurn: 0.15, maxPoints: 10_000, stateBound: 1e6, residualTolerance: 1e-10, stepTolerance: 1e-10, maxCorrectorIterations: 8 };
    const engine = continueBranch(one, y0, tan.tangent, tan.determinant, o);
    const maps = continueCurve(ext, Float64Array.from(y0), Float64Array.from(tan.tangent), {
      ...o, lo: [-1], hi: [1], maxParameterStep: [o.maxParameterStep], reuseFactorization: true, unsolvedBound: 'keep-step', closeLoops: false,
    });
    expect(engine.end).toBe('sweep-bound');
    expect(maps.end).toBe('parameter-bound');
    expect(maps.points).toHaveLength(engine.points.length);
    engine.points.forEach((q, i) => {
      expect(Math.abs(q.y[0] - maps.points[i].y[0])).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(q.y[1] - maps.points[i].y[1])).toBeLessThanOrEqual(1e-12);
    });
  });
});
