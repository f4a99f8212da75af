import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import type { EdgeKind, EscapeGraph, NodeState, Regime, RegimeBand, SaddleEdge, StartState } from './types';
import { resolveOptions, type RegimeOptions } from './options';
import { elementRoles, fmt, stateRanges, type NodeRoles } from './element-roles';
import { equilibriaAt } from './equilibria-at';
import { buildEscapeGraph, type EscapeGraphResult, type IntegrationBudget } from './escape-graph';
import { classifyEdge, type EdgeClassification } from './classify-edge';
import { changesEscapeGraph, cutName, cutPoints } from './intervals';
import { mergeBands, type IntervalLabel } from './merge-bands';
import { isAll } from './pattern';
import { listNames, patternWords } from './reason';

interface RegimeResult {
  readonly regimes: RegimeBand[];
  readonly escapeGraphs: EscapeGraph[];
  readonly diagnostics: Diagnostic[];
}

const MAX_DIAGNOSTICS = 60;

/**
 * The labeller before issue 10, kept only so that `npm run bench` can time the new one against it in
 * the same process (scripts/bench.ts); nothing else calls it. Its labels can depend on where an
 * interval's midpoint falls (docs/regimes.md, "Known limits" of that version).
 *
 * Coupling regimes along the diagram's parameter. The range [from, to] is cut at every special
 * point of the diagram; at the midpoint of each interval the equilibria shown by the diagram are
 * refined, the escape graph is built (buildEscapeGraph) and every edge out of each start state
 * (all-base, and all-tipped when options.starts asks) is classified (classifyEdge). An interval is
 * weak when every such edge is contained, strong when every one is synchronous, intermediate
 * otherwise; adjacent intervals with the same label are merged (mergeBands). Intervals where the
 * element roles are undefined, the start state is missing or no edge leaves it get no label and a
 * diagnostic. Method and tolerances: docs/regimes.md.
 */
export function labelRegimesByMidpoint(system: CompiledSystem, diagram: Diagram, options?: Partial<RegimeOptions>): RegimeResult {
  const o = resolveOptions(options);
  const diagnostics: Diagnostic[] = [];
  const seen = new Set<string>();
  const note = (d: Diagnostic) => {
    const key = `${d.code}|${d.message}`;
    if (seen.has(key)) return;
    seen.add(key);
    diagnostics.push(d);
  };
  const n = system.dimension;
  const names = system.network?.nodeIds ?? system.variables;
  const settings = diagram.settings ?? {};
  const from = o.from ?? (typeof settings.from === 'number' ? settings.from : system.sweep.from);
  const to = o.to ?? (typeof settings.to === 'number' ? settings.to : system.sweep.to);
  const starts: StartState[] = o.starts.includes('all-base') ? ['all-base', ...o.starts.filter((s) => s !== 'all-base')] : [...o.starts];

  if (!system.network && !o.roles) {
    note({ level: 'error', code: 'regimes-undefined',
      message: 'regimes undefined: the model is not a network of elements and no base, threshold and tipped roles were given' });
    return { regimes: [], escapeGraphs: [], diagnostics };
  }
  const badBranch = diagram.branches.find((b) => b.points.some((q) => q.x.length !== n));
  if (badBranch) {
    note({ level: 'error', code: 'regimes-diagram-mismatch', branch: badBranch.id,
      message: `the diagram does not belong to this model: branch ${badBranch.id} has states of length ${badBranch.points.find((q) => q.x.length !== n)!.x.length}, the model has ${n} variables` });
    return { regimes: [], escapeGraphs: [], diagnostics };
  }
  const ranges = stateRanges(diagram, n);
  const fixedRoles = o.roles !== undefined || system.network?.sweepIsCoupling === true;
  let roles0: (NodeRoles | null)[] | null = null;
  if (fixedRoles) {
    const r = elementRoles(system, from, ranges, o.scanPoints, o.roles);
    r.diagnostics.forEach(note);
    if (r.roles.some((x) => x === null)) return { regimes: [], escapeGraphs: [], diagnostics };
    roles0 = r.roles;
  }

  let ignored = 0;
  const cuts = cutPoints(diagram, from, to, 1e-9, (sp) => {
    if (o.allCuts || changesEscapeGraph(system, sp)) return true;
    ignored++;
    return false;
  });
  if (ignored > 0) {
    note({ level: 'info', code: 'cuts-ignored',
      message: `${ignored} of ${diagram.bifurcations.length} special points join only equilibria with two or more unstable eigenvalues; they cannot change the escape graph and do not cut the bands` });
  }
  const labels = new Map<StartState, IntervalLabel[]>(starts.map((s) => [s, []]));
  const escapeGraphs: EscapeGraph[] = [];
  const budget = { left: o.maxIntegrations };
  let exhausted = false;
  for (let k = 0; k + 1 < cuts.length; k++) {
    const a = cuts[k];
    const b = cuts[k + 1];
    if (b.p - a.p < o.minimumInterval) continue;
    const p = 0.5 * (a.p + b.p);
    const push = (regime: (start: StartState) => { regime: Regime | null; reason: string }) => {
      for (const start of starts) {
        const lab = regime(start);
        labels.get(start)!.push({ from: a.p, to: b.p, fromBound: cutName(a), toBound: cutName(b), regime: lab.regime, reason: lab.reason, start });
      }
    };
    if (exhausted) { push(() => ({ regime: null, reason: 'integration budget used up' })); continue; }
    try {
      const analysed = analyseInterval(system, diagram, p, roles0, ranges, starts, names, o, note, budget);
      if (analysed.truncated) {
        exhausted = true;
        note({ level: 'warning', code: 'regimes-budget', p,
          message: `the cap of ${o.maxIntegrations} manifold integrations was reached at ${system.parameter} = ${fmt(p)}; this and the later intervals are not labelled (raise maxIntegrations for larger networks)` });
        push(() => ({ regime: null, reason: 'integration budget used up' }));
        continue;
      }
      if (analysed.graph) escapeGraphs.push(analysed.graph);
      push((start) => analysed.labels.get(start) ?? { regime: null, reason: 'regimes undefined' });
    } catch (e) {
      // A model function that throws must not take the whole run down.
      note({ level: 'error', code: 'regimes-failed', p,
        message: `regime analysis failed at ${system.parameter} = ${fmt(p)}: ${e instanceof Error ? e.message : String(e)}; the interval is not labelled` });
      push(() => ({ regime: null, reason: 'analysis failed' }));
    }
  }
  const regimes = starts.flatMap((s) => mergeBands(labels.get(s)!));
  if (diagnostics.length > MAX_DIAGNOSTICS) {
    const extra = diagnostics.length - MAX_DIAGNOSTICS;
    diagnostics.length = MAX_DIAGNOSTICS;
    diagnostics.push({ level: 'info', code: 'diagnostics-truncated', message: `${extra} further diagnostics were left out` });
  }
  return { regimes, escapeGraphs, diagnostics };
}

/** Escape graph and labels of one interval at its representative parameter p. */
function analyseInterval(
  system: CompiledSystem,
  diagram: Diagram,
  p: number,
  roles0: (NodeRoles | null)[] | null,
  ranges: [number, number][],
  starts: StartState[],
  names: readonly string[],
  o: RegimeOptions,
  note: (d: Diagnostic) => void,
  budget: IntegrationBudget,
): { graph: EscapeGraph | null; truncated: boolean; labels: Map<StartState, { regime: Regime | null; reason: string }> } {
  const labels = new Map<StartState, { regime: Regime | null; reason: string }>();
  let roles = roles0;
  if (!roles) {
    const r = elementRoles(system, p, ranges, o.scanPoints, o.roles);
    r.diagnostics.forEach(note);
    roles = r.roles;
  }
  if (roles.some((x) => x === null)) return { graph: null, truncated: false, labels };
  const nodeRoles = roles as NodeRoles[];
  const eq = equilibriaAt(system, diagram, p, o);
  eq.diagnostics.forEach(note);
  const g = buildEscapeGraph(system, p, eq.equilibria, nodeRoles, o, budget);
  g.diagnostics.forEach(note);
  if (g.truncated) return { graph: null, truncated: true, labels };
  const edges: SaddleEdge[] = g.graph.saddles.map((e) => ({ ...e }));
  for (const start of starts) labels.set(start, labelInterval(system, p, g, edges, nodeRoles, names, start, o, note));
  return { graph: { p, states: g.graph.states, saddles: edges }, truncated: false, labels };
}

/** Mirror x -> -x: turns the all-tipped start into an all-base one for classifyEdge. */
function mirrorRoles(roles: readonly NodeRoles[]): NodeRoles[] {
  return roles.map((r) => ({ base: -r.tipped, threshold: -r.threshold, tipped: -r.base }));
}
const flip = (p: readonly NodeState[]): NodeState[] => p.map((s) => (s === 'base' ? 'tipped' : 'base'));

function labelInterval(
  system: CompiledSystem,
  p: number,
  g: EscapeGraphResult,
  edges: SaddleEdge[],
  roles: NodeRoles[],
  names: readonly string[],
  start: StartState,
  o: RegimeOptions,
  note: (d: Diagnostic) => void,
): { regime: Regime | null; reason: string } {
  const recovery = start === 'all-tipped';
  const startLevel: NodeState = recovery ? 'tipped' : 'base';
  const states = g.graph.states;
  const s0 = states.findIndex((s) => isAll(s.pattern, startLevel));
  if (s0 < 0) {
    note({ level: 'warning', code: 'no-start-state', p,
      message: `no stable ${start} state at ${system.parameter} = ${fmt(p)}; the interval is not labelled for ${start}` });
    return { regime: null, reason: `no stable ${start} state` };
  }
  const frameRoles = recovery ? mirrorRoles(roles) : roles;
  const found: { edge: number; cls: EdgeClassification; target: number }[] = [];
  edges.forEach((e, i) => {
    if (e.from !== s0 && e.to !== s0) return;
    const target = e.from === s0 ? e.to : e.from;
    const tp = states[target].pattern;
    const frameTarget = recovery ? flip(tp) : tp;
    const x = recovery ? e.x.map((c) => -c) : e.x;
    const v = recovery ? e.direction!.map((c) => -c) : e.direction!;
    const cls = classifyEdge(x, v, frameTarget, frameRoles, o);
    found.push({ edge: i, cls, target });
    const branch = g.saddles[i].branches[e.from === s0 ? 1 : 0];
    if (recovery) edges[i] = { ...edges[i], kinds: { ...(edges[i].kinds ?? {}), [start]: cls.kind } };
    else edges[i] = { ...edges[i], kind: cls.kind, ...(cls.kind === 'cascading' ? { slowPassage: branch.slowTime } : {}) };
  });
  if (found.length === 0) {
    note({ level: 'warning', code: 'no-escape-route', p,
      message: `no index-1 saddle leads out of the ${start} state at ${system.parameter} = ${fmt(p)}; the interval is not labelled for ${start}` });
    return { regime: null, reason: `no way out of ${start} found` };
  }
  const kinds = found.map((f) => f.cls.kind);
  const regime: Regime = kinds.every((k) => k === 'contained') ? 'weak' : kinds.every((k) => k === 'synchronous') ? 'strong' : 'intermediate';
  return { regime, reason: reasonFor(regime, found, states.map((s) => s.pattern), names, recovery) };
}

function reasonFor(
  regime: Regime,
  found: { cls: EdgeClassification; target: number }[],
  patterns: NodeState[][],
  names: readonly string[],
  recovery: boolean,
): string {
  const startName = recovery ? 'all-tipped' : 'all-base';
  const partial = recovery ? 'partially recovered' : 'partially tipped';
  const verb = recovery ? 'recovering' : 'tipping';
  const verbPlural = recovery ? 'recover' : 'tip';
  const by = (kind: EdgeKind) => found.filter((f) => f.cls.kind === kind);
  const uniq = (xs: string[]) => [...new Set(xs)];
  const contained = uniq(by('contained').map((f) => patternWords(patterns[f.target], names)));
  const containedText = `stable ${partial} state${contained.length > 1 ? 's' : ''} reached from ${startName}: ${contained.join('; ')}`;
  const sync = uniq(by('synchronous').map((f) => listNames(f.cls.tipping.map((i) => names[i]))));
  const syncText = `${sync.map((s) => `${s} ${verbPlural} together`).join('; ')} (saddle with every such node near its threshold, moving in step)`;
  if (regime === 'weak') return containedText;
  if (regime === 'strong') return `every way out of ${startName} is synchronous: ${syncText}`;
  const cascades = uniq(by('cascading').map((f) => {
    const target = patternWords(patterns[f.target], names);
    if (f.cls.committed.length > 0) {
      const leaders = f.cls.tipping.filter((i) => !f.cls.committed.includes(i)).map((i) => names[i]);
      const lead = leaders.length > 0 ? listNames(leaders) : listNames(f.cls.engaged.map((i) => names[i]));
      return `${lead} ${verb} first commits ${listNames(f.cls.committed.map((i) => names[i]))}, reaching ${target}`;
    }
    const order = [...f.cls.tipping].sort((i, j) => f.cls.progress[j] - f.cls.progress[i]).map((i) => names[i]);
    return `${listNames(order)} ${verbPlural} one after another, not together (${order[0]} furthest along at the saddle), reaching ${target}`;
  }));
  const parts = [`cascade from ${startName}: ${cascades.join('; or ')}`];
  if (contained.length > 0) parts.push(`still contained: ${contained.join('; ')}`);
  if (sync.length > 0) parts.push(`also synchronous: ${syncText}`);
  return parts.join('; ');
}
