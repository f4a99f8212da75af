import type { CompiledSystem } from '../model/compiled-system';
import { eigenvalues, newton } from '../numerics/index';
import { FlatLu } from '../numerics/flat-lu';

export interface FixedPointResult {
  readonly converged: boolean;
  readonly iterations: number;
  /** Max norm of F at the returned x. */
  readonly residual: number;
  readonly x: Float64Array;
}

/**
 * Newton's method for F(x, p) = 0 at fixed p: the engine's damped Newton (numerics/newton.ts) with
 * residual tolerance `tolerance` (max norm) and iteration cap `maxIterations`; its step tolerance
 * (1e-10 relative) is kept, with the allocation-free FlatLu as its linear solver (the regime layer
 * solves at hyperbolic equilibria, where a pivot below n eps |J| means a fold, not a step to take).
 * Never throws; x0 is not mutated.
 */
export function newtonAtFixedParameter(
  system: CompiledSystem,
  x0: ArrayLike<number>,
  p: number,
  tolerance: number,
  maxIterations: number,
): FixedPointResult {
  const r = newton(system, x0, p, { residualTolerance: tolerance, maxIterations, linearSolver: 'flat' });
  return { converged: r.converged, iterations: r.iterations, residual: r.residual, x: r.x };
}

export interface Spectrum {
  readonly re: number[];
  readonly im: number[];
  /** Unit eigenvector of eigenvalue k when it is real, else null. */
  vector(k: number): number[] | null;
}

/**
 * One FlatLu per dimension, reused: the regime layer factorizes a few small matrices per equilibrium
 * and labelled value, and a new workspace each time was a measurable share of its allocations. Safe
 * because every caller factorizes and solves before anything else uses it (one thread, no reentry).
 */
const workspaces = new Map<number, FlatLu>();
export function luWorkspace(n: number): FlatLu {
  let w = workspaces.get(n);
  if (!w) workspaces.set(n, (w = new FlatLu(n)));
  return w;
}

/** Solves J z = b by FlatLu (LU with partial pivoting in one Float64Array); null when singular. */
export function solveLinear(jac: Float64Array, n: number, b: ArrayLike<number>): Float64Array | null {
  return luWorkspace(n).factor(jac).solve(b);
}

/**
 * Eigenvalues of a real n x n matrix (row-major) by the engine's `eigenvalues` (numerics), and on
 * request the eigenvector of a real eigenvalue lambda by inverse iteration with the shift
 * mu = lambda + 1e-8 max(1, |lambda|): (J - mu I) y_{k+1} = y_k, normalized, three times from a fixed
 * start; each pass shrinks the other components by |lambda - mu| / |lambda_j - mu| (Golub & Van Loan,
 * Matrix Computations, 4th ed., §7.6.1). Returns null when the shifted matrix stays singular.
 */
export function spectrum(jac: Float64Array, n: number): Spectrum {
  const s = eigenvalues(jac, n);
  const re = Array.from(s.re);
  const im = Array.from(s.im);
  return {
    re, im,
    vector(k: number) {
      if (im[k] !== 0 || !s.ok) return null;
      return realEigenvector(jac, n, re[k]);
    },
  };
}

/** Unit eigenvector of the real eigenvalue lambda by the shifted inverse iteration of `spectrum` (null when it fails). */
export function realEigenvector(jac: Float64Array, n: number, lambda: number): number[] | null {
  for (const scale of [1e-8, 1e-6]) {
    const mu = lambda + scale * Math.max(1, Math.abs(lambda));
    const shifted = Float64Array.from(jac);
    for (let i = 0; i < n; i++) shifted[i * n + i] -= mu;
    const lu = luWorkspace(n).factor(shifted);
    // Fixed, non-symmetric start so that no component of an eigenvector is missed by symmetry.
    let y: ArrayLike<number> = Array.from({ length: n }, (_, i) => 1 + 0.1 * Math.sin(i + 1));
    let ok = true;
    for (let pass = 0; pass < 3; pass++) {
      const z = lu.solve(y);
      if (z === null) { ok = false; break; }
      let norm = 0;
      for (let i = 0; i < n; i++) norm += z[i] * z[i];
      norm = Math.sqrt(norm);
      if (!(norm > 0) || !Number.isFinite(norm)) { ok = false; break; }
      for (let i = 0; i < n; i++) z[i] /= norm;
      y = z;
    }
    if (ok) return Array.from(y);
  }
  return null;
}
