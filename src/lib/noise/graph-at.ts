import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import { analyseEquilibrium, equilibriaAt, type Equilibrium } from '../regimes/equilibria-at';
import { elementRoles, stateRanges, type NodeRoles } from '../regimes/element-roles';
import { buildEscapeGraph } from '../regimes/escape-graph';
import { resolveOptions, type RegimeOptions } from '../regimes/options';
import type { NoiseGraph } from './types';

/** Why no escape graph could be built at p (roles undefined, no stable state, ...). */
export interface NoiseGraphFailure {
  readonly ok: false;
  readonly p: number;
  readonly reason: string;
  readonly diagnostics: readonly Diagnostic[];
}

/**
 * The escape graph at parameter p (regimes' buildEscapeGraph over the diagram's equilibria at p,
 * refined by Newton's method), with the full spectra of its stable states and saddles and the node
 * roles at p. The diagram must cover p; roles come from the uncoupled elements (or `options.roles`).
 */
export function noiseGraphAt(
  system: CompiledSystem,
  diagram: Diagram,
  p: number,
  options?: Partial<RegimeOptions>,
): ({ ok: true } & NoiseGraph) | NoiseGraphFailure {
  const o = resolveOptions(options);
  const diagnostics: Diagnostic[] = [];
  const n = system.dimension;
  if (!system.network && !o.roles) {
    return { ok: false, p, reason: 'the model is not a network of bistable elements and no roles were given', diagnostics };
  }
  const r = elementRoles(system, p, stateRanges(diagram, n), o.scanPoints, o.roles);
  diagnostics.push(...r.diagnostics);
  if (r.roles.some((x) => x === null)) return { ok: false, p, reason: 'element roles (base, threshold, tipped) are undefined', diagnostics };
  const roles = r.roles as NodeRoles[];
  const eq = equilibriaAt(system, diagram, p, o);
  diagnostics.push(...eq.diagnostics);
  const g = buildEscapeGraph(system, p, eq.equilibria, roles, o);
  diagnostics.push(...g.diagnostics);
  if (g.graph.states.length === 0) return { ok: false, p, reason: 'no stable state at this parameter value', diagnostics };
  const states: Equilibrium[] = g.graph.states.map((s) => {
    const known = eq.equilibria.find((e) => e.x.every((v, i) => v === s.x[i]));
    if (known) return known;
    const x = Float64Array.from(s.x);
    const f = system.rates(x, p, new Float64Array(n));
    let res = 0;
    for (const v of f) res = Math.max(res, Math.abs(v));
    return analyseEquilibrium(system, x, p, res, o.hyperbolicTolerance);
  });
  return { ok: true, p, graph: g.graph, states, saddles: g.saddles.map((s) => s.equilibrium), roles, diagnostics };
}
