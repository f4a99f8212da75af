import type { CompiledSystem } from '../model/compiled-system.js';
import { BorderedWorkspace, correct, tangentAt } from './bordered.js';
import { pointData, type TracedPoint } from './branch-point-data.js';
import { dist2 } from './vector.js';
import { unstableCount } from './eigenvalues.js';

export type TestFunctionKind = 'fold' | 'branch' | 'hopf';

export interface LocateOptions {
  /** Stop when the bracket's parameter width is below this ... (default 1e-11) */
  parameterTolerance: number;
  /** ... and its width along the branch is below this times (1 + |y|) (default 1e-10). */
  arcTolerance: number;
  /** Iteration cap of the bracketing iteration (default 100). */
  maxIterations: number;
  /** Corrector tolerances at each trial point. */
  residualTolerance: number;
  stepTolerance: number;
}

export const defaultLocateOptions: LocateOptions = {
  parameterTolerance: 1e-11,
  arcTolerance: 1e-10,
  maxIterations: 100,
  residualTolerance: 1e-12,
  stepTolerance: 1e-13,
};

export interface LocateResult {
  readonly converged: boolean;
  readonly iterations: number;
  /** The located point (the bracket end with the smaller |test value|). */
  readonly point: TracedPoint;
  /** |p_hi - p_lo| of the final bracket. */
  readonly parameterBracket: number;
  /** Test-function value at the located point. */
  readonly value: number;
  /** True when the final point was interpolated across a bracket the corrector could not shrink further. */
  readonly interpolated: boolean;
}

function hermite(a: TracedPoint, b: TracedPoint, u: number): Float64Array {
  const len = dist2(a.y, b.y);
  const u2 = u * u;
  const u3 = u2 * u;
  const h00 = 2 * u3 - 3 * u2 + 1;
  const h10 = u3 - 2 * u2 + u;
  const h01 = -2 * u3 + 3 * u2;
  const h11 = u3 - u2;
  // Explicit loops rather than TypedArray.prototype.map (several times slower in V8); same expressions.
  const m = a.y.length;
  const out = new Float64Array(m);
  for (let i = 0; i < m; i++) out[i] = h00 * a.y[i] + h10 * len * a.t[i] + h01 * b.y[i] + h11 * len * b.t[i];
  return out;
}

function hermiteTangent(a: TracedPoint, b: TracedPoint, u: number): Float64Array {
  const len = dist2(a.y, b.y);
  const u2 = u * u;
  const m = a.y.length;
  const d = new Float64Array(m);
  for (let i = 0; i < m; i++) d[i] = (6 * u2 - 6 * u) * a.y[i] + (3 * u2 - 4 * u + 1) * len * a.t[i] + (-6 * u2 + 6 * u) * b.y[i] + (3 * u2 - 2 * u) * len * b.t[i];
  const nn = Math.hypot(...d);
  for (let i = 0; i < m; i++) d[i] = d[i] / nn;
  return d;
}

/**
 * The point of the arc between consecutive branch points a and b at Hermite parameter u in [0, 1]:
 * Newton on F(y) = 0, g'(u) . (y - g(u)) = 0 with g the cubic Hermite interpolant through (y_a, t_a),
 * (y_b, t_b); tangent oriented like `from`. Returns null when the corrector fails.
 */
export function arcPoint(
  system: CompiledSystem,
  a: TracedPoint,
  b: TracedPoint,
  u: number,
  from: TracedPoint,
  ws: BorderedWorkspace,
  o: Pick<LocateOptions, 'residualTolerance' | 'stepTolerance'> = defaultLocateOptions,
): TracedPoint | null {
  const n = system.dimension;
  const len = dist2(a.y, b.y);
  // Cubic Hermite interpolation of the arc from the end points and their unit tangents: an O(len^4)
  // guess, and its derivative as the hyperplane normal, so the trial hyperplane cuts the traced arc
  // transversally (a chord guess can land on a crossing branch near a branch point).
  const guess = hermite(a, b, u);
  const d = hermiteTangent(a, b, u);
  let c = 0;
  for (let i = 0; i <= n; i++) c += d[i] * guess[i];
  const res = correct(system, guess, d, c, ws, { residualTolerance: o.residualTolerance, stepTolerance: o.stepTolerance, maxIterations: 20, maxDisplacement: 0.1 * len });
  // Next to a singular point the Newton steps stall along the near-null direction while the residual
  // is already at rounding level; such a point is on the solution set and is accepted.
  const onCurve = res.converged || (res.residual <= o.residualTolerance && dist2(res.y, guess) <= 0.1 * len);
  if (!onCurve) return null;
  const tan = tangentAt(system, res.y, d, ws);
  if (tan.tangent.every((v) => v === 0)) return null;
  // Orient along the direction of travel (the tangent at the nearer known point).
  let sign = 0;
  for (let i = 0; i <= n; i++) sign += tan.tangent[i] * from.t[i];
  const t = sign >= 0 ? tan.tangent : tan.tangent.map((v) => -v);
  const det = sign >= 0 ? tan.determinant : -tan.determinant;
  return pointData(system, res.y, t, det, ws);
}

/** The test function of `kind` at a traced point. */
export function testValue(kind: TestFunctionKind, pt: TracedPoint): number {
  if (kind === 'fold') return pt.t[pt.t.length - 1];
  if (kind === 'branch') return pt.det;
  return pt.hopf.value;
}

/**
 * Locates a zero of a test function between two consecutive branch points a and b where it changes sign.
 * The branch between them is parametrized by s in [0, 1]: y(s) solves the extended system
 * F(y) = 0, d(s) . (y - g(s)) = 0 (Newton, bordered LU), where g is the cubic Hermite interpolant of
 * the arc through (y_a, t_a) and (y_b, t_b) and d(s) its unit derivative; the hyperplane cuts the
 * short arc once because consecutive tangents differ by less than the continuation's turn limit.
 * The test function along s is bracketed and refined by the Illinois variant of regula falsi
 * (Dahlquist & Björck, Numerical Methods, §6.2), which keeps a bracket and converges superlinearly;
 * it falls back to bisection when a secant estimate is unusable. Tangents keep a's orientation, so the
 * determinant and t_p signs are consistent with the trace (Seydel, §5.2; Kuznetsov §10.2).
 */
export function locateZero(
  system: CompiledSystem,
  kind: TestFunctionKind,
  a: TracedPoint,
  b: TracedPoint,
  options: Partial<LocateOptions> = {},
): LocateResult {
  const o = { ...defaultLocateOptions, ...options };
  const n = system.dimension;
  const ws = new BorderedWorkspace(n);
  const len = dist2(a.y, b.y);
  const evalAt = (u: number, from: TracedPoint): TracedPoint | null => arcPoint(system, a, b, u, from, ws, o);
  let lo = 0;
  let hi = 1;
  let plo: TracedPoint = a;
  let phi: TracedPoint = b;
  let flo = testValue(kind, a);
  let fhi = testValue(kind, b);
  let side = 0;
  let it = 0;
  let converged = false;
  let stalled = false;
  const scale = 1 + Math.max(...Array.from(a.y, Math.abs));
  for (; it < o.maxIterations; it++) {
    const dp = Math.abs(phi.y[n] - plo.y[n]);
    if (dp < o.parameterTolerance && (hi - lo) * len < o.arcTolerance * scale) {
      converged = true;
      break;
    }
    let s = (lo * fhi - hi * flo) / (fhi - flo);
    if (!Number.isFinite(s) || s <= lo || s >= hi) s = 0.5 * (lo + hi);
    // Guard against the secant estimate hugging one bracket end (it makes no progress in the arc width).
    const w = hi - lo;
    if (s - lo < 1e-3 * w) s = lo + 1e-3 * w;
    if (hi - s < 1e-3 * w) s = hi - 1e-3 * w;
    const pt = evalAt(s, s < 0.5 ? a : b);
    if (pt === null) {
      // Corrector failed at the trial point: try the bisection point once, else stop with the bracket.
      const mid = 0.5 * (lo + hi);
      const pm = mid === s ? null : evalAt(mid, a);
      if (pm === null) {
        stalled = true;
        break;
      }
      const fm = testValue(kind, pm);
      if (fm * flo < 0) {
        hi = mid;
        phi = pm;
        fhi = fm;
      } else {
        lo = mid;
        plo = pm;
        flo = fm;
      }
      side = 0;
      continue;
    }
    const f = testValue(kind, pt);
    if (f === 0) {
      lo = hi = s;
      plo = phi = pt;
      flo = fhi = 0;
      converged = true;
      break;
    }
    if (f * fhi < 0) {
      lo = s;
      plo = pt;
      flo = f;
      if (side === -1) fhi *= 0.5;
      side = -1;
    } else {
      hi = s;
      phi = pt;
      fhi = f;
      if (side === 1) flo *= 0.5;
      side = 1;
    }
  }
  const fl = testValue(kind, plo);
  const fh = testValue(kind, phi);
  const bracket = Math.abs(phi.y[n] - plo.y[n]);
  if (stalled && fl * fh < 0 && plo !== phi) {
    // The corrector cannot resolve points closer to a singular point (next to a branch point the
    // extended system is nearly singular and a second branch is close). The test function is smooth
    // across the small final bracket, so its zero is estimated by linear interpolation in the arc
    // and the point by cubic Hermite interpolation between the two bracket points (error O(w^2) in
    // the zero, w the bracket width along the arc, and O(w^4) for the interpolated curve).
    const u = fl / (fl - fh);
    const y = hermite(plo, phi, u);
    const t = hermiteTangent(plo, phi, u);
    const point = pointData(system, y, t, Number.NaN, ws);
    const w = dist2(plo.y, phi.y);
    return { converged: w < 1e-4 * Math.max(len, 1e-300), iterations: it, point, parameterBracket: bracket, value: 0, interpolated: true };
  }
  const point = Math.abs(fl) <= Math.abs(fh) ? plo : phi;
  return { converged, iterations: it, point, parameterBracket: bracket, value: testValue(kind, point), interpolated: false };
}

export interface CountChangeResult {
  readonly point: TracedPoint;
  /** |p_hi - p_lo| of the final bracket. */
  readonly parameterBracket: number;
  readonly iterations: number;
}

/**
 * Bisection on the arc between a and b for the place where the number of eigenvalues with positive
 * real part changes (used when several eigenvalues cross together and no smooth test function
 * changes sign). Stops when the bracket is narrower than parameterTolerance in p and arcTolerance
 * along the arc, or after maxIterations; returns the bracket end nearer the change.
 */
export function locateCountChange(system: CompiledSystem, a: TracedPoint, b: TracedPoint, options: Partial<LocateOptions> = {}): CountChangeResult {
  const o = { ...defaultLocateOptions, ...options };
  const n = system.dimension;
  const ws = new BorderedWorkspace(n);
  const len = dist2(a.y, b.y);
  let lo = 0;
  let hi = 1;
  let plo = a;
  let phi = b;
  let it = 0;
  // Inside the bracket the count uses Re > 0 strictly: the tolerance band of unstableCount would
  // bias the location by tol / |d lambda / dp|.
  const loCount = unstableCount(a.spectrum, 0);
  for (; it < o.maxIterations; it++) {
    if (Math.abs(phi.y[n] - plo.y[n]) < o.parameterTolerance && (hi - lo) * len < o.arcTolerance) break;
    const mid = 0.5 * (lo + hi);
    const pm = arcPoint(system, a, b, mid, mid < 0.5 ? a : b, ws, o);
    if (pm === null) break;
    if (unstableCount(pm.spectrum, 0) === loCount) {
      lo = mid;
      plo = pm;
    } else {
      hi = mid;
      phi = pm;
    }
  }
  return { point: phi, parameterBracket: Math.abs(phi.y[n] - plo.y[n]), iterations: it };
}
