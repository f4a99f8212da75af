import type { CompiledSystem } from '../model/compiled-system.js';
import { BorderedWorkspace, correct, tangentAt } from './bordered.js';
import { pointData, type TracedPoint } from './branch-point-data.js';
import { dist2, dot, normInf } from './vector.js';

export interface ContinuationOptions {
  /** Parameter bounds; the branch stops on reaching either (the end point is put exactly on the bound). */
  lo: number;
  hi: number;
  /** Arclength steps in the raw (x, p) coordinates. */
  initialStep: number;
  minStep: number;
  maxStep: number;
  /** Largest parameter change per step, so that close special points are not stepped over. */
  maxParameterStep: number;
  /** Largest angle (radians) between consecutive tangents; larger turns halve the step. */
  maxTurn: number;
  /** Points in this direction, the start included. */
  maxPoints: number;
  /** Stop when |x|_inf exceeds this. */
  stateBound: number;
  /** Corrector tolerances and cap. */
  residualTolerance: number;
  stepTolerance: number;
  maxCorrectorIterations: number;
}

export type DirectionEnd = 'sweep-bound' | 'closed-loop' | 'merged' | 'point-cap' | 'step-collapse' | 'newton-failure' | 'state-bound' | 'cancelled';

export interface ContinuationHooks {
  /** Called for every accepted step (a = previous point, b = new point); detection of special points. */
  onStep?: (a: TracedPoint, b: TracedPoint) => void;
  /** Called after every accepted point; returning a reason stops the direction there. */
  stopAt?: (b: TracedPoint, index: number, arclength: number) => 'merged' | 'closed-loop' | null;
  isCancelled?: () => boolean;
}

export interface ContinuationResult {
  readonly points: TracedPoint[];
  readonly end: DirectionEnd;
  readonly rejectedSteps: number;
  readonly newtonIterations: number;
}

/**
 * Keller's pseudo-arclength continuation of one branch of H(y) = F(x, p) = 0 in one direction
 * (Keller 1977, "Numerical solution of bifurcation and nonlinear eigenvalue problems";
 * Allgower & Georg, Numerical Continuation Methods, ch. 2; Seydel, Practical Bifurcation and
 * Stability Analysis, §4.4-4.6).
 * Predictor: y* = y_k + h t_k (tangent t_k from [DH; t_{k-1}^T] t = e_{n+1}).
 * Corrector: Newton on F(y) = 0, t_k . (y - y*) = 0 (bordered (n+1)x(n+1) system, DenseLu: ml-matrix's LU algorithm).
 * Step control (common practice, no source for the constants): a failed corrector, a tangent turn
 * above maxTurn or a corrector displacement above h/4 halve h; 1-2 corrector iterations let h grow
 * by 1.4 up to maxStep, 5 or more shrink it by 0.7; |dp| per step is capped by maxParameterStep; h < minStep ends the branch.
 * The start point's tangent must be supplied (unit, oriented in the wanted direction).
 * Never throws; every stop reason is reported in `end`.
 */
export function continueBranch(
  system: CompiledSystem,
  startY: Float64Array,
  startT: Float64Array,
  startDet: number,
  o: ContinuationOptions,
  hooks: ContinuationHooks = {},
): ContinuationResult {
  const n = system.dimension;
  const ws = new BorderedWorkspace(n);
  const points: TracedPoint[] = [pointData(system, startY, startT, startDet, ws)];
  let cur = points[0];
  let h = Math.min(o.initialStep, o.maxStep);
  let rejected = 0;
  let iterations = 0;
  let arclength = 0;
  const corrOpts = { residualTolerance: o.residualTolerance, stepTolerance: o.stepTolerance, earlyStepTolerance: Math.max(o.stepTolerance, 1e-6), maxIterations: o.maxCorrectorIterations };
  const finish = (end: DirectionEnd): ContinuationResult => ({ points, end, rejectedSteps: rejected, newtonIterations: iterations });

  // Starting on a bound and pointing out of the range: nothing to trace in this direction.
  const tp0 = cur.t[n];
  if ((cur.y[n] <= o.lo && tp0 < 0) || (cur.y[n] >= o.hi && tp0 > 0)) return finish('sweep-bound');

  for (;;) {
    if (hooks.isCancelled?.()) return finish('cancelled');
    if (points.length >= o.maxPoints) return finish('point-cap');
    const tp = cur.t[n];
    if (Math.abs(tp) * h > o.maxParameterStep) h = o.maxParameterStep / Math.abs(tp);
    if (h < o.minStep) return finish('step-collapse');
    const pred = new Float64Array(n + 1);
    for (let i = 0; i <= n; i++) pred[i] = cur.y[i] + h * cur.t[i];
    const c = dot(cur.t, pred);
    const res = correct(system, pred, cur.t, c, ws, corrOpts);
    iterations += res.iterations;
    let ok = res.converged && res.lu !== null;
    let tan = ok ? tangentAt(system, res.y, cur.t, ws, res.lu!) : null;
    if (tan !== null && !tan.ok) {
      // The reused factorization was from the last-but-one iterate; retry at the converged point.
      tan = tangentAt(system, res.y, cur.t, ws);
    }
    ok = ok && tan !== null && tan.ok;
    if (ok) {
      const cosTurn = Math.min(1, dot(tan!.tangent, cur.t));
      const disp = dist2(res.y, pred);
      if (Math.acos(cosTurn) > o.maxTurn || disp > 0.25 * h) ok = false;
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
    let end: DirectionEnd | null = null;
    if (y[n] < o.lo || y[n] > o.hi) {
      // Put the end point exactly on the bound: solve F = 0, p = bound from the interpolated state.
      const bound = y[n] < o.lo ? o.lo : o.hi;
      const w = (bound - cur.y[n]) / (y[n] - cur.y[n]);
      const guess = new Float64Array(n + 1);
      for (let i = 0; i <= n; i++) guess[i] = cur.y[i] + w * (y[i] - cur.y[i]);
      guess[n] = bound;
      const e = new Float64Array(n + 1);
      e[n] = 1;
      const bres = correct(system, guess, e, bound, ws, { ...corrOpts, maxIterations: Math.max(12, o.maxCorrectorIterations) });
      if (bres.converged) {
        const btan = tangentAt(system, bres.y, cur.t, ws);
        if (btan.ok) {
          y = bres.y;
          t = btan.tangent;
          det = btan.determinant;
        }
      }
      end = 'sweep-bound';
    }
    const pt = pointData(system, y, t, det, ws);
    arclength += dist2(pt.y, cur.y);
    hooks.onStep?.(cur, pt);
    points.push(pt);
    cur = pt;
    if (end !== null) return finish(end);
    if (normInf(pt.y.subarray(0, n)) > o.stateBound) return finish('state-bound');
    const stop = hooks.stopAt?.(pt, points.length - 1, arclength);
    if (stop) return finish(stop);
    if (res.iterations <= 2) h = Math.min(o.maxStep, h * 1.4);
    else if (res.iterations >= 5) h *= 0.7;
  }
}
