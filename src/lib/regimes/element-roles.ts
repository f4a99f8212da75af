import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import type { GivenRoles } from './options';

/** Roles of the three equilibria of one node's uncoupled element: base < threshold < tipped. */
export interface NodeRoles { readonly base: number; readonly threshold: number; readonly tipped: number }

export interface ElementRolesResult {
  /** One entry per node; null where the element does not have the bistable shape. */
  readonly roles: (NodeRoles | null)[];
  readonly diagnostics: Diagnostic[];
}

/**
 * Roots of a scalar function on [lo, hi]: sign changes on a uniform grid of `points` values, each
 * bracket refined by Newton's method safeguarded by bisection (a Newton step leaving the bracket is
 * replaced by the midpoint), to |bracket| < 1e-14 (1 + |x|) or |f| = 0, at most 200 iterations.
 * Roots of even multiplicity (no sign change) are not found: an element touching zero at a fold is
 * not treated as bistable, which is what regimes need. Method: Press et al., Numerical Recipes,
 * 3rd ed., section 9.4 ("rtsafe").
 */
export function scalarRoots(
  f: (x: number) => number,
  df: (x: number) => number,
  lo: number,
  hi: number,
  points: number,
): number[] {
  const roots: number[] = [];
  const h = (hi - lo) / (points - 1);
  let xa = lo;
  let fa = f(xa);
  for (let k = 1; k < points; k++) {
    const xb = k === points - 1 ? hi : lo + k * h;
    const fb = f(xb);
    if (fa === 0) roots.push(xa);
    else if (fa * fb < 0) roots.push(refineBracket(f, df, xa, xb, fa));
    xa = xb;
    fa = fb;
  }
  if (fa === 0) roots.push(xa);
  return roots;
}

function refineBracket(f: (x: number) => number, df: (x: number) => number, a: number, b: number, fa: number): number {
  let lo = a;
  let hi = b;
  // orient so that f(lo) < 0 < f(hi)
  if (fa > 0) { lo = b; hi = a; }
  let x = 0.5 * (a + b);
  for (let it = 0; it < 200; it++) {
    const fx = f(x);
    if (fx === 0) return x;
    if (fx < 0) lo = x; else hi = x;
    const d = df(x);
    let next = d !== 0 ? x - fx / d : NaN;
    const left = Math.min(lo, hi);
    const right = Math.max(lo, hi);
    if (!(next > left && next < right)) next = 0.5 * (lo + hi);
    if (Math.abs(next - x) < 1e-14 * (1 + Math.abs(x)) || right - left < 1e-14 * (1 + Math.abs(x))) return next;
    x = next;
  }
  return x;
}

/** Per-variable range of the diagram's branch points, widened by max(span, 1) on each side. */
export function stateRanges(diagram: Diagram, dimension: number): [number, number][] {
  const ranges: [number, number][] = [];
  for (let i = 0; i < dimension; i++) {
    let lo = Infinity;
    let hi = -Infinity;
    for (const b of diagram.branches) for (const pt of b.points) {
      const v = pt.x[i];
      if (Number.isFinite(v)) { if (v < lo) lo = v; if (v > hi) hi = v; }
    }
    if (!Number.isFinite(lo)) { lo = -1; hi = 1; }
    const w = Math.max(hi - lo, 1);
    ranges.push([lo - w, hi + w]);
  }
  return ranges;
}

/**
 * Base, threshold and tipped equilibrium of every node's uncoupled element f_i(x; p) at parameter p:
 * the roots of f_i on the node's scan range must be exactly three, with df_i/dx < 0, > 0, < 0 in
 * increasing x (lower stable = base, unstable = threshold, upper stable = tipped). Anything else
 * yields null for that node and an error diagnostic with code "regimes-undefined".
 * `given` replaces the analysis by roles the model states (checked only for base < threshold < tipped).
 */
export function elementRoles(
  system: CompiledSystem,
  p: number,
  ranges: readonly (readonly [number, number])[],
  scanPoints = 4001,
  given?: readonly GivenRoles[],
): ElementRolesResult {
  const n = system.dimension;
  const roles: (NodeRoles | null)[] = [];
  const diagnostics: Diagnostic[] = [];
  const names = system.network?.nodeIds ?? system.variables;
  if (given) {
    for (let i = 0; i < n; i++) {
      const g = given[i];
      if (!g || !(g.base < g.threshold && g.threshold < g.tipped)) {
        roles.push(null);
        diagnostics.push({ level: 'error', code: 'regimes-undefined', p,
          message: `node '${names[i]}': given roles must satisfy base < threshold < tipped` });
      } else roles.push({ base: g.base, threshold: g.threshold, tipped: g.tipped });
    }
    return { roles, diagnostics };
  }
  const net = system.network;
  if (!net) {
    return {
      roles: Array.from({ length: n }, () => null),
      diagnostics: [{ level: 'error', code: 'regimes-undefined', p,
        message: 'regimes undefined: the model is not a network of elements and states no base, threshold and tipped roles' }],
    };
  }
  for (let i = 0; i < n; i++) {
    const [lo, hi] = ranges[i];
    const f = (x: number) => net.elementRate(i, x, p);
    const df = (x: number) => net.elementDerivative(i, x, p);
    const roots = scalarRoots(f, df, lo, hi, scanPoints);
    const slopes = roots.map(df);
    const shapeOk = roots.length === 3 && slopes[0] < 0 && slopes[1] > 0 && slopes[2] < 0;
    if (shapeOk) {
      roles.push({ base: roots[0], threshold: roots[1], tipped: roots[2] });
    } else {
      roles.push(null);
      const listed = roots.length === 0 ? 'no equilibrium'
        : `${roots.length} equilibri${roots.length === 1 ? 'um' : 'a'} (${roots.map((r, k) =>
          `${fmt(r)} ${slopes[k] < 0 ? 'stable' : slopes[k] > 0 ? 'unstable' : 'degenerate'}`).join(', ')})`;
      diagnostics.push({ level: 'error', code: 'regimes-undefined', p,
        message: `regimes undefined: the uncoupled element of node '${names[i]}' at ${system.parameter} = ${fmt(p)} has ${listed} in [${fmt(lo)}, ${fmt(hi)}]; ` +
          'base, threshold and tipped need exactly a lower stable, a middle unstable and an upper stable equilibrium' });
    }
  }
  return { roles, diagnostics };
}

export function fmt(v: number): string {
  return Number.isInteger(v) ? String(v) : Number(v.toPrecision(6)).toString();
}
