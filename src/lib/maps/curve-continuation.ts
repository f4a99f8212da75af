/**
 * One pseudo-arclength driver for every curve of the maps layer (docs/maps.md §2): a curve is the
 * solution set of an "extended system" G(y) = 0, G: R^N -> R^(N-1), continued by Keller's
 * pseudo-arclength method (Keller 1977; Allgower & Georg, Numerical Continuation Methods, ch. 2;
 * Seydel, Practical Bifurcation and Stability Analysis, §4.4-4.6), with the predictor, corrector,
 * tangent and step control of src/lib/numerics/pseudo-arclength.ts (same constants, common practice,
 * no source) written for a general G. It is a separate driver, not a refactoring of
 * numerics/pseudo-arclength.ts, so that today's one-parameter traces stay bit-for-bit unchanged.
 * Equilibrium branches at a fixed second parameter, saddle-node curves and symmetry-breaking
 * (pitchfork) curves are ExtendedSystems (equilibrium-system.ts, saddle-node-curve.ts,
 * branch-point-curve.ts).
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { DenseLu } from '../numerics/dense-lu.js';
import { dist2, dot, norm2, normInf } from '../numerics/vector.js';

export interface ExtendedSystem {
  /** Number of unknowns N (the curve lives in R^N; there are N - 1 equations). */
  readonly size: number;
  /** Indices in y of the free parameters (bounds, parameter step cap). */
  readonly parameterIndex: readonly number[];
  /** Indices in y of the state (state bound). */
  readonly stateIndex: readonly number[];
  /** out[0..N-2] = G(y). */
  residual(y: Float64Array, out: Float64Array): void;
  /** out = DG(y), (N - 1) x N row-major. */
  jacobian(y: Float64Array, out: Float64Array): void;
  /**
   * Optional: called at every accepted point; may change the system's fixed data (e.g. a
   * normalization vector) without moving the solution y. Returns true when it did (the tangent is
   * then recomputed).
   */
  rebase?(y: Float64Array): boolean;
}

export interface CurveOptions {
  /** Bounds of each free parameter, in the order of parameterIndex. */
  readonly lo: readonly number[];
  readonly hi: readonly number[];
  readonly initialStep: number;
  readonly minStep: number;
  readonly maxStep: number;
  /** Largest change of each parameter per step (order of parameterIndex). */
  readonly maxParameterStep: readonly number[];
  readonly maxTurn: number;
  /** Points in this direction, start included. */
  readonly maxPoints: number;
  readonly stateBound: number;
  readonly residualTolerance: number;
  readonly stepTolerance: number;
  readonly maxCorrectorIterations: number;
}

export type CurveEnd = 'parameter-bound' | 'closed-loop' | 'point-cap' | 'step-collapse' | 'newton-failure' | 'state-bound' | 'cancelled'
  /** Stopped by the caller's test (a Hopf curve at a Bogdanov-Takens point, where it turns into neutral saddles). */
  | 'bogdanov-takens';

export interface CurvePoint {
  readonly y: Float64Array;
  /** Unit tangent (oriented along the direction of continuation). */
  readonly t: Float64Array;
}

export interface CurveHooks {
  /** Every accepted step (a previous, b new). */
  onStep?: (a: CurvePoint, b: CurvePoint) => void;
  /** After every accepted step: true ends the direction at b with end 'bogdanov-takens'. */
  stopAfter?: (a: CurvePoint, b: CurvePoint) => boolean;
  isCancelled?: () => boolean;
}

export interface CurveDirection {
  readonly points: CurvePoint[];
  readonly end: CurveEnd;
  readonly rejectedSteps: number;
  readonly newtonIterations: number;
}

/** Workspace of one extended system: matrices and scratch vectors of the bordered N x N problem. */
class Workspace {
  readonly g: Float64Array;
  readonly dg: Float64Array;
  readonly a: Float64Array;
  readonly rhs: Float64Array;
  readonly step: Float64Array;
  readonly unit: Float64Array;
  constructor(readonly N: number) {
    this.g = new Float64Array(N - 1);
    this.dg = new Float64Array((N - 1) * N);
    this.a = new Float64Array(N * N);
    this.rhs = new Float64Array(N);
    this.step = new Float64Array(N);
    this.unit = new Float64Array(N);
    this.unit[N - 1] = 1;
  }
}

function bordered(sys: ExtendedSystem, y: Float64Array, v: ArrayLike<number>, ws: Workspace): DenseLu {
  const N = ws.N;
  sys.jacobian(y, ws.dg);
  ws.a.set(ws.dg);
  for (let k = 0; k < N; k++) ws.a[(N - 1) * N + k] = v[k];
  return new DenseLu(ws.a, N);
}

export interface CorrectResult {
  readonly converged: boolean;
  readonly iterations: number;
  readonly residual: number;
  readonly y: Float64Array;
}

/**
 * Newton's method on G(y) = 0, v . y = c (bordered N x N matrix [DG; v^T], LU with partial pivoting).
 * Converged when |G|_inf <= residualTolerance after a step <= max(stepTolerance, 1e-6) (1 + |y|_inf)
 * (quadratic convergence: the error is then O(1e-12); Deuflhard, Newton Methods for Nonlinear
 * Problems, §2.1), as in numerics/bordered.ts. Never throws.
 */
export function correctOn(
  sys: ExtendedSystem,
  guess: ArrayLike<number>,
  v: ArrayLike<number>,
  c: number,
  o: { residualTolerance: number; stepTolerance: number; maxIterations: number; earlyStep?: number; maxDisplacement?: number },
): CorrectResult {
  const N = sys.size;
  const ws = new Workspace(N);
  const y = Float64Array.from(guess);
  const early = o.earlyStep ?? Math.max(o.stepTolerance, 1e-6);
  let residual = Number.NaN;
  for (let it = 1; it <= o.maxIterations; it++) {
    sys.residual(y, ws.g);
    residual = normInf(ws.g);
    for (let i = 0; i < N - 1; i++) ws.rhs[i] = -ws.g[i];
    ws.rhs[N - 1] = c - dot(v, y);
    if (!Number.isFinite(residual) || !Number.isFinite(ws.rhs[N - 1])) return { converged: false, iterations: it, residual, y };
    const lu = bordered(sys, y, v, ws);
    if (!lu.solveInto(ws.rhs, ws.step)) return { converged: false, iterations: it, residual, y };
    for (let i = 0; i < N; i++) y[i] += ws.step[i];
    if (o.maxDisplacement !== undefined) {
      let disp = 0;
      for (let i = 0; i < N; i++) disp = Math.max(disp, Math.abs(y[i] - guess[i]));
      if (disp > o.maxDisplacement) return { converged: false, iterations: it, residual, y };
    }
    const step = normInf(ws.step);
    if (step <= early * (1 + normInf(y))) {
      sys.residual(y, ws.g);
      residual = normInf(ws.g);
      if (residual <= o.residualTolerance) return { converged: true, iterations: it, residual, y };
      if (!Number.isFinite(residual)) return { converged: false, iterations: it, residual, y };
    }
  }
  sys.residual(y, ws.g);
  return { converged: false, iterations: o.maxIterations, residual: normInf(ws.g), y };
}

/** Unit tangent at y: [DG; v^T] z = e_N, normalized, oriented so that t . v > 0. Null when singular. */
export function curveTangent(sys: ExtendedSystem, y: Float64Array, v: ArrayLike<number>): Float64Array | null {
  const ws = new Workspace(sys.size);
  const lu = bordered(sys, y, v, ws);
  const z = new Float64Array(sys.size);
  if (!lu.solveInto(ws.unit, z)) return null;
  const nz = norm2(z);
  for (let i = 0; i < z.length; i++) z[i] /= nz;
  if (dot(z, v) < 0) for (let i = 0; i < z.length; i++) z[i] = -z[i];
  return z;
}

/**
 * Null vector of DG(y) ((N-1) x N, zero-padded to N x N): the right singular vector of the smallest
 * singular value (ml-matrix SVD; Golub & Van Loan, Matrix Computations, §2.4). Also returns the two
 * smallest singular values (a second one near zero means the start is not a regular point).
 */
export function startTangent(sys: ExtendedSystem, y: Float64Array): { t: Float64Array; smallest: number; next: number; largest: number } | null {
  const N = sys.size;
  const dg = new Float64Array((N - 1) * N);
  sys.jacobian(y, dg);
  const a = new Float64Array(N * N);
  a.set(dg);
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) return null;
  const svd = new SingularValueDecomposition(Matrix.from1DArray(N, N, a), { computeLeftSingularVectors: false });
  const s = svd.diagonal;
  const order = s.map((_, i) => i).sort((i, k) => s[i] - s[k]);
  const V = svd.rightSingularVectors;
  const t = new Float64Array(N);
  for (let r = 0; r < N; r++) t[r] = V.get(r, order[0]);
  // The padded zero row gives one zero singular value; the null vector of DG is the one whose
  // singular vector satisfies DG t = 0. With a rank N-1 matrix both coincide: the smallest one.
  return { t, smallest: s[order[0]], next: s[order[1]], largest: s[order[N - 1]] };
}

/**
 * Continue the curve G = 0 from a point y0 on it, in the direction of the unit tangent t0, until a
 * parameter bound, a cap or trouble. Predictor y* = y + h t, corrector correctOn with border t,
 * tangent from [DG; t_prev^T] z = e_N. Step control as numerics/pseudo-arclength.ts: a failed
 * corrector, a turn above maxTurn or a displacement above h/4 halve h; 1-2 iterations grow it by
 * 1.4 (up to maxStep), 5 or more shrink it by 0.7; |dp_k| per step <= maxParameterStep[k].
 * On leaving a parameter interval the end point is put exactly on the bound. A return to within
 * 0.5 h of the start after an arclength of 10 h ends the direction as a closed loop.
 */
export function continueCurve(sys: ExtendedSystem, y0: Float64Array, t0: Float64Array, o: CurveOptions, hooks: CurveHooks = {}): CurveDirection {
  const N = sys.size;
  const points: CurvePoint[] = [{ y: Float64Array.from(y0), t: Float64Array.from(t0) }];
  let cur = points[0];
  let h = Math.min(o.initialStep, o.maxStep);
  let rejected = 0;
  let iterations = 0;
  let arclength = 0;
  const corr = { residualTolerance: o.residualTolerance, stepTolerance: o.stepTolerance, maxIterations: o.maxCorrectorIterations };
  const finish = (end: CurveEnd): CurveDirection => ({ points, end, rejectedSteps: rejected, newtonIterations: iterations });
  const P = sys.parameterIndex;
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
    const res = correctOn(sys, pred, cur.t, dot(cur.t, pred), corr);
    iterations += res.iterations;
    let t = res.converged ? curveTangent(sys, res.y, cur.t) : null;
    let ok = t !== null;
    if (ok) {
      const turn = Math.acos(Math.min(1, Math.max(-1, dot(t!, cur.t))));
      if (turn > o.maxTurn || dist2(res.y, pred) > 0.25 * h) ok = false;
    }
    if (!ok) {
      rejected++;
      h *= 0.5;
      if (h < o.minStep) return finish(res.converged ? 'step-collapse' : 'newton-failure');
      continue;
    }
    let y = res.y;
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
      const b = correctOn(sys, guess, e, bound, { ...corr, maxIterations: Math.max(12, o.maxCorrectorIterations) });
      const bt = b.converged ? curveTangent(sys, b.y, cur.t) : null;
      // Not solvable on the bound (e.g. the curve's projection is tangent to it there): end at the
      // last point inside rather than at one outside the box.
      if (!bt) return finish('parameter-bound');
      y = b.y;
      t = bt;
      end = 'parameter-bound';
    }
    if (sys.rebase?.(y)) {
      const nt = curveTangent(sys, y, t!);
      if (nt) t = nt;
    }
    const pt: CurvePoint = { y, t: t! };
    arclength += dist2(y, cur.y);
    hooks.onStep?.(cur, pt);
    points.push(pt);
    cur = pt;
    if (end !== null) return finish(end);
    if (hooks.stopAfter?.(points[points.length - 2], pt)) return finish('bogdanov-takens');
    let big = 0;
    for (const i of sys.stateIndex) big = Math.max(big, Math.abs(y[i]));
    if (big > o.stateBound) return finish('state-bound');
    if (arclength > 10 * h && points.length > 10 && dist2(y, points[0].y) < 0.5 * h && dot(t!, points[0].t) > 0) {
      points.push({ y: Float64Array.from(points[0].y), t: Float64Array.from(points[0].t) });
      return finish('closed-loop');
    }
    if (res.iterations <= 2) h = Math.min(o.maxStep, h * 1.4);
    else if (res.iterations >= 5) h *= 0.7;
  }
}
