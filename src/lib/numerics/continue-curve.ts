/**
 * The one pseudo-arclength driver (docs/numerics.md §3): Keller's predictor-corrector continuation
 * of any extended system G(y) = 0 (extended-system.ts) in one direction, with step control, caps,
 * bounds and stop reasons written once. Equilibrium branches (pseudo-arclength.ts, continueBranch)
 * and the maps' saddle-node, Hopf and pitchfork curves (src/lib/maps) are its instances.
 * (Keller 1977, "Numerical solution of bifurcation and nonlinear eigenvalue problems"; Allgower &
 * Georg, Numerical Continuation Methods, ch. 2; Seydel, Practical Bifurcation and Stability
 * Analysis, §4.4-4.6.)
 */
import { correctExtended, ExtendedWorkspace, extendedTangent, type CurvePoint, type ExtendedSystem, type ExtendedTangent } from './extended-system.js';
import { dist2, dot } from './vector.js';

export interface CurveOptions {
  /** Bounds of each free parameter, in the order of parameterIndex; the curve ends on reaching one. */
  readonly lo: readonly number[];
  readonly hi: readonly number[];
  /** Arclength steps in the raw coordinates y. */
  readonly initialStep: number;
  readonly minStep: number;
  readonly maxStep: number;
  /** Largest change of each parameter per step (order of parameterIndex), so that close special points are not stepped over. */
  readonly maxParameterStep: readonly number[];
  /** Largest angle (radians) between consecutive tangents; larger turns halve the step. */
  readonly maxTurn: number;
  /** Points in this direction, the start included. */
  readonly maxPoints: number;
  /** Stop when max |y_i| over stateIndex exceeds this. */
  readonly stateBound: number;
  /** Corrector tolerances and cap. */
  readonly residualTolerance: number;
  readonly stepTolerance: number;
  readonly maxCorrectorIterations: number;
  /**
   * Tangent from the corrector's last factorization (at the last-but-one iterate, within 1e-6 of the
   * point) instead of a new one at the point: one LU fewer per point (default false). The
   * one-parameter engine uses it.
   */
  readonly reuseFactorization?: boolean;
  /**
   * When the end point cannot be solved on the bound crossed: 'keep-step' ends at the step's point
   * (just outside the bound), 'end-inside' at the last point inside (default).
   */
  readonly unsolvedBound?: 'keep-step' | 'end-inside';
  /** End as 'closed-loop' on returning to within 0.5 h of the start after an arclength of 10 h and 10 points (default true). */
  readonly closeLoops?: boolean;
}

export type CurveEnd = 'parameter-bound' | 'closed-loop' | 'point-cap' | 'step-collapse' | 'newton-failure' | 'state-bound' | 'cancelled';

export interface CurveHooks<P extends CurvePoint, S extends string = never> {
  /** Every accepted step (a previous point, b new), before the stop tests: detection of special points. */
  onStep?: (a: P, b: P) => void;
  /** After every accepted point inside the bounds (index = its place in the list, arclength so far); a reason ends the direction at b. */
  stop?: (a: P, b: P, index: number, arclength: number) => S | null | undefined;
  isCancelled?: () => boolean;
}

export interface CurveDirection<P extends CurvePoint = CurvePoint, S extends string = never> {
  readonly points: P[];
  readonly end: CurveEnd | S;
  readonly rejectedSteps: number;
  readonly newtonIterations: number;
}

/**
 * Continue G = 0 from y0 (on the curve) in the direction of the unit tangent t0 (det0 = det [DG; t0^T],
 * passed to the system's point()) until a bound, a cap, a stop reason or trouble. Never throws;
 * every stop reason is reported in `end`. y0 and t0 become the first point as they are (not copied).
 *  - Predictor y* = y_k + h t_k; corrector correctExtended on G = 0, t_k . (y - y*) = 0; tangent from
 *    [DG; t_k^T] z = e_N (extendedTangent).
 *  - Step control (common practice, no source for the constants): a failed corrector, a tangent
 *    turn above maxTurn or a corrector displacement above h/4 halve h; 1-2 corrector iterations let h
 *    grow by 1.4 up to maxStep, 5 or more shrink it by 0.7; |dp_k| per step <= maxParameterStep[k];
 *    h < minStep ends the direction ('step-collapse', or 'newton-failure' when the corrector failed).
 *  - Bounds: a start on a bound with its tangent pointing out ends at once; on leaving the parameter
 *    box the end point is put exactly on the bound crossed first along the step (smallest fraction),
 *    solving G = 0, p_k = bound from the interpolated point (see unsolvedBound).
 *  - After each accepted point: rebase (system), point data (system), onStep, then the end on a bound,
 *    the state bound, the caller's stop reason and the closed loop, in that order.
 */
export function continueCurve<P extends CurvePoint = CurvePoint, S extends string = never>(
  sys: ExtendedSystem<P>,
  y0: Float64Array,
  t0: Float64Array,
  o: CurveOptions,
  hooks: CurveHooks<P, S> = {},
  det0 = Number.NaN,
): CurveDirection<P, S> {
  const N = sys.size;
  const ws = new ExtendedWorkspace(N);
  const make = (y: Float64Array, t: Float64Array, det: number): P => (sys.point ? sys.point(y, t, det) : ({ y, t } as P));
  const points: P[] = [make(y0, t0, det0)];
  let cur = points[0];
  let h = Math.min(o.initialStep, o.maxStep);
  let rejected = 0;
  let iterations = 0;
  let arclength = 0;
  const reuse = o.reuseFactorization === true;
  const closeLoops = o.closeLoops !== false;
  const corr = { residualTolerance: o.residualTolerance, stepTolerance: o.stepTolerance, earlyStepTolerance: Math.max(o.stepTolerance, 1e-6), maxIterations: o.maxCorrectorIterations };
  const finish = (end: CurveEnd | S): CurveDirection<P, S> => ({ points, end, rejectedSteps: rejected, newtonIterations: iterations });
  const P = sys.parameterIndex;
  const S = sys.stateIndex;

  // Starting on a bound and pointing out of the range: nothing to trace in this direction.
  for (let k = 0; k < P.length; k++) {
    const p = cur.y[P[k]];
    const tp = cur.t[P[k]];
    if ((p <= o.lo[k] && tp < 0) || (p >= o.hi[k] && tp > 0)) return finish('parameter-bound');
  }

  for (;;) {
    if (hooks.isCancelled?.()) return finish('cancelled');
    if (points.length >= o.maxPoints) return finish('point-cap');
    for (let k = 0; k < P.length; k++) {
      const tp = Math.abs(cur.t[P[k]]);
      if (tp * h > o.maxParameterStep[k]) h = o.maxParameterStep[k] / tp;
    }
    if (h < o.minStep) return finish('step-collapse');
    const pred = new Float64Array(N);
    for (let i = 0; i < N; i++) pred[i] = cur.y[i] + h * cur.t[i];
    const res = correctExtended(sys, pred, cur.t, dot(cur.t, pred), corr, ws);
    iterations += res.iterations;
    let tan: ExtendedTangent | null = null;
    if (res.converged && res.lu !== null) {
      tan = extendedTangent(sys, res.y, cur.t, ws, reuse ? res.lu : undefined);
      // The reused factorization was from the last-but-one iterate; retry at the converged point.
      if (!tan.ok && reuse) tan = extendedTangent(sys, res.y, cur.t, ws);
    }
    let ok = tan !== null && tan.ok;
    if (ok) {
      const turn = Math.acos(Math.min(1, Math.max(-1, dot(tan!.tangent, cur.t))));
      if (turn > o.maxTurn || dist2(res.y, pred) > 0.25 * h) ok = false;
    }
    if (!ok) {
      rejected++;
      h *= 0.5;
      if (h < o.minStep) return finish(res.converged ? 'step-collapse' : 'newton-failure');
      continue;
    }
    let y = res.y;
    let t = tan!.tangent;
    let det = tan!.determinant;
    let end: CurveEnd | null = null;
    // Leaving the parameter box: the bound crossed first along the step (smallest fraction w) is the
    // one the end point is put on, so a step across a corner does not end outside the other bound.
    let first = -1;
    let wFirst = Infinity;
    for (let k = 0; k < P.length; k++) {
      const idx = P[k];
      if (y[idx] >= o.lo[k] && y[idx] <= o.hi[k]) continue;
      const bound = y[idx] < o.lo[k] ? o.lo[k] : o.hi[k];
      const w = (bound - cur.y[idx]) / (y[idx] - cur.y[idx]);
      if (w < wFirst) {
        wFirst = w;
        first = k;
      }
    }
    if (first >= 0) {
      const idx = P[first];
      const bound = y[idx] < o.lo[first] ? o.lo[first] : o.hi[first];
      const guess = new Float64Array(N);
      for (let i = 0; i < N; i++) guess[i] = cur.y[i] + wFirst * (y[i] - cur.y[i]);
      guess[idx] = bound;
      const e = new Float64Array(N);
      e[idx] = 1;
      const b = correctExtended(sys, guess, e, bound, { ...corr, maxIterations: Math.max(12, o.maxCorrectorIterations) }, ws);
      const bt = b.converged ? extendedTangent(sys, b.y, cur.t, ws) : null;
      if (bt !== null && bt.ok) {
        y = b.y;
        t = bt.tangent;
        det = bt.determinant;
      } else if (o.unsolvedBound !== 'keep-step') {
        // Not solvable on the bound (e.g. the curve's projection is tangent to it there): end at the
        // last point inside rather than at one outside the box.
        return finish('parameter-bound');
      }
      end = 'parameter-bound';
    }
    if (sys.rebase?.(y)) {
      const nt = extendedTangent(sys, y, t, ws);
      if (nt.ok) {
        t = nt.tangent;
        det = nt.determinant;
      }
    }
    const pt = make(y, t, det);
    arclength += dist2(pt.y, cur.y);
    hooks.onStep?.(cur, pt);
    points.push(pt);
    const prev = cur;
    cur = pt;
    if (end !== null) return finish(end);
    let big = 0;
    for (let k = 0; k < S.length; k++) {
      const v = Math.abs(y[S[k]]);
      if (v > big || Number.isNaN(v)) big = v;
    }
    if (big > o.stateBound) return finish('state-bound');
    const stop = hooks.stop?.(prev, pt, points.length - 1, arclength);
    if (stop) return finish(stop);
    if (closeLoops && arclength > 10 * h && points.length > 10 && dist2(y, points[0].y) < 0.5 * h && dot(t, points[0].t) > 0) {
      points.push(make(Float64Array.from(points[0].y), Float64Array.from(points[0].t), det0));
      return finish('closed-loop');
    }
    if (res.iterations <= 2) h = Math.min(o.maxStep, h * 1.4);
    else if (res.iterations >= 5) h *= 0.7;
  }
}
