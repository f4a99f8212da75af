import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { defaultTraceSettings } from '../../../src/lib/atlas/index';
import { BorderedWorkspace, tangentAt } from '../../../src/lib/numerics/index';
import { continueToFold, type ContinueToFoldOptions } from '../../../src/lib/onset/continue-to-fold';

function ode(rate: string, from: number, to: number) {
  return compileModelJson({ format: 'brinkmap/ode-1', name: 'scalar test', variables: ['x'], parameters: { p: from }, rates: { x: rate }, sweep: { parameter: 'p', from, to } });
}

function options(from: number, to: number): ContinueToFoldOptions {
  const s = defaultTraceSettings;
  const w = Math.abs(to - from);
  return {
    lo: Math.min(from, to), hi: Math.max(from, to), initialStep: s.initialStep * 2, minStep: s.minStep * 2, maxStep: s.maxStep * 2,
    maxParameterStep: s.maxParameterStep * w, maxTurn: s.maxTurn, maxPoints: 10000, stateBound: 1e6,
    residualTolerance: s.residualTolerance, stepTolerance: s.stepTolerance, maxCorrectorIterations: s.maxCorrectorIterations,
    locateParameterTolerance: 1e-11, locateArcTolerance: 1e-10, locateMaxIterations: 100,
  };
}

function start(system: ReturnType<typeof ode>, x: number, p: number, dir: 1 | -1) {
  const y0 = Float64Array.of(x, p);
  const e = Float64Array.of(0, dir);
  const t = tangentAt(system, y0, e, new BorderedWorkspace(1));
  return { y0, t: t.tangent, det: t.determinant };
}

describe('continueToFold(system, y0, t0, det0, options)', () => {
  it('locates the fold of x\' = p - x^2 at p = 0 to 1e-11 (analytic: the roots ±sqrt(p) meet at p = 0)', () => {
    const system = ode('p - x^2', 1, -1);
    const s = start(system, -1, 1, -1);
    const y0copy = Float64Array.from(s.y0);
    const r = continueToFold(system, s.y0, s.t, s.det, options(1, -1));
    expect(r.end).toBe('fold');
    expect(r.converged).toBe(true);
    expect(Math.abs(r.fold!.point.y[1])).toBeLessThan(1e-11);
    // x = -sqrt(p) on the branch, so an error e in p allows |x| up to sqrt(e) + the arc bracket.
    expect(Math.abs(r.fold!.point.y[0])).toBeLessThan(1e-5);
    expect(r.fold!.converged).toBe(true);
    expect(r.branchPointNear).toBeNull();
    expect(Array.from(s.y0)).toEqual(Array.from(y0copy));
  });

  it('ends on the sweep bound when the fold lies beyond it', () => {
    const system = ode('p - x^2', 1, 0.5);
    const s = start(system, -1, 1, -1);
    const r = continueToFold(system, s.y0, s.t, s.det, options(1, 0.5));
    expect(r.end).toBe('sweep-bound');
    expect(r.fold).toBeNull();
  });

  it.each([
    ['transcritical x\' = p x - x^2', 'p * x - x^2'],
    ['pitchfork x\' = p x - x^3', 'p * x - x^3'],
  ])('reports the sign change of det [DH; t] at the branch point of the %s on x = 0 (at p = 0, within one step)', (_name, rate) => {
    // On x = 0, J_x = p changes sign at p = 0 with no fold (t_p = 1 throughout): by
    // det [DH; t^T] = det J_x · t_p (1 + |J_x^-1 F_p|^2) (derived in continue-to-fold.ts) the bordered determinant changes sign too.
    const system = ode(rate, -1, 1);
    const s = start(system, 0, -1, 1);
    const o = options(-1, 1);
    const r = continueToFold(system, s.y0, s.t, s.det, o);
    expect(r.end).toBe('sweep-bound');
    expect(r.branchPointNear).not.toBeNull();
    expect(Math.abs(r.branchPointNear!)).toBeLessThanOrEqual(o.maxParameterStep);
  });

  it('stops with "cancelled" when the cancel hook answers true', () => {
    const system = ode('p - x^2', 1, -1);
    const s = start(system, -1, 1, -1);
    const r = continueToFold(system, s.y0, s.t, s.det, options(1, -1), () => true);
    expect(r.end).toBe('cancelled');
    expect(r.converged).toBe(false);
  });
});
