/**
 * The Bouchet–Reygner prefactor of the escape rate over one index-1 saddle of a NON-gradient drift
 * (F. Bouchet & J. Reygner, "Generalisation of the Eyring–Kramers transition rate formula to
 * irreversible diffusion processes", Ann. Henri Poincaré 17, 2016; formula as recalled here, from
 * memory, and checked in tests/lib/noise/bouchet-reygner.test.ts against the gradient limit and an
 * independent integration where the quasi-potential is known in closed form).
 *
 * Convention of the paper: dY = b(Y) dt + sqrt(2 eps) dW. Our noise is `level dW` in the scaled
 * coordinates y = x / w (gmam.ts, scaledField), so eps = level^2 / 2. The quasi-potential V of the
 * paper solves the Hamilton–Jacobi equation b . grad V + |grad V|^2 = 0 and relates to our barrier by
 * barrier = 2 (V(z) - V(x)) (docs/noise.md). Write b = -grad V + l (so l . grad V = 0). For an
 * attractor x*, an index-1 saddle z* and the instanton phi (the minimum-action path x* -> z*, which in
 * time solves phi' = b + 2 grad V = grad V + l), the mean transition time is
 *   E[tau] = 2 pi / mu * sqrt(|det Q(z*)| / det Q(x*)) * exp(int_-inf^inf div l(phi(t)) dt) * exp((V(z*) - V(x*)) / eps),
 * mu the positive eigenvalue of db/dy(z*) and Q = Hess V. So the rate k = C exp(-barrier / level^2) has
 *   C = mu / (2 pi) * sqrt(det Q(x*) / |det Q(z*)|) * exp(-int div l dt).
 * With l = 0 this is the Eyring–Kramers prefactor of prefactor.ts (Q = Hess U, mu = |lambda_1(Hess U(z*))|).
 *
 * How each piece is computed (derivations in the comments below):
 * - Q at both ends: linearizing the Hamilton–Jacobi equation at a fixed point with B = db/dy there
 *   gives Q B + B^T Q + 2 Q^2 = 0, i.e. S = Q^-1 solves the Lyapunov equation B S + S B^T + 2 I = 0
 *   (unique when no two eigenvalues of B sum to zero), solved in Kronecker form.
 * - Along the path: p = grad V and the time speed follow from the path alone. With t the unit
 *   tangent, phi' = lambda t, and H = b . p + |p|^2 = 0 with phi' = b + 2 p gives lambda = |b| and
 *   p = (|b| t - b) / 2 (the same lambda as gmam's). Differentiating the Hamilton–Jacobi identity twice
 *   and using d/dt = (b + 2 p) . grad (the third derivatives of V cancel) gives the Riccati equation
 *   dQ/dt = -(sum_k p_k Hess b_k + B^T Q + Q B + 2 Q^2), integrated in arclength (dt = ds / |b|) from
 *   Q(x*) by Heun's method; the exact relation Q phi' = dp/dt = -B^T p (Hamilton's equation) fixes Q's
 *   action on the tangent, and is imposed after every step, which also removes the one mode of the
 *   Riccati flow that grows on the approach to z*. Hess b_k p_k by central differences of the Jacobian.
 * - div l = div b + tr Q; it vanishes at both fixed points (trace of the Lyapunov equation times Q:
 *   tr B + tr Q = 0), so its arclength integrand (tr B + tr Q) / |b| stays bounded; trapezoidal rule.
 * Starting the carried Hessian one node away from x* costs an O(h) error in the integral; the
 * integral is extrapolated from the path, every second and every fourth node (Richardson), so its
 * error is O(h^3) on top of the path's own (gmam, O(h^2)): about 3e-4 with gmam's default 200
 * segments on the test drifts, 5e-6 with 400.
 */
import type { DriftField } from './gmam';
import { FlatLu } from '../numerics/flat-lu';
import { eigenvalues } from '../numerics/eigenvalues';

export interface BouchetReygnerOptions {
  /** Largest dimension handled (the Lyapunov system has n^2 unknowns). Default 12. */
  readonly maxDimension: number;
  /**
   * The Hessian carried along the path must arrive within this relative distance (Frobenius) of
   * the saddle's own Q(z*); farther means the quasi-potential is not smooth along the path (a
   * caustic) or the path is too coarse. Default 0.05 (common practice, no source).
   */
  readonly arrivalTolerance: number;
  /**
   * Largest accepted estimate of the error left in int div l dt (the difference between the two-
   * and three-level Richardson values): exp of it is the relative error of C. Default 0.01.
   */
  readonly integralTolerance: number;
}

export const defaultBouchetReygnerOptions: BouchetReygnerOptions = { maxDimension: 12, arrivalTolerance: 0.05, integralTolerance: 0.01 };

export interface BouchetReygnerResult {
  /** C in k = C exp(-barrier / level^2); NaN when `ok` is false. */
  readonly prefactor: number;
  readonly ok: boolean;
  readonly reason?: string;
  /** mu: the positive eigenvalue of db/dy at the saddle. */
  readonly unstableEigenvalue: number;
  /** int div l dt along the path (0 for a gradient drift). */
  readonly divergenceIntegral: number;
  /** sqrt(det Q(x*) / |det Q(z*)|). */
  readonly hessianRatio: number;
  /** Relative Frobenius distance between the carried Hessian near z* and Q(z*). */
  readonly arrivalMismatch: number;
  /** Estimated error left in divergenceIntegral (NaN when the path is too short to estimate it). */
  readonly integralError?: number;
}

/**
 * C for the path `path` (scaled coordinates, from the stable state to the saddle, as gmam returns
 * it: equidistant in arclength, the ends on the fixed points). Never throws; `ok` false with a
 * reason when a condition of the formula fails (an end not hyperbolic, Q(x*) not positive definite,
 * Q(z*) without exactly one negative eigenvalue, the saddle without exactly one real unstable
 * eigenvalue, a Lyapunov system that is singular, the carried Hessian blowing up or missing Q(z*)).
 */
export function bouchetReygnerPrefactor(field: DriftField, path: readonly ArrayLike<number>[], options?: Partial<BouchetReygnerOptions>): BouchetReygnerResult {
  const o = { ...defaultBouchetReygnerOptions, ...(options ?? {}) };
  const n = field.dimension;
  const fail = (reason: string, extra: Partial<BouchetReygnerResult> = {}): BouchetReygnerResult => ({
    prefactor: Number.NaN, ok: false, reason, unstableEigenvalue: Number.NaN, divergenceIntegral: Number.NaN, hessianRatio: Number.NaN, arrivalMismatch: Number.NaN, ...extra,
  });
  if (n > o.maxDimension) return fail(`the network has ${n} variables; the prefactor is computed up to ${o.maxDimension}`);
  const m = path.length - 1;
  if (m < 4) return fail('the minimum-action path has fewer than 5 points');
  const pts = path.map((q) => Float64Array.from(q));
  const jac = (y: Float64Array) => field.jacobian(y, new Float64Array(n * n));

  const bStart = jac(pts[0]);
  const bEnd = jac(pts[m]);
  const mu = unstableEigenvalue(bEnd, n);
  if (mu === null) return fail('the saddle does not have exactly one real unstable eigenvalue');
  const sStart = lyapunov(bStart, n);
  const sEnd = lyapunov(bEnd, n);
  if (!sStart || !sEnd) return fail('the Lyapunov equation at the state or the saddle is singular (two eigenvalues of the Jacobian sum to zero)', { unstableEigenvalue: mu });
  const qStart = inverse(sStart, n);
  const qEnd = inverse(sEnd, n);
  if (!qStart || !qEnd) return fail('the Hessian of the quasi-potential at the state or the saddle is singular', { unstableEigenvalue: mu });
  const negStart = negativeEigenvalues(qStart, n);
  const negEnd = negativeEigenvalues(qEnd, n);
  if (negStart !== 0) return fail('the Hessian of the quasi-potential at the state is not positive definite', { unstableEigenvalue: mu });
  if (negEnd !== 1) return fail(`the Hessian of the quasi-potential at the saddle has ${negEnd} negative eigenvalues, not one`, { unstableEigenvalue: mu });
  const detStart = new FlatLu(n).factor(qStart).determinant;
  const detEnd = new FlatLu(n).factor(qEnd).determinant;
  const hessianRatio = Math.sqrt(detStart / Math.abs(detEnd));
  if (!Number.isFinite(hessianRatio)) return fail('the Hessian determinants are not finite', { unstableEigenvalue: mu });

  // The carried Hessian starts at node 1 with Q(x*), an O(h) error there which, divided by the
  // O(h) speed, makes the integral's error O(h) (measured: it halves with h). Richardson
  // extrapolation over the path and every other node of it removes that term (error O(h^2)).
  // With every fourth node as well, the O(h^2) term goes too: I = (8 I_h - 6 I_2h + I_4h) / 3
  // (Richardson extrapolation for an error c1 h + c2 h^2; common practice, no source).
  const fine = carry(field, pts, qStart);
  if (!fine.ok) return fail(fine.reason, { unstableEigenvalue: mu, hessianRatio });
  const every = (j: number) => (m % j === 0 && m / j >= 8 ? carry(field, pts.filter((_, k) => k % j === 0), qStart) : null);
  const half = every(2);
  const quarter = every(4);
  if ((half && !half.ok) || (quarter && !quarter.ok)) return fail('the Hessian carried along a coarser copy of the path blew up', { unstableEigenvalue: mu, hessianRatio });
  let integral = fine.integral;
  // The difference between the two- and three-level extrapolations estimates the error left.
  let settle = Number.NaN;
  if (half?.ok && quarter?.ok) {
    integral = (8 * fine.integral - 6 * half.integral + quarter.integral) / 3;
    settle = Math.abs(integral - (2 * fine.integral - half.integral));
  } else if (half?.ok) integral = 2 * fine.integral - half.integral;
  const q = fine.q;
  let diff = 0;
  let size = 0;
  for (let i = 0; i < n * n; i++) { diff += (q[i] - qEnd[i]) ** 2; size += qEnd[i] ** 2; }
  const arrivalMismatch = Math.sqrt(diff / size);
  const base = { unstableEigenvalue: mu, divergenceIntegral: integral, hessianRatio, arrivalMismatch, integralError: settle };
  if (!(settle <= o.integralTolerance)) {
    return fail(Number.isNaN(settle)
      ? 'the minimum-action path is too short to check the integral along it (fewer than 32 segments or a count not divisible by 4)'
      : `the integral along the minimum-action path does not settle with its resolution (estimated error ${settle.toExponential(2)}; a path spiralling out of the state is one cause)`, base);
  }
  if (!(arrivalMismatch <= o.arrivalTolerance)) {
    return fail(`the Hessian carried along the minimum-action path arrives ${arrivalMismatch.toExponential(2)} (relative) away from the saddle's; the path is too coarse or the quasi-potential is not smooth along it`, base);
  }
  return { prefactor: (mu / (2 * Math.PI)) * hessianRatio * Math.exp(-integral), ok: true, ...base };
}

type Carried = { ok: true; integral: number; q: Float64Array } | { ok: false; reason: string };

/**
 * The Riccati equation along the path and the integral of div l (see the file head), from node 1
 * with Q(x*) to node m - 1; the end pieces [0, 1] and [m - 1, m] take the bounded integrand of
 * their inner node.
 */
function carry(field: DriftField, pts: readonly Float64Array[], qStart: Float64Array): Carried {
  const n = field.dimension;
  const m = pts.length - 1;
  const jac = (y: Float64Array) => field.jacobian(y, new Float64Array(n * n));
  // Path data per node: drift, speed lambda = |b|, unit tangent, momentum p = (|b| t - b) / 2.
  const b: Float64Array[] = [];
  const speed: number[] = [];
  const tangent: Float64Array[] = [];
  const momentum: Float64Array[] = [];
  const step: number[] = [];
  for (let k = 0; k < m; k++) step.push(dist(pts[k], pts[k + 1]));
  for (let k = 0; k <= m; k++) {
    const bk = field.drift(pts[k], new Float64Array(n));
    const t = new Float64Array(n);
    const lo = pts[Math.max(0, k - 1)];
    const hi = pts[Math.min(m, k + 1)];
    let norm = 0;
    for (let i = 0; i < n; i++) { t[i] = hi[i] - lo[i]; norm += t[i] * t[i]; }
    norm = Math.sqrt(norm);
    for (let i = 0; i < n; i++) t[i] /= norm;
    const lam = Math.hypot(...bk);
    const pk = new Float64Array(n);
    for (let i = 0; i < n; i++) pk[i] = 0.5 * (lam * t[i] - bk[i]);
    b.push(bk); speed.push(lam); tangent.push(t); momentum.push(pk);
  }

  // dQ/ds at node k: -(G + B^T Q + Q B + 2 Q^2) / |b|, with G = sum_k p_k Hess b_k.
  const bAt = pts.map((y) => jac(y));
  const gAt = pts.map((y, k) => hessianAlong(field, y, momentum[k]));
  const rhs = (k: number, q: Float64Array): Float64Array => {
    const out = new Float64Array(n * n);
    const bk = bAt[k];
    const g = gAt[k];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      let s = g[i * n + j];
      for (let l = 0; l < n; l++) s += bk[l * n + i] * q[l * n + j] + q[i * n + l] * bk[l * n + j] + 2 * q[i * n + l] * q[l * n + j];
      out[i * n + j] = -s / speed[k];
    }
    return out;
  };
  // Q phi' = -B^T p: Q t = w := -B^T p / |b| on the tangent, imposed keeping Q symmetric.
  const impose = (k: number, q: Float64Array): Float64Array => {
    const t = tangent[k];
    const w = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let l = 0; l < n; l++) s -= bAt[k][l * n + i] * momentum[k][l];
      w[i] = s / speed[k];
    }
    // Q' = P Q P + w t^T + t w^T - (t . w) t t^T, P = I - t t^T: then Q' t = w and Q' = Q'^T.
    const qt = new Float64Array(n);
    for (let i = 0; i < n; i++) { let s = 0; for (let l = 0; l < n; l++) s += q[i * n + l] * t[l]; qt[i] = s; }
    let tqt = 0;
    for (let i = 0; i < n; i++) tqt += t[i] * qt[i];
    let tw = 0;
    for (let i = 0; i < n; i++) tw += t[i] * w[i];
    const out = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const pqp = q[i * n + j] - t[i] * qt[j] - qt[i] * t[j] + t[i] * t[j] * tqt;
      out[i * n + j] = pqp + w[i] * t[j] + t[i] * w[j] - tw * t[i] * t[j];
    }
    return out;
  };
  const integrand = (k: number, q: Float64Array): number => {
    let tr = 0;
    for (let i = 0; i < n; i++) tr += bAt[k][i * n + i] + q[i * n + i];
    return tr / speed[k];
  };

  let q = impose(1, qStart);
  let integral = integrand(1, q) * step[0];
  let prev = integrand(1, q);
  for (let k = 1; k + 1 <= m - 1; k++) {
    const h = step[k];
    const f0 = rhs(k, q);
    const pred = new Float64Array(n * n);
    for (let i = 0; i < n * n; i++) pred[i] = q[i] + h * f0[i];
    const f1 = rhs(k + 1, pred);
    const next = new Float64Array(n * n);
    for (let i = 0; i < n * n; i++) next[i] = q[i] + 0.5 * h * (f0[i] + f1[i]);
    q = impose(k + 1, next);
    if (!q.every(Number.isFinite)) return { ok: false, reason: 'the Hessian carried along the minimum-action path blew up (the quasi-potential is not smooth along it)' };
    const cur = integrand(k + 1, q);
    integral += 0.5 * h * (prev + cur);
    prev = cur;
  }
  integral += prev * step[m - 1];
  return { ok: true, integral, q };
}

/**
 * S with B S + S B^T + 2 I = 0, from the Kronecker form (I (x) B + B (x) I) vec(S) = -2 vec(I)
 * (Horn & Johnson, Topics in Matrix Analysis, §4.4), symmetrized; null when singular.
 */
export function lyapunov(bm: Float64Array, n: number): Float64Array | null {
  const size = n * n;
  const k = new Float64Array(size * size);
  // Row (i, j) of the equation sum_l B_il S_lj + S_il B_jl = -2 delta_ij; unknown S_lj at l * n + j.
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    const row = (i * n + j) * size;
    for (let l = 0; l < n; l++) {
      k[row + l * n + j] += bm[i * n + l];
      k[row + i * n + l] += bm[j * n + l];
    }
  }
  const rhs = new Float64Array(size);
  for (let i = 0; i < n; i++) rhs[i * n + i] = -2;
  const lu = new FlatLu(size).factor(k);
  const s = lu.solve(rhs);
  if (!s) return null;
  return symmetrize(s, n);
}

function inverse(a: Float64Array, n: number): Float64Array | null {
  const lu = new FlatLu(n).factor(a);
  if (lu.singular) return null;
  const out = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const e = new Float64Array(n);
    e[j] = 1;
    const col = lu.solve(e);
    if (!col) return null;
    for (let i = 0; i < n; i++) out[i * n + j] = col[i];
  }
  return symmetrize(out, n);
}

/** Number of negative eigenvalues of a symmetric matrix (its spectrum is real). */
function negativeEigenvalues(a: Float64Array, n: number): number {
  const s = eigenvalues(Float64Array.from(a), n);
  if (!s.ok) return -1;
  let k = 0;
  for (let i = 0; i < n; i++) if (s.re[i] < 0) k++;
  return k;
}

/** The one positive real eigenvalue of the Jacobian, or null when there is not exactly one eigenvalue with Re > 0, or it is not real. */
function unstableEigenvalue(bm: Float64Array, n: number): number | null {
  const s = eigenvalues(Float64Array.from(bm), n);
  if (!s.ok) return null;
  let found: number | null = null;
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (s.re[i] > 0) {
      count++;
      if (s.im[i] === 0) found = s.re[i];
    }
  }
  return count === 1 ? found : null;
}

/**
 * G = sum_k p_k Hess b_k at y: G_ij = d/dy_j (sum_k p_k d b_k / d y_i), by central differences of
 * the Jacobian with step 1e-5 (1 + |y_j|) (error O(step^2); common practice, no source), symmetrized.
 */
function hessianAlong(field: DriftField, y: Float64Array, p: Float64Array): Float64Array {
  const n = field.dimension;
  const out = new Float64Array(n * n);
  const yp = Float64Array.from(y);
  const jp = new Float64Array(n * n);
  const jm = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const h = 1e-5 * (1 + Math.abs(y[j]));
    yp[j] = y[j] + h;
    field.jacobian(yp, jp);
    yp[j] = y[j] - h;
    field.jacobian(yp, jm);
    yp[j] = y[j];
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += p[k] * (jp[k * n + i] - jm[k * n + i]);
      out[i * n + j] = s / (2 * h);
    }
  }
  return symmetrize(out, n);
}

/** (A + A^T) / 2 in place; returns A. */
function symmetrize(a: Float64Array, n: number): Float64Array {
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
    const v = 0.5 * (a[i * n + j] + a[j * n + i]);
    a[i * n + j] = v;
    a[j * n + i] = v;
  }
  return a;
}

function dist(a: Float64Array, c: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - c[i]) ** 2;
  return Math.sqrt(s);
}
