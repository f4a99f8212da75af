import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { CompiledSystem } from '../model/compiled-system.js';
import type { DenseLu } from './dense-lu.js';
import { correctExtended, ExtendedWorkspace, extendedTangent, type ExtendedSystem } from './extended-system.js';
import { allFinite } from './vector.js';

/*
 * Points on a branch are y = (x_1..x_n, p) in R^(n+1); H(y) = F(x, p). DH = [J_x | F_p] is n x (n+1).
 * The bordered matrix of a unit vector v is A(y, v) = [DH(y); v^T], square (n+1) x (n+1).
 */

/** Workspace reused by the continuation so that each Newton step allocates little. */
export class BorderedWorkspace {
  readonly n: number;
  readonly f: Float64Array;
  readonly jx: Float64Array;
  readonly fp: Float64Array;
  readonly a: Float64Array;
  readonly x: Float64Array;
  /** Scratch vectors of length n + 1 for linear solves (Newton steps, tangents) that do not escape. */
  readonly step: Float64Array;
  readonly unit: Float64Array;
  constructor(n: number) {
    this.n = n;
    this.f = new Float64Array(n);
    this.jx = new Float64Array(n * n);
    this.fp = new Float64Array(n);
    this.a = new Float64Array((n + 1) * (n + 1));
    this.x = new Float64Array(n);
    this.step = new Float64Array(n + 1);
    this.unit = new Float64Array(n + 1);
    this.unit[n] = 1;
    this.ext = new ExtendedWorkspace(n + 1);
  }

  /** Workspace of the (n+1) x (n+1) bordered problem for the shared corrector and tangent (extended-system.ts). */
  readonly ext: ExtendedWorkspace;
  private eqSystem: CompiledSystem | null = null;
  private eq: EquilibriumEquations | null = null;

  /** H(y) = F(x, p) of `system` as an extended system on this workspace (one object per system, reused). */
  equationsOf(system: CompiledSystem): EquilibriumEquations {
    if (this.eqSystem !== system || this.eq === null) {
      this.eq = new EquilibriumEquations(system, this);
      this.eqSystem = system;
    }
    return this.eq;
  }
}

/**
 * Equilibria H(y) = F(x, p) = 0, y = (x, p), as an extended system (extended-system.ts): G = F,
 * DG = [J_x | F_p] (the first n rows of the bordered matrix, as borderedMatrix writes them). It uses
 * the workspace's x, jx, fp. numerics/pseudo-arclength.ts adds the point data (EquilibriumBranch).
 */
export class EquilibriumEquations implements ExtendedSystem {
  readonly size: number;
  readonly parameterIndex: readonly number[];
  readonly stateIndex: readonly number[];

  constructor(readonly system: CompiledSystem, protected readonly ws: BorderedWorkspace) {
    const n = system.dimension;
    this.size = n + 1;
    this.parameterIndex = [n];
    this.stateIndex = Array.from({ length: n }, (_, i) => i);
  }

  residual(y: Float64Array, out: Float64Array): void {
    const { ws } = this;
    for (let i = 0; i < ws.n; i++) ws.x[i] = y[i];
    this.system.rates(ws.x, y[ws.n], out);
  }

  jacobian(y: Float64Array, out: Float64Array): void {
    const { ws } = this;
    const n = ws.n;
    const m = n + 1;
    for (let i = 0; i < n; i++) ws.x[i] = y[i];
    const p = y[n];
    this.system.jacobian(ws.x, p, ws.jx);
    this.system.parameterDerivative(ws.x, p, ws.fp);
    for (let i = 0; i < n; i++) {
      for (let k = 0; k < n; k++) out[i * m + k] = ws.jx[i * n + k];
      out[i * m + n] = ws.fp[i];
    }
  }
}

/** Fills ws.a with [J_x | F_p; v^T] at y (row-major) and returns it; also leaves J_x, F_p in ws. */
export function borderedMatrix(system: CompiledSystem, y: Float64Array, v: ArrayLike<number>, ws: BorderedWorkspace): Float64Array {
  const n = ws.n;
  const m = n + 1;
  for (let i = 0; i < n; i++) ws.x[i] = y[i];
  const p = y[n];
  system.jacobian(ws.x, p, ws.jx);
  system.parameterDerivative(ws.x, p, ws.fp);
  const a = ws.a;
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) a[i * m + k] = ws.jx[i * n + k];
    a[i * m + n] = ws.fp[i];
  }
  for (let k = 0; k < m; k++) a[n * m + k] = v[k];
  return a;
}

export function evalRates(system: CompiledSystem, y: Float64Array, ws: BorderedWorkspace): Float64Array {
  for (let i = 0; i < ws.n; i++) ws.x[i] = y[i];
  return system.rates(ws.x, y[ws.n], ws.f);
}

export interface TangentResult {
  readonly ok: boolean;
  /** Unit tangent with t . orient > 0. */
  readonly tangent: Float64Array;
  /** det [DH; t^T] for the returned unit tangent (sign is the branch-point test function). */
  readonly determinant: number;
}

/**
 * Unit tangent of the solution curve H(y) = 0 at y: the solution z of [DH(y); v^T] z = e_{n+1},
 * normalized, oriented so that t . v > 0 (Keller 1977; Allgower & Georg, Numerical Continuation
 * Methods, §2.1). The border v is normally the previous tangent. Also returns det [DH; t^T], via the
 * identity det [DH; w^T] = w . c with c the (null-vector) cofactor column, so det[DH; t^T] =
 * det[DH; v^T] / (t . v) when |t| = 1. The one tangent routine, extendedTangent (extended-system.ts), on EquilibriumEquations.
 */
export function tangentAt(system: CompiledSystem, y: Float64Array, v: ArrayLike<number>, ws: BorderedWorkspace, lu?: DenseLu): TangentResult {
  return extendedTangent(ws.equationsOf(system), y, v, ws.ext, lu);
}

export interface NullSpaceResult {
  /** Right singular vectors of DH(y), sorted by increasing singular value (columns as arrays). */
  readonly vectors: Float64Array[];
  /** Singular values of the zero-padded (n+1) x (n+1) matrix [DH; 0], increasing. */
  readonly singularValues: number[];
}

/**
 * Singular value decomposition of DH(y) = [J_x | F_p] padded with a zero row to a square matrix
 * (ml-matrix SVD). The padded matrix has the same right singular vectors for the nonzero singular
 * values plus one more zero, so the k smallest right singular vectors span the null space of DH
 * when DH has rank n + 1 - k (Golub & Van Loan, §2.4). Used at starting points and branch points.
 */
export function nullSpace(system: CompiledSystem, y: Float64Array, ws: BorderedWorkspace): NullSpaceResult {
  const m = ws.n + 1;
  const a = borderedMatrix(system, y, new Float64Array(m), ws);
  if (!allFinite(a)) return { vectors: [], singularValues: [] };
  const svd = new SingularValueDecomposition(Matrix.from1DArray(m, m, a), { computeLeftSingularVectors: false });
  const s = svd.diagonal;
  const V = svd.rightSingularVectors;
  const order = s.map((_, i) => i).sort((i, k) => s[i] - s[k]);
  return {
    singularValues: order.map((i) => s[i]),
    vectors: order.map((i) => {
      const col = new Float64Array(m);
      for (let r = 0; r < m; r++) col[r] = V.get(r, i);
      return col;
    }),
  };
}

export interface CorrectorOptions {
  /** Converged when |F|_inf <= residualTolerance (default 1e-10) ... */
  residualTolerance: number;
  /** ... and the last Newton step |dy|_inf <= stepTolerance * (1 + |y|_inf) (default 1e-10). */
  stepTolerance: number;
  /** Iteration cap (default 8). */
  maxIterations: number;
  /**
   * Accept after a step this small (relative to 1 + |y|) when the residual test passes (default: equal
   * to stepTolerance, i.e. off). The continuation uses 1e-6; location of special points keeps it off.
   */
  earlyStepTolerance: number;
  /** Fail when the iterate moves farther than this from the guess (default Infinity). */
  maxDisplacement: number;
}

export const defaultCorrectorOptions: CorrectorOptions = {
  residualTolerance: 1e-10,
  stepTolerance: 1e-10,
  maxIterations: 8,
  earlyStepTolerance: 1e-10,
  maxDisplacement: Number.POSITIVE_INFINITY,
};

export interface CorrectorResult {
  readonly converged: boolean;
  readonly iterations: number;
  readonly residual: number;
  readonly y: Float64Array;
  /** LU of [DH; v^T] at the last-but-one iterate (within the step tolerance of y); reusable for the tangent. */
  readonly lu: DenseLu | null;
}

/**
 * Newton's method on the (n+1) x (n+1) extended system
 *   F(x, p) = 0,   v . y = c
 * (the Keller pseudo-arclength corrector when v is the tangent and c = v . (y_prev + h v)),
 * Jacobian [DH; v^T] factorized by DenseLu (ml-matrix's LU algorithm, bit-identical) at every iterate (Keller 1977; Allgower & Georg §2.2):
 * the one corrector, correctExtended (extended-system.ts), on EquilibriumEquations.
 * Never throws; a singular matrix, non-finite values, displacement beyond maxDisplacement or the
 * iteration cap return converged = false.
 */
export function correct(
  system: CompiledSystem,
  guess: ArrayLike<number>,
  v: ArrayLike<number>,
  c: number,
  ws: BorderedWorkspace,
  options: Partial<CorrectorOptions> = {},
): CorrectorResult {
  const o = { ...defaultCorrectorOptions, ...options };
  // Without earlyStepTolerance the early acceptance is off (= stepTolerance); with it, a small residual
  // after a step <= earlyStepTolerance (1 + |y|) is accepted: Newton converges quadratically there, so
  // the error is O(step^2) (Deuflhard, Newton Methods for Nonlinear Problems, §2.1).
  const early = options.earlyStepTolerance === undefined ? o.stepTolerance : o.earlyStepTolerance;
  return correctExtended(ws.equationsOf(system), guess, v, c, {
    residualTolerance: o.residualTolerance,
    stepTolerance: o.stepTolerance,
    maxIterations: o.maxIterations,
    earlyStepTolerance: early,
    maxDisplacement: o.maxDisplacement,
  }, ws.ext);
}
