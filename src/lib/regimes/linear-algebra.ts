import type { CompiledSystem } from '../model/compiled-system';
import type { Equilibrium } from './equilibria-at';
import { eigenvalues } from '../numerics/index';
import { allFinite, normInf } from '../numerics/vector';
import { FlatLu } from '../numerics/flat-lu';

export interface FixedPointResult {
  readonly converged: boolean;
  readonly iterations: number;
  /** Max norm of F at the returned x. */
  readonly residual: number;
  readonly x: Float64Array;
}

/**
 * Newton's method for F(x, p) = 0 at fixed p: the engine's damped Newton (numerics/newton.ts, Dennis &
 * Schnabel §6.3: J_x d = -F, x + lambda d with lambda halved at most 20 times until |F|_2 decreases)
 * with residual tolerance `tolerance` (max norm), its step tolerance 1e-10 (1 + |x|_inf), its state
 * bound 1e8 and iteration cap `maxIterations`, and the allocation-free FlatLu as its linear solver (the
 * regime layer solves at hyperbolic equilibria, where a pivot below n eps |J| means a fold, not a step
 * to take). The same iteration, operation for operation, as `newton(system, x0, p, { residualTolerance,
 * maxIterations, linearSolver: 'flat' })` (tests/lib/regimes/linear-algebra.test.ts compares the two
 * bit for bit), on work arrays kept per dimension: the labeller runs it a few thousand times per
 * labelling, and the engine's version allocates eight typed arrays per call and three per iteration
 * (a tenth of the labelling was garbage collection). Never throws; x0 is not mutated; the returned
 * x is a new array.
 */
export function newtonAtFixedParameter(
  system: CompiledSystem,
  x0: ArrayLike<number>,
  p: number,
  tolerance: number,
  maxIterations: number,
): FixedPointResult {
  const n = system.dimension;
  const w = newtonWork(n);
  const { x, f, j, trial, ft, minusF, lu } = w;
  for (let i = 0; i < n; i++) x[i] = x0[i];
  system.rates(x, p, f);
  if (!allFinite(f)) return fixedPoint(false, 0, Number.NaN, x);
  let fnorm2 = sumSq(f);
  if (normInf(f) <= tolerance && fnorm2 === 0) return fixedPoint(true, 0, 0, x);
  for (let it = 1; it <= maxIterations; it++) {
    system.jacobian(x, p, j);
    for (let i = 0; i < n; i++) minusF[i] = -f[i];
    const d = lu.factor(j).solve(minusF);
    if (d === null) return fixedPoint(false, it, normInf(f), x);
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
    if (!accepted) return fixedPoint(false, it, normInf(f), x);
    x.set(trial);
    f.set(ft);
    fnorm2 = sumSq(f);
    const stepSize = lambda * normInf(d);
    const res = normInf(f);
    if (normInf(x) > NEWTON_STATE_BOUND) return fixedPoint(false, it, res, x);
    if (res <= tolerance && stepSize <= NEWTON_STEP_TOLERANCE * (1 + normInf(x))) return fixedPoint(true, it, res, x);
    if (res === 0) return fixedPoint(true, it, 0, x);
  }
  return fixedPoint(false, maxIterations, normInf(f), x);
}

function fixedPoint(converged: boolean, iterations: number, residual: number, x: Float64Array): FixedPointResult {
  return { converged, iterations, residual, x: Float64Array.from(x) };
}

/** numerics/newton.ts's defaults for the step tolerance and the state bound. */
const NEWTON_STEP_TOLERANCE = 1e-10;
const NEWTON_STATE_BOUND = 1e8;

interface NewtonWork { x: Float64Array; f: Float64Array; j: Float64Array; trial: Float64Array; ft: Float64Array; minusF: Float64Array; lu: FlatLu }
const newtonWorks = new Map<number, NewtonWork>();
function newtonWork(n: number): NewtonWork {
  let w = newtonWorks.get(n);
  if (!w) {
    w = { x: new Float64Array(n), f: new Float64Array(n), j: new Float64Array(n * n), trial: new Float64Array(n), ft: new Float64Array(n), minusF: new Float64Array(n), lu: new FlatLu(n) };
    newtonWorks.set(n, w);
  }
  return w;
}

function sumSq(a: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * a[i];
  return s;
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

/**
 * J_x at an equilibrium, by equilibrium: the spectrum (or its certificate, or the eigenpair update)
 * evaluates it where the equilibrium is made, and the tangent, the progress slopes and the
 * cooperativity check need the same matrix. `p` must be the equilibrium's own parameter value; the
 * matrix must not be modified.
 */
const jacobians = new WeakMap<Equilibrium, Float64Array>();
export function rememberJacobian(e: Equilibrium, jac: Float64Array): void {
  jacobians.set(e, jac);
}
export function jacobianOf(system: CompiledSystem, e: Equilibrium, p: number): Float64Array {
  let jac = jacobians.get(e);
  if (!jac) {
    const n = system.dimension;
    jac = system.jacobian(Float64Array.from(e.x), p, new Float64Array(n * n));
    jacobians.set(e, jac);
  }
  return jac;
}

/**
 * dx/dp = -J_x^{-1} F_p at an equilibrium (implicit function theorem), cached by equilibrium: the
 * tangent predictor of the continuation and the exits' progress slopes need the same vector, and in
 * the bisections the same labelled point is the nearest source of many later ones. `p` must be the
 * equilibrium's own parameter value. Null when J_x is singular.
 */
const tangents = new WeakMap<Equilibrium, Float64Array | null>();
export function tangentOf(system: CompiledSystem, e: Equilibrium, p: number): Float64Array | null {
  let dx = tangents.get(e);
  if (dx === undefined) {
    const n = system.dimension;
    const jac = jacobianOf(system, e, p);
    const fp = system.parameterDerivative(Float64Array.from(e.x), p, new Float64Array(n));
    for (let i = 0; i < n; i++) fp[i] = -fp[i];
    dx = solveLinear(jac, n, fp);
    tangents.set(e, dx);
  }
  return dx;
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
