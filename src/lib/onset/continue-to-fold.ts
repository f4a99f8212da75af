import type { CompiledSystem } from '../model/compiled-system';
import { BorderedWorkspace, borderedMatrix, evalRates } from '../numerics/bordered';
import type { ContinuationOptions, DirectionEnd } from '../numerics/pseudo-arclength';
import { dist2, dot, norm2, normInf } from '../numerics/vector';
import { FlatLu } from '../numerics/flat-lu';

/** A converged point of the branch: y = (x, p), unit tangent t, bordered determinant det [DH; t^T]. */
export interface FoldPathPoint {
  readonly y: Float64Array;
  readonly t: Float64Array;
  readonly det: number;
}

export interface FoldLocation {
  readonly converged: boolean;
  readonly iterations: number;
  /** The bracket end with the smaller |t_p|. */
  readonly point: FoldPathPoint;
  /** |p_hi − p_lo| of the final bracket. */
  readonly parameterBracket: number;
}

export interface ContinueToFoldOptions extends ContinuationOptions {
  /** Fold location: bracket width in p (default 1e-11) and along the arc (1e-10 (1 + |y|)); iteration cap (default 100). */
  readonly locateParameterTolerance: number;
  readonly locateArcTolerance: number;
  readonly locateMaxIterations: number;
}

export interface ContinueToFoldResult {
  /** True when the branch ended at a located fold or on the sweep bound (the two regular outcomes). */
  readonly converged: boolean;
  /** 'fold' or why the continuation stopped first (the engine's stop reasons). */
  readonly end: 'fold' | DirectionEnd;
  /** Accepted continuation points, the start included. */
  readonly iterations: number;
  readonly last: FoldPathPoint;
  readonly fold: FoldLocation | null;
  /**
   * Parameter of the first sign change of det [DH; t^T] before the fold (the midpoint of that step):
   * a real eigenvalue of J_x crossed zero there (a branch point), since
   * sign det J_x = sign(det [DH; t^T]) · sign(t_p) (see below). Null when none.
   */
  readonly branchPointNear: number | null;
}

/**
 * Follows one branch of F(x, p) = 0 from y0 along the unit tangent t0 until its first saddle-node
 * (fold: the parameter component t_p of the tangent changes sign), locates it, and stops.
 * The continuation is the engine's: Keller's pseudo-arclength predictor-corrector with the bordered
 * corrector `correct` and `tangentAt` of numerics/bordered.ts and the step rules of
 * numerics/pseudo-arclength.ts (continueBranch), repeated here without the per-point spectrum that
 * continueBranch computes for its other test functions (for n = 64 the eigenvalues cost about twice the
 * step itself; docs/onset.md, "Speed"). Fold location: Illinois regula falsi on t_p along the arc,
 * each trial point the solution of F = 0 on the hyperplane through the cubic Hermite interpolant of
 * the bracketing step, normal to its derivative (as numerics/locate.ts locateZero; Dahlquist & Björck,
 * Numerical Methods §6.2), until the bracket is below locateParameterTolerance in p and
 * locateArcTolerance (1 + |y|) along the arc, or locateMaxIterations.
 * Why det [DH; t^T] tracks det J_x: with J t_x + F_p t_p = 0 and J regular, t_x = −J⁻¹F_p t_p and the
 * Schur complement gives det [J F_p; t_x^T t_p] = det J · (t_p − t_x^T J⁻¹F_p) = det J · t_p (1 + |J⁻¹F_p|²).
 * Never throws; inputs are not mutated.
 */
export function continueToFold(
  system: CompiledSystem,
  y0: Float64Array,
  t0: Float64Array,
  det0: number,
  o: ContinueToFoldOptions,
  isCancelled: () => boolean = () => false,
): ContinueToFoldResult {
  const n = system.dimension;
  const ws = new FoldWorkspace(n);
  let cur: FoldPathPoint = { y: Float64Array.from(y0), t: Float64Array.from(t0), det: det0 };
  let points = 1;
  let h = Math.min(o.initialStep, o.maxStep);
  let branchPointNear: number | null = null;
  const corrOpts = { residualTolerance: o.residualTolerance, stepTolerance: o.stepTolerance, earlyStepTolerance: Math.max(o.stepTolerance, 1e-6), maxIterations: o.maxCorrectorIterations };
  const finish = (end: ContinueToFoldResult['end'], fold: FoldLocation | null = null): ContinueToFoldResult => ({
    converged: end === 'fold' || end === 'sweep-bound', end, iterations: points, last: cur, fold, branchPointNear,
  });
  if ((cur.y[n] <= o.lo && cur.t[n] < 0) || (cur.y[n] >= o.hi && cur.t[n] > 0)) return finish('sweep-bound');

  for (;;) {
    if (isCancelled()) return finish('cancelled');
    if (points >= o.maxPoints) return finish('point-cap');
    const tp = cur.t[n];
    if (Math.abs(tp) * h > o.maxParameterStep) h = o.maxParameterStep / Math.abs(tp);
    if (h < o.minStep) return finish('step-collapse');
    const pred = new Float64Array(n + 1);
    for (let i = 0; i <= n; i++) pred[i] = cur.y[i] + h * cur.t[i];
    const res = correct(system, pred, cur.t, dot(cur.t, pred), ws, corrOpts);
    let ok = res.converged && res.factored;
    let tan = ok ? tangent(system, res.y, cur.t, ws, true) : null;
    if (tan !== null && !tan.ok) tan = tangent(system, res.y, cur.t, ws, false);
    ok = ok && tan !== null && tan.ok;
    if (ok && (Math.acos(Math.min(1, dot(tan!.tangent, cur.t))) > o.maxTurn || dist2(res.y, pred) > 0.25 * h)) ok = false;
    if (!ok) {
      h *= 0.5;
      if (h < o.minStep) return finish(res.converged ? 'step-collapse' : 'newton-failure');
      continue;
    }
    const next: FoldPathPoint = { y: res.y, t: tan!.tangent, det: tan!.determinant };
    points++;
    if (cur.t[n] * next.t[n] < 0) {
      const fold = locateFold(system, cur, next, o, ws);
      cur = next;
      if (fold.point.y[n] < o.lo || fold.point.y[n] > o.hi) return finish('sweep-bound');
      return finish('fold', fold);
    }
    if (branchPointNear === null && Number.isFinite(cur.det) && Number.isFinite(next.det) && cur.det * next.det < 0) {
      branchPointNear = 0.5 * (cur.y[n] + next.y[n]);
    }
    cur = next;
    if (cur.y[n] < o.lo || cur.y[n] > o.hi) return finish('sweep-bound');
    if (normInf(cur.y.subarray(0, n)) > o.stateBound) return finish('state-bound');
    if (res.iterations <= 2) h = Math.min(o.maxStep, h * 1.4);
    else if (res.iterations >= 5) h *= 0.7;
  }
}

/** Illinois regula falsi for t_p = 0 on the arc between consecutive points a and b (see continueToFold). */
function locateFold(system: CompiledSystem, a: FoldPathPoint, b: FoldPathPoint, o: ContinueToFoldOptions, ws: FoldWorkspace): FoldLocation {
  const n = system.dimension;
  const len = dist2(a.y, b.y);
  const scale = 1 + normInf(a.y);
  let lo = 0;
  let hi = 1;
  let plo = a;
  let phi = b;
  let flo = a.t[n];
  let fhi = b.t[n];
  let side = 0;
  let it = 0;
  let converged = false;
  for (; it < o.locateMaxIterations; it++) {
    if (Math.abs(phi.y[n] - plo.y[n]) < o.locateParameterTolerance && (hi - lo) * len < o.locateArcTolerance * scale) {
      converged = true;
      break;
    }
    let s = (lo * fhi - hi * flo) / (fhi - flo);
    if (!Number.isFinite(s) || s <= lo || s >= hi) s = 0.5 * (lo + hi);
    const w = hi - lo;
    if (s - lo < 1e-3 * w) s = lo + 1e-3 * w;
    if (hi - s < 1e-3 * w) s = hi - 1e-3 * w;
    const pt = arcPointOnly(system, a, b, s, o, ws);
    if (pt === null) break;
    const f = pt.t[n];
    if (f === 0) {
      plo = phi = pt;
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
  const point = Math.abs(plo.t[n]) <= Math.abs(phi.t[n]) ? plo : phi;
  return { converged, iterations: it, point, parameterBracket: Math.abs(phi.y[n] - plo.y[n]) };
}

/** Point of the arc a→b at Hermite parameter u: F = 0 on the hyperplane through g(u) normal to g'(u); tangent oriented like a's. */
function arcPointOnly(system: CompiledSystem, a: FoldPathPoint, b: FoldPathPoint, u: number, o: ContinueToFoldOptions, ws: FoldWorkspace): FoldPathPoint | null {
  const n = system.dimension;
  const len = dist2(a.y, b.y);
  const u2 = u * u;
  const u3 = u2 * u;
  const guess = new Float64Array(n + 1);
  const d = new Float64Array(n + 1);
  for (let i = 0; i <= n; i++) {
    guess[i] = (2 * u3 - 3 * u2 + 1) * a.y[i] + (u3 - 2 * u2 + u) * len * a.t[i] + (-2 * u3 + 3 * u2) * b.y[i] + (u3 - u2) * len * b.t[i];
    d[i] = (6 * u2 - 6 * u) * a.y[i] + (3 * u2 - 4 * u + 1) * len * a.t[i] + (-6 * u2 + 6 * u) * b.y[i] + (3 * u2 - 2 * u) * len * b.t[i];
  }
  const dn = Math.hypot(...d);
  for (let i = 0; i <= n; i++) d[i] /= dn;
  const res = correct(system, guess, d, dot(d, guess), ws, { residualTolerance: Math.min(o.residualTolerance, 1e-12), stepTolerance: Math.min(o.stepTolerance, 1e-13), maxIterations: 20, maxDisplacement: 0.1 * len });
  const onCurve = res.converged || (res.residual <= Math.min(o.residualTolerance, 1e-12) && dist2(res.y, guess) <= 0.1 * len);
  if (!onCurve) return null;
  const tan = tangent(system, res.y, d, ws, false);
  if (tan.tangent.every((v) => v === 0)) return null;
  const flip = dot(tan.tangent, a.t) < 0;
  return { y: res.y, t: flip ? tan.tangent.map((v) => -v) : tan.tangent, det: flip ? -tan.determinant : tan.determinant };
}

/** The engine's bordered workspace plus a flat LU of the (n+1) x (n+1) bordered matrix. */
class FoldWorkspace extends BorderedWorkspace {
  readonly lu: FlatLu;
  constructor(n: number) {
    super(n);
    this.lu = new FlatLu(n + 1);
  }
}

interface CorrectOptions {
  residualTolerance: number;
  stepTolerance: number;
  earlyStepTolerance?: number;
  maxIterations: number;
  maxDisplacement?: number;
}

/**
 * The engine's corrector (numerics/bordered.ts `correct`: Newton on F(x, p) = 0, v . y = c with the
 * bordered Jacobian [DH; v^T], same acceptance rules), factorizing with FlatLu. `factored` says that
 * ws.lu holds the factorization at the last-but-one iterate (reusable for the tangent).
 */
function correct(system: CompiledSystem, guess: Float64Array, v: Float64Array, c: number, ws: FoldWorkspace, o: CorrectOptions): { converged: boolean; iterations: number; residual: number; y: Float64Array; factored: boolean } {
  const n = ws.n;
  const m = n + 1;
  const early = o.earlyStepTolerance ?? o.stepTolerance;
  const maxDisp = o.maxDisplacement ?? Number.POSITIVE_INFINITY;
  const y = Float64Array.from(guess);
  const rhs = new Float64Array(m);
  let residual = Number.NaN;
  for (let it = 1; it <= o.maxIterations; it++) {
    const f = evalRates(system, y, ws);
    for (let i = 0; i < n; i++) rhs[i] = -f[i];
    rhs[n] = c - dot(v, y);
    residual = normInf(f);
    if (!Number.isFinite(residual) || !Number.isFinite(rhs[n])) return { converged: false, iterations: it, residual, y, factored: false };
    const d = ws.lu.factor(borderedMatrix(system, y, v, ws)).solve(rhs);
    if (d === null) return { converged: false, iterations: it, residual, y, factored: false };
    for (let i = 0; i < m; i++) y[i] += d[i];
    const step = normInf(d);
    if (maxDisp < Number.POSITIVE_INFINITY) {
      let disp = 0;
      for (let i = 0; i < m; i++) disp = Math.max(disp, Math.abs(y[i] - guess[i]));
      if (disp > maxDisp) return { converged: false, iterations: it, residual, y, factored: false };
    }
    const scale = 1 + normInf(y);
    if (step <= early * scale) {
      residual = normInf(evalRates(system, y, ws));
      if (residual <= o.residualTolerance && (step <= o.stepTolerance * scale || early > o.stepTolerance)) return { converged: true, iterations: it, residual, y, factored: true };
      if (!Number.isFinite(residual)) return { converged: false, iterations: it, residual, y, factored: false };
    }
  }
  residual = normInf(evalRates(system, y, ws));
  return { converged: false, iterations: o.maxIterations, residual, y, factored: true };
}

/**
 * The engine's tangent (numerics/bordered.ts `tangentAt`): z solves [DH(y); v^T] z = e_{n+1}, t = z / |z|,
 * ok when t . v > 0, det [DH; t^T] = det [DH; v^T] / (t . v). reuse: ws.lu already holds a factorization near y.
 */
function tangent(system: CompiledSystem, y: Float64Array, v: Float64Array, ws: FoldWorkspace, reuse: boolean): { ok: boolean; tangent: Float64Array; determinant: number } {
  const m = ws.n + 1;
  if (!reuse) ws.lu.factor(borderedMatrix(system, y, v, ws));
  const e = new Float64Array(m);
  e[m - 1] = 1;
  const z = ws.lu.solve(e);
  if (z === null) return { ok: false, tangent: new Float64Array(m), determinant: ws.lu.determinant };
  const nz = norm2(z);
  const t = new Float64Array(m);
  for (let i = 0; i < m; i++) t[i] = z[i] / nz;
  const tv = dot(t, v);
  return { ok: tv > 0, tangent: t, determinant: ws.lu.determinant / tv };
}
