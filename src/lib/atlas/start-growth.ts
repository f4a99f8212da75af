/**
 * Growing a restricted trace from the start state's escape graph (docs/numerics.md §12). At chosen
 * parameter values the equilibria the diagram shows are refined (regimes' equilibriaAt), and from
 * the start state (the stable state whose pattern is all-base, as the regime analysis defines it)
 * the unstable manifolds of the index-1 saddles are followed to the stable states they reach
 * (regimes' followBranch: forward integration from x_s ± offset v). A state reached that no branch
 * passes through is returned, so that the trace starts a branch there, and its own exits are
 * followed in turn at the same parameter value, until nothing new is reached or a cap is hit.
 */
import type { CompiledSystem } from '../model/compiled-system.js';
import { branchTargets, defaultRegimeOptions, elementRoles, equilibriaAt, followBranch, isIndexOneSaddle, stateRanges, type Equilibrium } from '../regimes/index.js';
import type { Diagnostic, Diagram } from './types.js';

export interface GrowthOptions {
  readonly from: number;
  readonly to: number;
  /** Evenly spaced interior parameter values examined (besides those next to the start branch's saddle-nodes). */
  readonly values: number;
  /** Manifold-branch integrations allowed in this round. */
  readonly integrations: number;
  /** New states allowed in this round. */
  readonly maxStates: number;
  /** Whether (x, p) already lies on a traced branch. */
  readonly isTraced: (x: Float64Array, p: number) => boolean;
  readonly isCancelled?: () => boolean;
}

export interface GrowthRound {
  /** New stable states (state and parameter value) reached from the start state, in the order found. */
  readonly found: { readonly x: Float64Array; readonly p: number }[];
  /** Parameter values where the start state existed and its exits were followed. */
  readonly values: number;
  readonly integrations: number;
  readonly stoppedBy: 'nothing-new' | 'found' | 'start-budget' | 'integration-cap' | 'not-bistable' | 'no-start-state' | 'cancelled';
  readonly diagnostics: Diagnostic[];
}

/**
 * The parameter values of a growth round, ascending: `values` evenly spaced interior ones,
 * (j + 1/2) / values of the way from `from` to `to`, and for every saddle-node on a branch through the
 * start state at p = from the value 1e-3 of the sweep width before it (on the side of `from`, where the
 * start state still exists and the saddle that is about to meet it is closest: the exit through that
 * saddle is the cascade the saddle-node sets off).
 */
export function growthValues(diagram: Diagram, startBranches: ReadonlySet<string>, from: number, to: number, values: number): number[] {
  const lo = Math.min(from, to);
  const hi = Math.max(from, to);
  const out: number[] = [];
  for (let j = 0; j < values; j++) out.push(from + ((j + 0.5) / values) * (to - from));
  const delta = 1e-3 * (hi - lo);
  for (const sp of diagram.bifurcations) {
    if (sp.type !== 'saddle-node' || !sp.branches.some((b) => startBranches.has(b))) continue;
    const q = sp.p - Math.sign(to - from) * delta;
    if (q > lo && q < hi) out.push(q);
  }
  out.sort((a, b) => a - b);
  return out.filter((v, i) => i === 0 || v !== out[i - 1]);
}

/** Ids of the branches with a point at p = from whose state has the all-base pattern and is stable. */
export function startBranchIds(diagram: Diagram, from: number, threshold: (i: number) => number): Set<string> {
  const ids = new Set<string>();
  for (const b of diagram.branches) {
    for (const q of b.points) {
      if (q.p !== from || q.unstable !== 0) continue;
      if (q.x.every((v, i) => v <= threshold(i))) { ids.add(b.id); break; }
    }
  }
  return ids;
}

/**
 * One growth round on the diagram traced so far (see the file header). Per parameter value the
 * start state is expanded first, then every new state in the order found. Expanding a state u: for
 * every index-1 saddle the manifold branch that leaves towards u (sign of v . (x_u - x_s)) is
 * followed; when it arrives at u the other branch is followed, and the state it arrives at is an
 * exit destination of u. Each branch is integrated once per parameter value (ends are kept per
 * saddle). A saddle whose branch towards u ends elsewhere is taken not to be an exit of u (the
 * branch pointing away could still curve back to u: docs/numerics.md §12 lists this among the
 * misses). Only the start state and new states are expanded, not states already traced.
 */
export function growthRound(system: CompiledSystem, diagram: Diagram, o: GrowthOptions): GrowthRound {
  const n = system.dimension;
  const diagnostics: Diagnostic[] = [];
  const ro = defaultRegimeOptions;
  const rolesResult = elementRoles(system, o.from, stateRanges(diagram, n), ro.scanPoints);
  if (rolesResult.roles.some((r) => r === null)) {
    return { found: [], values: 0, integrations: 0, stoppedBy: 'not-bistable', diagnostics };
  }
  const roles = rolesResult.roles.map((r) => r!);
  const starts = startBranchIds(diagram, o.from, (i) => roles[i].threshold);
  const ps = growthValues(diagram, starts, o.from, o.to, o.values);
  const found: { x: Float64Array; p: number }[] = [];
  let integrations = 0;
  let examined = 0;
  let stopped: GrowthRound['stoppedBy'] | null = null;
  for (const p of ps) {
    if (o.isCancelled?.()) { stopped = 'cancelled'; break; }
    const eq = equilibriaAt(system, diagram, p, ro).equilibria;
    const targets = branchTargets(system, eq, roles, ro);
    const s0 = targets.states.findIndex((s) => s.pattern.every((q) => q === 'base'));
    if (s0 < 0) continue;
    examined++;
    const known = targets.states.length;
    const saddles = eq.filter(isIndexOneSaddle);
    const ends = saddles.map(() => new Map<1 | -1, number>());
    const follow = (j: number, sign: 1 | -1): number | null => {
      const e = ends[j].get(sign);
      if (e !== undefined) return e;
      if (integrations >= o.integrations) { stopped = 'integration-cap'; return null; }
      integrations++;
      const r = followBranch(system, p, saddles[j], sign, targets, ro, diagnostics).reached;
      ends[j].set(sign, r);
      return r;
    };
    const queue = [s0];
    const queued = new Set<number>(queue);
    while (queue.length > 0 && stopped === null) {
      const u = queue.shift()!;
      const xu = targets.states[u].x;
      for (let j = 0; j < saddles.length && stopped === null; j++) {
        const sd: Equilibrium = saddles[j];
        const v = sd.unstableVector!;
        let dot = 0;
        for (let i = 0; i < n; i++) dot += v[i] * (xu[i] - sd.x[i]);
        const toward: 1 | -1 = dot < 0 ? -1 : 1;
        const a = follow(j, toward);
        if (a === null || a !== u) continue;
        const dest = follow(j, toward === 1 ? -1 : 1);
        if (dest === null || dest < 0 || dest === u || queued.has(dest)) continue;
        queued.add(dest);
        if (dest < known) continue;
        const x = Float64Array.from(targets.states[dest].x);
        if (o.isTraced(x, p)) continue;
        if (found.length >= o.maxStates) { stopped = 'start-budget'; break; }
        found.push({ x, p });
        queue.push(dest);
      }
    }
    if (stopped !== null) break;
  }
  return { found, values: examined, integrations, stoppedBy: stopped ?? (found.length > 0 ? 'found' : ps.length > 0 && examined === 0 ? 'no-start-state' : 'nothing-new'), diagnostics };
}
