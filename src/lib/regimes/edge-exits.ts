/**
 * Exits of a start state that no index-1 saddle provides, found by edge tracking (edge-tracking.ts;
 * docs/regimes.md, "Exits through a moving edge state"). Called by the labeller only where
 * startExits found no exit while other stable states exist: the start's basin then has a boundary,
 * and its edge state is either an index-1 saddle the diagram does not show (handed back to be
 * treated like every other saddle) or a moving state (an exit of its own kind, `via: 'moving-edge'`).
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import type { NodeState, StartState } from './types';
import type { NodeRoles } from './element-roles';
import type { RegimeOptions } from './options';
import type { IntegrationBudget } from './escape-graph';
import { isIndexOneSaddle, sameState, type Equilibrium } from './equilibria-at';
import { trackEdge } from './edge-tracking';
import { frameRolesOf, type Exit, type StartExits } from './start-exits';
import { progressOf } from './pattern';
import { fmt } from './element-roles';

export interface EdgeExits {
  /** Index-1 saddles on the start's basin boundary that `equilibria` did not hold. */
  readonly saddles: Equilibrium[];
  /** Exits through moving edge states, one per destination. */
  readonly moving: Exit[];
  readonly integrations: number;
  readonly truncated: boolean;
}

/**
 * The far end of the first segment towards stable state y: y moved by 5 % of (y - x_start) with a
 * different weight per node (sin(i + 1)), so that the segment leaves every subspace that symmetric
 * nodes keep invariant (a track started inside one stays there and settles on the subspace's own
 * saddle, of index 2 or more). Our choice, no source; the far end's fate is checked by trackEdge.
 */
function farEnd(xStart: readonly number[], y: readonly number[]): number[] {
  return y.map((v, i) => v + 0.05 * Math.sin(i + 1) * (v - xStart[i]));
}

/**
 * One edge track from the start state towards every other stable state of `found` at p. Moving
 * edge states with the same destination count as one exit (the boundary's attractor between the
 * start and that state; two distinct moving states to one destination are not told apart). The
 * moving exit's `saddle` is the track's snapshot with the most nodes engaged at once (ties: the
 * largest summed progress), its progress, engaged and changed nodes read there in the start's frame.
 */
export function edgeExits(
  system: CompiledSystem,
  p: number,
  equilibria: readonly Equilibrium[],
  found: StartExits,
  roles: readonly NodeRoles[],
  start: StartState,
  o: RegimeOptions,
  budget: IntegrationBudget,
  diagnostics: Diagnostic[],
): EdgeExits {
  const states = found.states.map((s) => s.x);
  const xStart = states[found.start];
  const every = equilibria.map((e) => e.x);
  const level: NodeState = start === 'all-tipped' ? 'tipped' : 'base';
  const recovery = start === 'all-tipped';
  const frameRoles = frameRolesOf(roles, start);
  const saddles: Equilibrium[] = [];
  const moving: Exit[] = [];
  let integrations = 0;
  let truncated = false;
  const flow = { relativeTolerance: o.relativeTolerance, absoluteTolerance: o.absoluteTolerance, timeCap: o.timeCap, maxSteps: o.maxSteps, stateBound: o.stateBound };
  for (let k = 0; k < states.length; k++) {
    if (k === found.start) continue;
    if (budget.left < 1) { truncated = true; break; }
    const track = trackEdge(system, p, states, found.start, farEnd(xStart, states[k]), every, {
      flow, trackTime: o.edgeTrackTime, trackStep: o.edgeTrackStep, bisectTolerance: o.edgeBisectTolerance,
      maxIntegrations: Math.min(o.edgeTrackIntegrations, budget.left),
      newtonTolerance: o.newtonTolerance, newtonMaxIterations: o.newtonMaxIterations, hyperbolicTolerance: o.hyperbolicTolerance,
    });
    integrations += track.integrations;
    budget.left -= track.integrations;
    if (track.kind === 'unresolved') {
      diagnostics.push({ level: 'warning', code: 'edge-unresolved', p,
        message: `edge tracking between the ${start} state and the stable state [${states[k].map(fmt).join(', ')}] at ${system.parameter} = ${fmt(p)} ended without an edge state: ${track.why}` });
      continue;
    }
    if (track.kind === 'equilibrium') {
      const e = track.equilibrium;
      if (!isIndexOneSaddle(e)) {
        diagnostics.push({ level: 'info', code: 'edge-higher-index', p,
          message: `edge tracking from the ${start} state at ${system.parameter} = ${fmt(p)} settled on an equilibrium with ${e.unstable} unstable and ${e.neutral} neutral eigenvalues; not counted as an exit` });
      } else if (![...equilibria, ...saddles].some((q) => sameState(q.x, e.x, o.duplicateTolerance))) saddles.push(e);
      continue;
    }
    const destination = found.states[track.destination].pattern;
    if (moving.some((m) => m.destination.every((s, i) => s === destination[i]))) continue;
    let best: { x: readonly number[]; progress: number[]; engaged: number; sum: number } | null = null;
    for (const x of track.samples) {
      const progress = progressOf(recovery ? x.map((c) => -c) : x, frameRoles);
      const engaged = progress.filter((s) => s >= o.engagedProgress).length;
      const sum = progress.reduce((a, b) => a + b, 0);
      if (!best || engaged > best.engaged || (engaged === best.engaged && sum > best.sum)) best = { x, progress, engaged, sum };
    }
    if (!best) continue;
    const engaged: number[] = [];
    const tipping: number[] = [];
    for (let i = 0; i < best.progress.length; i++) {
      if (best.progress[i] >= o.engagedProgress) engaged.push(i);
      if (destination[i] !== level) tipping.push(i);
    }
    moving.push({ saddle: best.x.slice(), destination: destination.slice(), progress: best.progress, engaged, tipping,
      travelTimes: [Number.NaN, Number.NaN], slope: null, via: 'moving-edge' });
  }
  return { saddles, moving, integrations, truncated };
}
