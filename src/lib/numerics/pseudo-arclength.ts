import type { CompiledSystem } from '../model/compiled-system.js';
import { BorderedWorkspace, EquilibriumEquations } from './bordered.js';
import { pointData, type TracedPoint } from './branch-point-data.js';
import { continueCurve } from './continue-curve.js';
import type { ExtendedSystem } from './extended-system.js';

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
 * Equilibrium branches H(y) = F(x, p) = 0, y = (x, p) in R^(n+1), as an extended system
 * (EquilibriumEquations of bordered.ts: DH = [J_x | F_p]) with, at every point, the eigenvalues of J_x
 * and the stability and Hopf test values (pointData).
 */
export class EquilibriumBranch extends EquilibriumEquations implements ExtendedSystem<TracedPoint> {
  constructor(system: CompiledSystem, ws: BorderedWorkspace = new BorderedWorkspace(system.dimension)) {
    super(system, ws);
  }

  point(y: Float64Array, t: Float64Array, det: number): TracedPoint {
    return pointData(this.system, y, t, det, this.ws);
  }
}

/**
 * Keller's pseudo-arclength continuation of one branch of H(y) = F(x, p) = 0 in one direction
 * (Keller 1977, "Numerical solution of bifurcation and nonlinear eigenvalue problems";
 * Allgower & Georg, Numerical Continuation Methods, ch. 2; Seydel, Practical Bifurcation and
 * Stability Analysis, §4.4-4.6): the one driver (continue-curve.ts) on EquilibriumBranch.
 * Predictor y* = y_k + h t_k; corrector Newton on F(y) = 0, t_k . (y - y*) = 0 (bordered
 * (n+1)x(n+1) system, DenseLu: ml-matrix's LU algorithm); the tangent reuses the corrector's last
 * factorization, with det [DH; t^T] for the branch-point test. Step control as continueCurve (common
 * practice, no source for the constants). On a sweep bound that cannot be solved the step's point
 * is kept (end just outside the bound); no closed-loop test here (the caller's stopAt does it).
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
  const stopAt = hooks.stopAt;
  const r = continueCurve<TracedPoint, 'merged' | 'closed-loop'>(new EquilibriumBranch(system), startY, startT, {
    lo: [o.lo],
    hi: [o.hi],
    initialStep: o.initialStep,
    minStep: o.minStep,
    maxStep: o.maxStep,
    maxParameterStep: [o.maxParameterStep],
    maxTurn: o.maxTurn,
    maxPoints: o.maxPoints,
    stateBound: o.stateBound,
    residualTolerance: o.residualTolerance,
    stepTolerance: o.stepTolerance,
    maxCorrectorIterations: o.maxCorrectorIterations,
    reuseFactorization: true,
    unsolvedBound: 'keep-step',
    closeLoops: false,
  }, {
    onStep: hooks.onStep,
    stop: stopAt ? (_a, b, index, arclength) => stopAt(b, index, arclength) : undefined,
    isCancelled: hooks.isCancelled,
  }, startDet);
  return { points: r.points, end: r.end === 'parameter-bound' ? 'sweep-bound' : r.end, rejectedSteps: r.rejectedSteps, newtonIterations: r.newtonIterations };
}
