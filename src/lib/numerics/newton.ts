import type { CompiledSystem } from '../model/compiled-system.js';
import { DenseLu } from './dense-lu.js';
import { FlatLu } from './flat-lu.js';
import { allFinite, normInf } from './vector.js';

export interface NewtonOptions {
  /** Converged when |F|_inf <= residualTolerance (default 1e-11). */
  residualTolerance: number;
  /** ... and the last step |dx|_inf <= stepTolerance * (1 + |x|_inf) (default 1e-10). */
  stepTolerance: number;
  /** Iteration cap (default 60). */
  maxIterations: number;
  /** Give up when |x|_inf exceeds this (default 1e8). */
  stateBound: number;
  /**
   * Linear solver for J_x d = -F: 'dense' (DenseLu: ml-matrix's LuDecomposition algorithm on flat arrays, bit-identical; the default; the
   * continuation's Newton corrections and pitchfork locations are checked with it) or 'flat' (FlatLu,
   * one Float64Array and no copies, about 15x cheaper at small n; a pivot below n eps |J|_inf counts
   * as singular, so Newton stops there instead of taking a huge step).
   */
  linearSolver: 'dense' | 'flat';
}

export const defaultNewtonOptions: NewtonOptions = {
  residualTolerance: 1e-11,
  stepTolerance: 1e-10,
  maxIterations: 60,
  stateBound: 1e8,
  linearSolver: 'dense',
};

export interface NewtonResult {
  readonly converged: boolean;
  readonly iterations: number;
  /** |F(x, p)|_inf at the returned x. */
  readonly residual: number;
  readonly x: Float64Array;
  /** Why it stopped when not converged. */
  readonly reason?: 'singular-jacobian' | 'max-iterations' | 'diverged' | 'non-finite';
}

/**
 * Damped Newton's method for F(x, p) = 0 at a fixed parameter p.
 * Step: J_x(x_k) d = -F(x_k), x_{k+1} = x_k + lambda d, with lambda halved (at most 20 times) until
 * |F|_2 decreases (Armijo-type backtracking; Dennis & Schnabel, Numerical Methods for Unconstrained
 * Optimization and Nonlinear Equations, §6.3). Linear solves by LU with partial pivoting (options.linearSolver).
 * Never throws: a singular Jacobian, divergence or the iteration cap end with converged = false.
 */
export function newton(
  system: CompiledSystem,
  x0: ArrayLike<number>,
  p: number,
  options: Partial<NewtonOptions> = {},
): NewtonResult {
  const o = { ...defaultNewtonOptions, ...options };
  const n = system.dimension;
  let x = Float64Array.from(x0);
  const f = new Float64Array(n);
  const j = new Float64Array(n * n);
  const trial = new Float64Array(n);
  const ft = new Float64Array(n);
  const flat = o.linearSolver === 'flat' ? new FlatLu(n) : null;
  system.rates(x, p, f);
  if (!allFinite(f)) return { converged: false, iterations: 0, residual: Number.NaN, x, reason: 'non-finite' };
  let fnorm2 = sumSq(f);
  if (normInf(f) <= o.residualTolerance && fnorm2 === 0) return { converged: true, iterations: 0, residual: 0, x };
  for (let it = 1; it <= o.maxIterations; it++) {
    system.jacobian(x, p, j);
    const minusF = new Float64Array(n);
    for (let i = 0; i < n; i++) minusF[i] = -f[i];
    const d = flat ? flat.factor(j).solve(minusF) : new DenseLu(j, n).solve(minusF);
    if (d === null) return { converged: false, iterations: it, residual: normInf(f), x, reason: 'singular-jacobian' };
    let lambda = 1;
    let accepted = false;
    for (let back = 0; back < 20; back++) {
      for (let i = 0; i < n; i++) trial[i] = x[i] + lambda * d[i];
      system.rates(trial, p, ft);
      const t2 = sumSq(ft);
      if (Number.isFinite(t2) && (t2 < fnorm2 || t2 === 0 || back === 19)) {
        accepted = Number.isFinite(t2);
        break;
      }
      lambda *= 0.5;
    }
    if (!accepted) return { converged: false, iterations: it, residual: normInf(f), x, reason: 'non-finite' };
    x = Float64Array.from(trial);
    f.set(ft);
    fnorm2 = sumSq(f);
    const stepSize = lambda * normInf(d);
    const res = normInf(f);
    if (normInf(x) > o.stateBound) return { converged: false, iterations: it, residual: res, x, reason: 'diverged' };
    if (res <= o.residualTolerance && stepSize <= o.stepTolerance * (1 + normInf(x))) {
      return { converged: true, iterations: it, residual: res, x };
    }
    if (res === 0) return { converged: true, iterations: it, residual: 0, x };
  }
  return { converged: false, iterations: o.maxIterations, residual: normInf(f), x, reason: 'max-iterations' };
}

function sumSq(a: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * a[i];
  return s;
}
