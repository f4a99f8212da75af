/**
 * Extended systems: a curve as the solution set of G(y) = 0, G: R^N -> R^(N-1), and the linear
 * algebra every pseudo-arclength step needs on it (docs/numerics.md §3): the bordered matrix
 * [DG(y); v^T], Newton's method on G = 0, v . y = c, the unit tangent and the start tangent.
 * Equilibrium branches of the one-parameter engine (pseudo-arclength.ts, G = F(x, p)), and the
 * saddle-node, Hopf and pitchfork curves of the maps layer (src/lib/maps) are extended systems;
 * continue-curve.ts continues any of them (Keller 1977, "Numerical solution of bifurcation and
 * nonlinear eigenvalue problems"; Allgower & Georg, Numerical Continuation Methods, ch. 2).
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { DenseLu } from './dense-lu.js';
import { dot, norm2, normInf } from './vector.js';

/** A point of a curve: y and the unit tangent there, oriented along the direction of continuation. */
export interface CurvePoint {
  readonly y: Float64Array;
  readonly t: Float64Array;
}

export interface ExtendedSystem<P extends CurvePoint = CurvePoint> {
  /** Number of unknowns N (the curve lives in R^N; there are N - 1 equations). */
  readonly size: number;
  /** Indices in y of the free parameters (bounds, parameter step cap). */
  readonly parameterIndex: readonly number[];
  /** Indices in y of the state (state bound). */
  readonly stateIndex: readonly number[];
  /** out[0..N-2] = G(y). */
  residual(y: Float64Array, out: Float64Array): void;
  /**
   * out[0..(N-1)N) = DG(y), (N - 1) x N row-major. Every entry must be written (out is the top of
   * the bordered matrix and holds the previous call's values).
   */
  jacobian(y: Float64Array, out: Float64Array): void;
  /**
   * Optional: called at every accepted point; may change the system's fixed data (e.g. a
   * normalization vector) without moving the solution y. Returns true when it did (the tangent is
   * then recomputed).
   */
  rebase?(y: Float64Array): boolean;
  /**
   * Optional: the point stored for (y, t) with det = det [DG; t^T] (test functions, eigenvalues...);
   * without it the point is { y, t }.
   */
  point?(y: Float64Array, t: Float64Array, det: number): P;
}

/** Matrices and scratch vectors of the bordered N x N problem of one extended system. */
export class ExtendedWorkspace {
  readonly g: Float64Array;
  /** [DG; v^T], N x N row-major; `top` is its first N - 1 rows (what jacobian() fills). */
  readonly a: Float64Array;
  readonly top: Float64Array;
  readonly rhs: Float64Array;
  readonly step: Float64Array;
  /** e_N (never written). */
  readonly unit: Float64Array;
  constructor(readonly N: number) {
    this.g = new Float64Array(N - 1);
    this.a = new Float64Array(N * N);
    this.top = this.a.subarray(0, (N - 1) * N);
    this.rhs = new Float64Array(N);
    this.step = new Float64Array(N);
    this.unit = new Float64Array(N);
    this.unit[N - 1] = 1;
  }
}

/** LU (DenseLu: ml-matrix's algorithm, partial pivoting) of [DG(y); v^T]. */
export function borderedFactor(sys: ExtendedSystem<CurvePoint>, y: Float64Array, v: ArrayLike<number>, ws: ExtendedWorkspace): DenseLu {
  const N = ws.N;
  sys.jacobian(y, ws.top);
  const a = ws.a;
  for (let k = 0; k < N; k++) a[(N - 1) * N + k] = v[k];
  return new DenseLu(a, N);
}

export interface ExtendedCorrectorOptions {
  /** Converged when |G|_inf <= residualTolerance ... */
  readonly residualTolerance: number;
  /** ... after a Newton step |dy|_inf <= max(stepTolerance, 1e-6) (1 + |y|_inf) (or earlyStepTolerance when given). */
  readonly stepTolerance: number;
  readonly maxIterations: number;
  readonly earlyStepTolerance?: number;
  /** Fail when the iterate moves farther than this (max norm) from the guess. */
  readonly maxDisplacement?: number;
}

export interface ExtendedCorrection {
  readonly converged: boolean;
  readonly iterations: number;
  readonly residual: number;
  readonly y: Float64Array;
  /** LU of [DG; v^T] at the last-but-one iterate (within the step tolerance of y): reusable for the tangent. Null on failure. */
  readonly lu: DenseLu | null;
}

/**
 * Newton's method on G(y) = 0, v . y = c (the Keller pseudo-arclength corrector when v is the
 * tangent and c = v . (y_prev + h v)), the bordered matrix factorized at every iterate (Keller 1977;
 * Allgower & Georg §2.2). Converged when |G|_inf <= residualTolerance after a step
 * <= earlyStepTolerance (1 + |y|_inf), default max(stepTolerance, 1e-6): Newton converges
 * quadratically there, so after a step of size delta the error is O(delta^2), about 1e-12 for 1e-6,
 * without another factorization (Deuflhard, Newton Methods for Nonlinear Problems, §2.1).
 * Never throws; a singular matrix, non-finite values, displacement beyond maxDisplacement or the
 * iteration cap return converged = false. The same operations as numerics/bordered.ts `correct`
 * (whose condition "step <= stepTolerance (1 + |y|) or earlyStepTolerance > stepTolerance" always
 * holds once step <= earlyStepTolerance (1 + |y|) with earlyStepTolerance >= stepTolerance).
 */
export function correctExtended(
  sys: ExtendedSystem<CurvePoint>,
  guess: ArrayLike<number>,
  v: ArrayLike<number>,
  c: number,
  o: ExtendedCorrectorOptions,
  ws: ExtendedWorkspace = new ExtendedWorkspace(sys.size),
): ExtendedCorrection {
  const N = ws.N;
  const y = Float64Array.from(guess);
  const early = o.earlyStepTolerance ?? Math.max(o.stepTolerance, 1e-6);
  const rhs = ws.rhs;
  const d = ws.step;
  const g = ws.g;
  let lu: DenseLu | null = null;
  let residual = Number.NaN;
  for (let it = 1; it <= o.maxIterations; it++) {
    sys.residual(y, g);
    residual = normInf(g);
    for (let i = 0; i < N - 1; i++) rhs[i] = -g[i];
    rhs[N - 1] = c - dot(v, y);
    if (!Number.isFinite(residual) || !Number.isFinite(rhs[N - 1])) return { converged: false, iterations: it, residual, y, lu: null };
    lu = borderedFactor(sys, y, v, ws);
    if (!lu.solveInto(rhs, d)) return { converged: false, iterations: it, residual, y, lu: null };
    for (let i = 0; i < N; i++) y[i] += d[i];
    if (o.maxDisplacement !== undefined && o.maxDisplacement < Number.POSITIVE_INFINITY) {
      let disp = 0;
      for (let i = 0; i < N; i++) disp = Math.max(disp, Math.abs(y[i] - guess[i]));
      if (disp > o.maxDisplacement) return { converged: false, iterations: it, residual, y, lu: null };
    }
    const step = normInf(d);
    if (step <= early * (1 + normInf(y))) {
      sys.residual(y, g);
      residual = normInf(g);
      if (residual <= o.residualTolerance) return { converged: true, iterations: it, residual, y, lu };
      if (!Number.isFinite(residual)) return { converged: false, iterations: it, residual, y, lu: null };
    }
  }
  sys.residual(y, g);
  return { converged: false, iterations: o.maxIterations, residual: normInf(g), y, lu };
}

export interface ExtendedTangent {
  /** False when the bordered matrix is singular or the solution does not point along v. */
  readonly ok: boolean;
  /** Unit tangent with t . v > 0. */
  readonly tangent: Float64Array;
  /** det [DG; t^T] for the returned unit tangent (its sign is the branch-point test function). */
  readonly determinant: number;
}

/**
 * Unit tangent of G = 0 at y: the solution z of [DG(y); v^T] z = e_N, normalized (so DG t = 0 and
 * t . v > 0, which keeps the orientation through folds; Keller 1977; Allgower & Georg §2.1), with
 * det [DG; t^T] = det [DG; v^T] / (t . v) (det [DG; w^T] = w . c for the cofactor column c, which
 * is parallel to t). The border v is normally the previous tangent; `lu` reuses a factorization of
 * [DG; v^T] (the corrector's last one).
 */
export function extendedTangent(sys: ExtendedSystem<CurvePoint>, y: Float64Array, v: ArrayLike<number>, ws: ExtendedWorkspace, lu?: DenseLu): ExtendedTangent {
  const N = ws.N;
  const fac = lu ?? borderedFactor(sys, y, v, ws);
  const z = ws.step;
  if (!fac.solveInto(ws.unit, z)) return { ok: false, tangent: new Float64Array(N), determinant: fac.determinant };
  const nz = norm2(z);
  const t = new Float64Array(N);
  for (let i = 0; i < N; i++) t[i] = z[i] / nz;
  const tv = dot(t, v);
  return { ok: tv > 0, tangent: t, determinant: fac.determinant / tv };
}

/**
 * Null vector of DG(y) ((N-1) x N, zero-padded to N x N): the right singular vector of the smallest
 * singular value (ml-matrix SVD; Golub & Van Loan, Matrix Computations, §2.4). Also returns the two
 * smallest and the largest singular value (a second one near zero means the start is not a regular
 * point). Null when DG is not finite.
 */
export function startTangent(sys: ExtendedSystem<CurvePoint>, y: Float64Array): { t: Float64Array; smallest: number; next: number; largest: number } | null {
  const N = sys.size;
  const a = new Float64Array(N * N);
  sys.jacobian(y, a.subarray(0, (N - 1) * N));
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
