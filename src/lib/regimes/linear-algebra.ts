import { EigenvalueDecomposition, LuDecomposition, Matrix } from 'ml-matrix';
import type { CompiledSystem } from '../model/compiled-system';

export interface FixedPointResult {
  readonly converged: boolean;
  readonly iterations: number;
  /** Max norm of F at the returned x. */
  readonly residual: number;
  readonly x: Float64Array;
}

/**
 * Newton's method for F(x, p) = 0 at fixed p: x <- x - J_x^{-1} F, J_x solved by LU (ml-matrix).
 * Stops when max|F| <= tolerance, or the step is below 1e-15 (1 + |x|) with max|F| <= 1e3 tolerance;
 * gives up after maxIterations or on a singular Jacobian (converged false). x0 is not mutated.
 * Reference: Deuflhard, Newton Methods for Nonlinear Problems (2004), ch. 1.
 */
export function newtonAtFixedParameter(
  system: CompiledSystem,
  x0: ArrayLike<number>,
  p: number,
  tolerance: number,
  maxIterations: number,
): FixedPointResult {
  const n = system.dimension;
  const x = Float64Array.from(x0 as ArrayLike<number>);
  const f = new Float64Array(n);
  const jac = new Float64Array(n * n);
  let residual = maxAbs(system.rates(x, p, f));
  for (let it = 0; it <= maxIterations; it++) {
    if (!Number.isFinite(residual)) return { converged: false, iterations: it, residual, x };
    if (residual <= tolerance) return { converged: true, iterations: it, residual, x };
    if (it === maxIterations) break;
    system.jacobian(x, p, jac);
    const lu = new LuDecomposition(toMatrix(jac, n));
    if (lu.isSingular()) return { converged: false, iterations: it, residual, x };
    const dx = lu.solve(Matrix.columnVector(Array.from(f)));
    let stepSize = 0;
    for (let i = 0; i < n; i++) {
      const d = dx.get(i, 0);
      x[i] -= d;
      stepSize = Math.max(stepSize, Math.abs(d) / (1 + Math.abs(x[i])));
    }
    residual = maxAbs(system.rates(x, p, f));
    if (stepSize < 1e-15 && residual <= 1e3 * tolerance) return { converged: true, iterations: it + 1, residual, x };
  }
  return { converged: false, iterations: maxIterations, residual, x };
}

export interface Spectrum {
  readonly re: number[];
  readonly im: number[];
  /** Real eigenvector of eigenvalue k when its eigenvalue is real (unit length), else null. */
  vector(k: number): number[] | null;
}

/**
 * Eigenvalues and eigenvectors of a real n x n matrix (row-major), by ml-matrix's
 * EigenvalueDecomposition (Hessenberg reduction and shifted QR, after the EISPACK hqr2 routine).
 */
export function spectrum(jac: Float64Array, n: number): Spectrum {
  const evd = new EigenvalueDecomposition(toMatrix(jac, n));
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  const V = evd.eigenvectorMatrix;
  return {
    re, im,
    vector(k: number) {
      if (im[k] !== 0) return null;
      const v = V.getColumn(k);
      const norm = Math.hypot(...v);
      return norm > 0 ? v.map((c) => c / norm) : null;
    },
  };
}

function toMatrix(a: Float64Array, n: number): Matrix {
  const m = new Matrix(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m.set(i, j, a[i * n + j]);
  return m;
}

function maxAbs(v: Float64Array): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) {
    const a = Math.abs(v[i]);
    if (!(a <= m)) m = a; // NaN propagates
  }
  return m;
}
