import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import type { GivenRoles } from './options';
import { findScalarRoots } from '../numerics/index';

/** Roles of the three equilibria of one node's uncoupled element: base < threshold < tipped. */
export interface NodeRoles { readonly base: number; readonly threshold: number; readonly tipped: number }

export interface ElementRolesResult {
  /** One entry per node; null where the element does not have the bistable shape. */
  readonly roles: (NodeRoles | null)[];
  readonly diagnostics: Diagnostic[];
}

/** Per-variable range of the diagram's branch points, widened by max(span, 1) on each side. */
export function stateRanges(diagram: Diagram, dimension: number): [number, number][] {
  const key = `${dimension}`;
  const cached = rangeCache.get(diagram)?.get(key);
  if (cached) return cached.map(([a, b]) => [a, b]);
  const ranges: [number, number][] = [];
  const lo = new Array<number>(dimension).fill(Infinity);
  const hi = new Array<number>(dimension).fill(-Infinity);
  // One pass over the points for all components (a 6-node diagram has about 10^5 points).
  for (const b of diagram.branches) for (const pt of b.points) {
    for (let i = 0; i < dimension; i++) {
      const v = pt.x[i];
      if (Number.isFinite(v)) { if (v < lo[i]) lo[i] = v; if (v > hi[i]) hi[i] = v; }
    }
  }
  for (let i = 0; i < dimension; i++) {
    let l = lo[i];
    let h = hi[i];
    if (!Number.isFinite(l)) { l = -1; h = 1; }
    const w = Math.max(h - l, 1);
    ranges.push([l - w, h + w]);
  }
  let forDiagram = rangeCache.get(diagram);
  if (!forDiagram) rangeCache.set(diagram, (forDiagram = new Map()));
  forDiagram.set(key, ranges);
  return ranges.map(([a, b]) => [a, b]);
}

/** Diagrams are not changed once traced (as equilibria-at.ts's parameter index assumes). */
const rangeCache = new WeakMap<Diagram, Map<string, [number, number][]>>();

/**
 * Base, threshold and tipped equilibrium of every node's uncoupled element f_i(x; p) at parameter p:
 * the roots of f_i on the node's scan range (the engine's findScalarRoots: sign changes on scanPoints - 1
 * equal cells, refined by Newton with bisection fallback; double roots are not found, so an element
 * touching zero at its own fold is not bistable) must be exactly three, with df_i/dx < 0, > 0, < 0 in
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
    const roots = findScalarRoots(f, df, lo, hi, { cells: scanPoints - 1 }).roots;
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
