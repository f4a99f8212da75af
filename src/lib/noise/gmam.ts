import type { CompiledSystem } from '../model/compiled-system';
import type { CancelSignal } from './types';

/** A drift b(y) with its Jacobian, in coordinates where the noise is isotropic. */
export interface DriftField {
  readonly dimension: number;
  /** out[i] = b_i(y). Returns out. */
  drift(y: Float64Array, out: Float64Array): Float64Array;
  /** out[i * n + j] = d b_i / d y_j, row-major. Returns out. */
  jacobian(y: Float64Array, out: Float64Array): Float64Array;
}

/**
 * The noise-scaled drift of a compiled system at parameter p: y = D^-1 x with D = diag(weights),
 * b(y) = D^-1 F(D y; p), db/dy = D^-1 J_x D (docs/noise.md, scaling convention).
 */
export function scaledField(system: CompiledSystem, p: number, weights: Float64Array): DriftField {
  const n = system.dimension;
  const x = new Float64Array(n);
  return {
    dimension: n,
    drift(y, out) {
      for (let i = 0; i < n; i++) x[i] = y[i] * weights[i];
      system.rates(x, p, out);
      for (let i = 0; i < n; i++) out[i] /= weights[i];
      return out;
    },
    jacobian(y, out) {
      for (let i = 0; i < n; i++) x[i] = y[i] * weights[i];
      system.jacobian(x, p, out);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] *= weights[j] / weights[i];
      return out;
    },
  };
}

/** Settings of the geometric minimum action method. */
export interface GmamOptions {
  /** Path points including both ends (N + 1 of them for N segments). Default 101. */
  readonly points: number;
  /** Iteration cap at each resolution. Default 20000. */
  readonly maxIterations: number;
  /**
   * Converged when the relative change of the action over the last `window` iterations is at most
   * this. Default 1e-11 (the action then sits far below its discretization error, which is
   * measured separately by the refinement).
   */
  readonly tolerance: number;
  /** Iterations between convergence checks. Default 50. */
  readonly window: number;
  /**
   * Pseudo-time step as a fraction of 1 / max_i |db/dy(phi_i)|_F^2 (the stability limit of the
   * explicit part, whose linearization is -(db/dy)^T (db/dy)). Default 0.5.
   */
  readonly stepFactor: number;
  /** After converging with `points`, interpolate to 2 (points - 1) + 1 and converge again; report both. Default true. */
  readonly refine: boolean;
  /** Starting path (scaled coordinates) from start to end; default the straight segment. Not mutated. */
  readonly initialPath?: readonly ArrayLike<number>[];
  /** Checked every window; a cancelled run returns what it has with converged false. */
  readonly signal?: CancelSignal;
}

export const defaultGmamOptions: GmamOptions = {
  points: 101, maxIterations: 20_000, tolerance: 1e-11, window: 50, stepFactor: 0.5, refine: true,
};

export interface GmamResult {
  /** The path from start to end, equidistant in arclength, scaled coordinates. */
  readonly path: Float64Array[];
  /**
   * Geometric action S = int (|b||phi'| - b . phi') d alpha of the final path (midpoint rule per
   * segment); with refine, the Richardson extrapolation (4 S_2N - S_N) / 3 of the two resolutions.
   */
  readonly action: number;
  /** Action at the finest resolution, without extrapolation. */
  readonly actionFine: number;
  /** Action at the first resolution (NaN without refine). */
  readonly actionCoarse: number;
  /** |S_2N - S_N| / |S_2N|: the measured change when N doubles (NaN without refine). */
  readonly discretizationChange: number;
  readonly converged: boolean;
  /** Iterations over both resolutions. */
  readonly iterations: number;
  /** Last relative change of the action over one window. */
  readonly residual: number;
  /** Segments of the final path. */
  readonly segments: number;
  readonly cancelled: boolean;
}

/**
 * Geometric minimum action method (Heymann & Vanden-Eijnden, Comm. Pure Appl. Math. 61 (2008)
 * 1052–1117; the simplified semi-implicit update of Vanden-Eijnden & Heymann, J. Chem. Phys. 128
 * (2008) 061103) for dy = b(y) dt + sigma dW with isotropic noise. It minimizes the geometric action
 *   S[phi] = int_0^1 (|b(phi)| |phi'| - b(phi) . phi') d alpha
 * over curves from `start` to `end` (fixed ends); S is the infimum over T of the Freidlin–Wentzell
 * action 1/2 int_0^T |phi' - b|^2 dt, i.e. the quasi-potential of `end` relative to `start` when
 * start is a stable equilibrium. Descent in pseudo-time tau on the Euler–Lagrange equation
 *   phi_tau = lambda^2 phi'' - lambda (B - B^T) phi' - B^T b,   lambda = |b| / |phi'|, B = db/dy,
 * with lambda^2 phi'' implicit (one tridiagonal solve per component) and the rest explicit; the
 * tangential term lambda lambda' phi' is dropped because the path is reparametrized to equal
 * arclength (linear interpolation) after every step. Derivatives along the path: central
 * differences. Convergence: relative change of the action over `window` iterations below
 * `tolerance`. The discretization error of the action is O(N^-2) (midpoint rule, measured in
 * docs/noise.md); with `refine` the converged path is doubled and converged again, the change is
 * reported and the two values are Richardson-extrapolated. Never throws for a bad field: non-finite
 * values end the run with converged false.
 */
export function gmam(field: DriftField, start: ArrayLike<number>, end: ArrayLike<number>, options?: Partial<GmamOptions>): GmamResult {
  const o = { ...defaultGmamOptions, ...(options ?? {}) };
  const segments0 = Math.max(4, Math.floor(o.points) - 1);
  let path: Float64Array[] = o.initialPath ? resample(o.initialPath.map((q) => Float64Array.from(q)), segments0) : straight(start, end, segments0, field.dimension);
  path[0] = Float64Array.from(start);
  path[segments0] = Float64Array.from(end);
  const first = descend(field, path, o);
  if (!o.refine || !first.ok) {
    return { path: first.path, action: first.action, actionFine: first.action, actionCoarse: Number.NaN, discretizationChange: Number.NaN,
      converged: first.converged, iterations: first.iterations, residual: first.residual, segments: segments0, cancelled: first.cancelled };
  }
  path = resample(first.path, 2 * segments0);
  const second = descend(field, path, o);
  const change = Math.abs(second.action - first.action) / Math.abs(second.action);
  return {
    path: second.path,
    action: (4 * second.action - first.action) / 3,
    actionFine: second.action,
    actionCoarse: first.action,
    discretizationChange: change,
    converged: first.converged && second.converged,
    iterations: first.iterations + second.iterations,
    residual: second.residual,
    segments: 2 * segments0,
    cancelled: second.cancelled,
  };
}

/**
 * Geometric action of a polyline: on every straight segment [y_j, y_j+1] the integrand
 * |b| |dy| - b . dy is integrated by Simpson's rule (b at both ends and the midpoint), so the value
 * is the action of the polyline itself up to O(h^4) per unit length.
 */
export function geometricAction(field: DriftField, path: readonly Float64Array[]): number {
  const n = field.dimension;
  const mid = new Float64Array(n);
  const bl = new Float64Array(n);
  const bm = new Float64Array(n);
  const br = new Float64Array(n);
  field.drift(path[0], bl);
  let s = 0;
  for (let j = 0; j + 1 < path.length; j++) {
    for (let i = 0; i < n; i++) mid[i] = 0.5 * (path[j][i] + path[j + 1][i]);
    field.drift(mid, bm);
    field.drift(path[j + 1], br);
    let len = 0;
    let dl = 0; let dm = 0; let dr = 0;
    let nl = 0; let nm = 0; let nr = 0;
    for (let i = 0; i < n; i++) {
      const d = path[j + 1][i] - path[j][i];
      len += d * d;
      dl += bl[i] * d; dm += bm[i] * d; dr += br[i] * d;
      nl += bl[i] * bl[i]; nm += bm[i] * bm[i]; nr += br[i] * br[i];
    }
    const l = Math.sqrt(len);
    s += ((Math.sqrt(nl) * l - dl) + 4 * (Math.sqrt(nm) * l - dm) + (Math.sqrt(nr) * l - dr)) / 6;
    bl.set(br);
  }
  return s;
}

interface Descent { path: Float64Array[]; action: number; converged: boolean; iterations: number; residual: number; ok: boolean; cancelled: boolean }

function descend(field: DriftField, initial: Float64Array[], o: GmamOptions): Descent {
  const n = field.dimension;
  const N = initial.length - 1;
  const h = 1 / N;
  let path: Float64Array[] = initial.map((q) => Float64Array.from(q));
  const b = Array.from({ length: N + 1 }, () => new Float64Array(n));
  const jac = new Float64Array(n * n);
  const rhs = Array.from({ length: N + 1 }, () => new Float64Array(n));
  const coef = new Float64Array(N + 1);
  const cp = new Float64Array(N + 1);
  const dp = new Float64Array(N + 1);
  const dphi = new Float64Array(n);
  let last = geometricAction(field, path);
  let residual = Infinity;
  let iterations = 0;
  let cancelled = false;
  while (iterations < o.maxIterations) {
    // Explicit part and the step size from the largest Jacobian on the path.
    let total = 0;
    for (let j = 0; j < N; j++) total += dist(path[j], path[j + 1]);
    let jmax = 0;
    for (let k = 1; k < N; k++) {
      const y = path[k];
      field.drift(y, b[k]);
      field.jacobian(y, jac);
      let nb = 0;
      let np = 0;
      for (let i = 0; i < n; i++) {
        dphi[i] = (path[k + 1][i] - path[k - 1][i]) / (2 * h);
        nb += b[k][i] * b[k][i];
        np += dphi[i] * dphi[i];
      }
      const lambda = np > 0 ? Math.sqrt(nb / np) : 0;
      let fro = 0;
      for (let i = 0; i < n; i++) {
        let skew = 0;
        let btb = 0;
        for (let j = 0; j < n; j++) {
          const bij = jac[i * n + j];
          const bji = jac[j * n + i];
          fro += bij * bij;
          skew += (bij - bji) * dphi[j];
          btb += bji * b[k][j];
        }
        rhs[k][i] = -lambda * skew - btb;
      }
      // Keep only the part normal to the path: the tangential part only moves points along the
      // curve, which the reparametrization undoes, but through linear interpolation it would cut
      // corners and bias the fixed point (measured: 0.6 % on the linear test drift).
      let along = 0;
      for (let i = 0; i < n; i++) along += rhs[k][i] * dphi[i];
      if (np > 0) for (let i = 0; i < n; i++) rhs[k][i] -= (along / np) * dphi[i];
      coef[k] = lambda * lambda;
      jmax = Math.max(jmax, fro);
    }
    if (!Number.isFinite(jmax) || !Number.isFinite(total)) {
      return { path, action: Number.NaN, converged: false, iterations, residual, ok: false, cancelled };
    }
    const dtau = o.stepFactor / Math.max(jmax, 1e-12);
    // Implicit lambda^2 phi'' (Thomas algorithm per component, fixed ends).
    const next = path.map((q) => Float64Array.from(q));
    for (let i = 0; i < n; i++) {
      // Unknowns k = 1..N-1: -c phi_{k-1} + (1 + 2c) phi_k - c phi_{k+1} = phi_k + dtau rhs_k.
      for (let k = 1; k < N; k++) {
        const c = (dtau * coef[k]) / (h * h);
        let d = path[k][i] + dtau * rhs[k][i];
        if (k === 1) d += c * path[0][i];
        if (k === N - 1) d += c * path[N][i];
        const lower = k === 1 ? 0 : -c;
        const diag = 1 + 2 * c;
        const upper = -c;
        const m = diag - lower * (k === 1 ? 0 : cp[k - 1]);
        cp[k] = upper / m;
        dp[k] = (d - lower * (k === 1 ? 0 : dp[k - 1])) / m;
      }
      next[N - 1][i] = dp[N - 1];
      for (let k = N - 2; k >= 1; k--) next[k][i] = dp[k] - cp[k] * next[k + 1][i];
    }
    path = resample(next, N);
    iterations++;
    if (iterations % o.window === 0) {
      const s = geometricAction(field, path);
      if (!Number.isFinite(s)) return { path, action: Number.NaN, converged: false, iterations, residual, ok: false, cancelled };
      residual = Math.abs(s - last) / Math.max(Math.abs(s), 1e-300);
      last = s;
      if (residual <= o.tolerance) return { path, action: s, converged: true, iterations, residual, ok: true, cancelled };
      if (o.signal?.aborted) { cancelled = true; break; }
    }
  }
  return { path, action: geometricAction(field, path), converged: false, iterations, residual, ok: true, cancelled };
}

function straight(a: ArrayLike<number>, z: ArrayLike<number>, segments: number, n: number): Float64Array[] {
  return Array.from({ length: segments + 1 }, (_, k) => {
    const t = k / segments;
    const q = new Float64Array(n);
    for (let i = 0; i < n; i++) q[i] = a[i] + t * (z[i] - a[i]);
    return q;
  });
}

function dist(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return Math.sqrt(s);
}

/** segments + 1 points equidistant in arclength along the polyline `path` (linear interpolation); ends kept exactly. */
export function resample(path: readonly Float64Array[], segments: number): Float64Array[] {
  const n = path[0].length;
  const cum = new Float64Array(path.length);
  for (let j = 1; j < path.length; j++) cum[j] = cum[j - 1] + dist(path[j - 1], path[j]);
  const total = cum[path.length - 1];
  const out: Float64Array[] = [Float64Array.from(path[0])];
  let j = 0;
  for (let k = 1; k < segments; k++) {
    const target = (total * k) / segments;
    while (j + 2 < path.length && cum[j + 1] < target) j++;
    const span = cum[j + 1] - cum[j];
    const t = span > 0 ? (target - cum[j]) / span : 0;
    const q = new Float64Array(n);
    for (let i = 0; i < n; i++) q[i] = path[j][i] + t * (path[j + 1][i] - path[j][i]);
    out.push(q);
  }
  out.push(Float64Array.from(path[path.length - 1]));
  return out;
}
