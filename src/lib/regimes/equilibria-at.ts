import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram, Eigenvalue } from '../atlas/types';
import { newtonAtFixedParameter, rememberJacobian, spectrum } from './linear-algebra';
import { fmt } from './element-roles';
import { rememberReference } from './saddle-update';

/** An equilibrium at one parameter value, refined and with its spectrum. */
export interface Equilibrium {
  readonly x: number[];
  /** Max norm of F at x after refinement. */
  readonly residual: number;
  readonly eigenvalues: Eigenvalue[];
  /** Eigenvalues with Re > tolerance. */
  readonly unstable: number;
  /** Eigenvalues with |Re| <= tolerance (non-hyperbolic when > 0). */
  readonly neutral: number;
  /** Index-1 saddles: the unstable eigenvalue and its unit eigenvector (largest component positive). */
  readonly unstableValue?: number;
  readonly unstableVector?: number[];
  /** Branch the starting guess came from. */
  readonly branch?: string;
}

export interface EquilibriaSettings {
  readonly newtonTolerance: number;
  readonly newtonMaxIterations: number;
  readonly duplicateTolerance: number;
  readonly hyperbolicTolerance: number;
}

export const isStable = (e: Equilibrium) => e.unstable === 0 && e.neutral === 0;
export const isIndexOneSaddle = (e: Equilibrium) => e.unstable === 1 && e.neutral === 0 && e.unstableVector !== undefined;

/**
 * Every equilibrium the diagram shows at parameter p (plus those reached from `extraGuesses`): on each branch, every segment between
 * consecutive points whose parameter values enclose p gives a guess by linear interpolation in p,
 * refined by Newton's method at fixed p (when Newton fails or moves farther than half the segment, or a
 * tenth of it onto an equilibrium already found, the segment's two end points are tried too); converged points closer than duplicateTolerance
 * (max norm relative to 1 + |x|) are merged. Each gets the eigenvalues of J_x(x, p).
 */
export function equilibriaAt(
  system: CompiledSystem,
  diagram: Diagram,
  p: number,
  settings: EquilibriaSettings,
  extraGuesses: readonly (readonly number[])[] = [],
): { equilibria: Equilibrium[]; diagnostics: Diagnostic[] } {
  const guesses: { x: number[]; branch: string; ends?: [number[], number[]] }[] = [];
  const index = parameterIndex(diagram);
  diagram.branches.forEach((b, bi) => {
    const pts = b.points;
    const ps = index.ps[bi];
    if (p < index.lo[bi] || p > index.hi[bi]) return;
    for (let k = 0; k + 1 < pts.length; k++) {
      if ((p - ps[k]) * (p - ps[k + 1]) > 0) continue;
      const a = pts[k];
      const c = pts[k + 1];
      const t = c.p === a.p ? 0.5 : (p - a.p) / (c.p - a.p);
      guesses.push({ x: a.x.map((v, i) => v + t * (c.x[i] - v)), branch: b.id, ends: [a.x, c.x] });
    }
    if (pts.length === 1 && pts[0].p === p) guesses.push({ x: pts[0].x.slice(), branch: b.id });
  });
  for (const x of extraGuesses) guesses.push({ x: x.slice(), branch: 'guess' });
  const found: { x: Float64Array; residual: number; branch: string }[] = [];
  let failures = 0;
  // Duplicates are looked up in buckets of u = x_0 / (1 + |x_0|): two states within the relative
  // tolerance tol (1 + |x_0|) of each other differ by at most tol in u (du/dx_0 = 1 / (1 + |x_0|)^2),
  // so with buckets 10 tol wide a duplicate is in the same bucket or a neighbouring one. A 6-node
  // diagram shows about 700 equilibria near zero coupling; comparing each with all found so far cost
  // more than refining them.
  const width = 10 * settings.duplicateTolerance;
  const buckets = new Map<number, number[]>();
  const bucketOf = (x: ArrayLike<number>) => Math.floor(x[0] / (1 + Math.abs(x[0])) / width);
  const add = (x: Float64Array, residual: number, branch: string): boolean => {
    const key = bucketOf(x);
    for (let k = key - 1; k <= key + 1; k++) {
      for (const j of buckets.get(k) ?? []) if (sameState(found[j].x, x, settings.duplicateTolerance)) return false;
    }
    let list = buckets.get(key);
    if (!list) buckets.set(key, (list = []));
    list.push(found.length);
    found.push({ x, residual, branch });
    return true;
  };
  for (const g of guesses) {
    const r = newtonAtFixedParameter(system, g.x, p, settings.newtonTolerance, settings.newtonMaxIterations);
    // Next to a pitchfork or fold the branch bends like a square root, and the straight-line guess on
    // the segment that reaches the bifurcation can land on the other equilibrium there. When Newton
    // moves farther than half the segment (a tenth when it lands on an equilibrium already found), the
    // segment's own end points are tried as well.
    const isNew = r.converged && add(r.x, r.residual, g.branch);
    const moved = g.ends ? maxNorm(r.x, g.x) / Math.max(maxNorm(g.ends[0], g.ends[1]), 1e-300) : 0;
    const wandered = !r.converged || moved > 0.5 || (!isNew && moved > 0.1);
    if (wandered && g.ends) {
      for (const end of g.ends) {
        const e = newtonAtFixedParameter(system, end, p, settings.newtonTolerance, settings.newtonMaxIterations);
        if (e.converged) add(e.x, e.residual, g.branch);
      }
    }
    // Extra guesses are tries, not branch points: their failures are not reported.
    if (!r.converged && g.branch !== 'guess') failures++;
  }
  const analysed = found.map((f) => analyseEquilibrium(system, f.x, p, f.residual, settings.hyperbolicTolerance, f.branch));
  const before = found.length;
  nearCriticalGuesses(system, p, found, analysed, settings, add);
  for (const f of found.slice(before)) analysed.push(analyseEquilibrium(system, f.x, p, f.residual, settings.hyperbolicTolerance, f.branch));
  const diagnostics: Diagnostic[] = [];
  if (failures > 0) {
    diagnostics.push({ level: 'info', code: 'refine-failed', p,
      message: `${failures} of ${guesses.length - extraGuesses.length} branch guesses at ${system.parameter} = ${fmt(p)} did not converge under Newton's method and were left out` });
  }
  return { equilibria: analysed, diagnostics };
}

/** Per branch: the points' parameter values in one array, and their range (diagrams are not changed once traced). */
interface ParameterIndex { readonly ps: Float64Array[]; readonly lo: Float64Array; readonly hi: Float64Array }
const indexes = new WeakMap<Diagram, ParameterIndex>();

/**
 * The scan for segments enclosing p runs once per labelled p over every point of the diagram (10^5
 * for a 6-node network); on typed arrays, with whole branches outside p skipped, it costs a tenth of
 * reading `points[k].p` from the point objects.
 */
function parameterIndex(diagram: Diagram): ParameterIndex {
  let hit = indexes.get(diagram);
  if (!hit) {
    const m = diagram.branches.length;
    const ps: Float64Array[] = [];
    const lo = new Float64Array(m);
    const hi = new Float64Array(m);
    diagram.branches.forEach((b, i) => {
      const a = Float64Array.from(b.points, (q) => q.p);
      ps.push(a);
      let l = Infinity;
      let h = -Infinity;
      for (const v of a) { if (v < l) l = v; if (v > h) h = v; }
      lo[i] = l;
      hi[i] = h;
    });
    hit = { ps, lo, hi };
    indexes.set(diagram, hit);
  }
  return hit;
}

/** Spectrum and saddle data of one equilibrium. */
export function analyseEquilibrium(system: CompiledSystem, x: Float64Array, p: number, residual: number, tol: number, branch?: string): Equilibrium {
  const n = system.dimension;
  const jac = system.jacobian(x, p, new Float64Array(n * n));
  const s = spectrum(jac, n);
  let unstable = 0;
  let neutral = 0;
  let k1 = -1;
  for (let k = 0; k < n; k++) {
    if (s.re[k] > tol) { unstable++; k1 = k; } else if (s.re[k] >= -tol) neutral++;
  }
  const eigenvalues = s.re.map((re, k) => ({ re, im: s.im[k] }));
  let unstableValue: number | undefined;
  let unstableVector: number[] | undefined;
  if (unstable === 1 && neutral === 0) {
    const v = s.vector(k1);
    if (v) {
      let big = 0;
      for (let i = 1; i < n; i++) if (Math.abs(v[i]) > Math.abs(v[big])) big = i;
      unstableVector = v[big] < 0 ? v.map((c) => -c) : v;
      unstableValue = s.re[k1];
    }
  }
  const out: Equilibrium = { x: Array.from(x), residual, eigenvalues, unstable, neutral, unstableValue, unstableVector, branch };
  rememberJacobian(out, jac);
  if (unstableValue !== undefined) {
    // The reference for continuing this saddle without a spectrum (saddle-update.ts).
    let rest = -Infinity;
    for (let k = 0; k < n; k++) if (k !== k1) rest = Math.max(rest, s.re[k]);
    rememberReference(out, { jac, value: unstableValue, rest });
  }
  return out;
}

/**
 * A stable equilibrium known to stay stable, without its spectrum when a cheap certificate holds: by
 * Gershgorin's circle theorem every eigenvalue of J lies in a disc centred at J_ii with radius
 * sum_{j != i} |J_ij| (the same with columns), so when J_ii + sum_{j != i} |J_ij| < -tol for every row
 * (or every column) all eigenvalues have Re < -tol (Golub & Van Loan, Matrix Computations, 4th ed.,
 * Thm. 7.2.1). Diffusive coupling with non-negative weights meets it at every state where each
 * element's own slope is negative (the row sum of the coupling terms is zero). The eigenvalues are
 * computed on first use. Otherwise analyseEquilibrium.
 */
export function certifiedStable(system: CompiledSystem, x: Float64Array, p: number, residual: number, tol: number, branch?: string): Equilibrium {
  const n = system.dimension;
  const jac = system.jacobian(x, p, new Float64Array(n * n));
  let rows = true;
  let cols = true;
  for (let i = 0; i < n && (rows || cols); i++) {
    let r = jac[i * n + i];
    let c = jac[i * n + i];
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      r += Math.abs(jac[i * n + j]);
      c += Math.abs(jac[j * n + i]);
    }
    if (!(r < -tol)) rows = false;
    if (!(c < -tol)) cols = false;
  }
  if (!rows && !cols) return analyseEquilibrium(system, x, p, residual, tol, branch);
  let values: Eigenvalue[] | null = null;
  const out: Equilibrium = {
    x: Array.from(x), residual, unstable: 0, neutral: 0, branch,
    get eigenvalues() {
      if (!values) { const s = spectrum(jac, n); values = s.re.map((re, k) => ({ re, im: s.im[k] })); }
      return values;
    },
  };
  rememberJacobian(out, jac);
  return out;
}

/**
 * Close to a pitchfork the equilibria that are about to merge sit at a distance of order
 * sqrt(|p - p_pf|) from the symmetric one, along the eigenvector of its nearly zero eigenvalue
 * (pitchfork normal form x' = mu x - x^3; Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
 * section 3.4 (from memory)), and branch guesses tend to fall into the symmetric one. For every
 * equilibrium with a real eigenvalue |lambda| < 1e-3 max(1, max |lambda_j|), Newton's method is also
 * started from x ± delta w, w that eigenvector, delta in {0.003, 0.01, 0.03, 0.1} (1 + |x|).
 */
function nearCriticalGuesses(
  system: CompiledSystem,
  p: number,
  found: readonly { x: Float64Array }[],
  analysed: readonly Equilibrium[],
  settings: EquilibriaSettings,
  add: (x: Float64Array, residual: number, branch: string) => boolean,
): void {
  const n = system.dimension;
  const jac = new Float64Array(n * n);
  const candidates = found.slice();
  candidates.forEach((f, j) => {
    const ev = analysed[j].eigenvalues;
    let scale = 1;
    for (const l of ev) scale = Math.max(scale, Math.hypot(l.re, l.im));
    if (!ev.some((l) => l.im === 0 && Math.abs(l.re) < 1e-3 * scale)) return;
    system.jacobian(f.x, p, jac);
    const s = spectrum(jac, n);
    let k0 = -1;
    for (let k = 0; k < n; k++) if (s.im[k] === 0 && Math.abs(s.re[k]) < 1e-3 * scale && (k0 < 0 || Math.abs(s.re[k]) < Math.abs(s.re[k0]))) k0 = k;
    if (k0 < 0) return;
    const w = s.vector(k0);
    if (!w) return;
    let size = 0;
    for (let i = 0; i < n; i++) size = Math.max(size, Math.abs(f.x[i]));
    for (const delta of [0.003, 0.01, 0.03, 0.1]) for (const sign of [1, -1]) {
      const guess = Array.from(f.x, (v, i) => v + sign * delta * (1 + size) * w[i]);
      const r = newtonAtFixedParameter(system, guess, p, settings.newtonTolerance, settings.newtonMaxIterations);
      if (r.converged) add(r.x, r.residual, 'near-critical');
    }
  });
}

function maxNorm(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

export function sameState(a: ArrayLike<number>, b: ArrayLike<number>, tol: number): boolean {
  for (let i = 0; i < a.length; i++) {
    if (Math.abs(a[i] - b[i]) > tol * (1 + Math.abs(a[i]))) return false;
  }
  return true;
}
