/**
 * Weak-noise prediction of escape sequences (docs/noise.md, "Weak-noise prediction"): Kramers-type
 * rates k = C exp(-barrier / level^2) on every (state, saddle) pair of an escape graph, and the
 * Markov chain of those rates over the graph's stable states (markov-chain.ts).
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import type { NodeRoles } from '../regimes/element-roles';
import { fmt } from '../regimes/element-roles';
import { integrateFlow, type FlowSettings } from '../regimes/flow';
import { defaultRegimeOptions } from '../regimes/options';
import type { Barrier, CancelSignal, NoiseGraph, NoiseSpec, Progress } from './types';
import { NoiseSettingError } from './noise-spec';
import { eyringKramersPrefactor } from './prefactor';
import { bouchetReygnerPrefactor } from './bouchet-reygner';
import { scaledField } from './gmam';
import { solveEscapeChain, type ChainTransition, type EscapeChainOptions } from './markov-chain';

export type PrefactorKind = 'eyring-kramers' | 'bouchet-reygner' | 'exponential-only';

export interface PredictedRate {
  /** Indices into graph.graph.states / graph.graph.saddles, as in the Barrier. */
  readonly from: number;
  readonly saddle: number;
  readonly to: number;
  /** k = C exp(-barrier / level^2), 1 / time unit (may underflow to 0; logRate keeps it). */
  readonly rate: number;
  readonly logRate: number;
  /** C; null for the leading exponential order only (then the chain uses C = 1). */
  readonly prefactor: number | null;
  readonly barrier: number;
  /** Node ids passing their escape thresholds along the transition, in order; ids in one group cross together. */
  readonly crossings: string[][];
}

export interface Prediction {
  readonly prefactor: PrefactorKind;
  readonly rates: PredictedRate[];
  /** Complete escape orders (node ids) and their predicted probabilities, most likely first. */
  readonly sequences: { order: string[]; probability: number }[];
  readonly meanFirstEscape: number;
  /** Index k - 1: predicted mean time to the k-th escape (Infinity when some mass never gets there). */
  readonly meanKthEscape: number[];
  readonly meanLastEscape: number;
  /** Probability of coming back to the start state after a partial escape, before all nodes escaped. */
  readonly returnProbability: number;
  /** Probability that the chain never completes a sequence (trapped, or past the chain's cap). */
  readonly incomplete: number;
  /** The escape thresholds used, per node. */
  readonly thresholds: number[];
  readonly diagnostics: Diagnostic[];
}

export interface PredictionOptions {
  /** Index into graph.graph.states of the start state. */
  readonly start: number;
  /** Escape threshold per node; default halfwayThresholds(roles, start state): halfway from the threshold root to the root escaped to. */
  readonly thresholds?: Float64Array;
  /** Whether the scaled field is a gradient (barriersAt's answer): decides the prefactor. */
  readonly gradient: boolean;
  /** Offset of the manifold branch start along the unstable eigenvector, relative to 1 + |x_s|; default 1e-5 (regimes). */
  readonly manifoldOffset?: number;
  /** ODE settings of the manifold branches; default regimes' (ODEX, rtol 1e-8, atol 1e-10, 200 000 steps). */
  readonly flow?: Partial<FlowSettings>;
  readonly chain?: Partial<EscapeChainOptions>;
  /** Warn when the lowest barrier out of the start is below this many level^2; default 3 (common practice, no source). */
  readonly weakNoiseRatio?: number;
  /** Checked before every manifold integration and every chain block; an aborted run returns what it has, with a 'prediction-cancelled' diagnostic. */
  readonly signal?: CancelSignal;
  /** Called after every manifold integration (stage 'crossings') and once when the chain is solved (stage 'chain'). */
  readonly progress?: Progress;
}

/**
 * Default escape thresholds (docs/noise.md), the same definition as the Monte Carlo's escapeThresholds:
 * halfway between the threshold root and the root the node escapes to, (threshold + tipped) / 2 for a
 * node that starts below its threshold root (at `start`; all nodes when `start` is omitted) and
 * (threshold + base) / 2 for one that starts above it (recovery from tipped).
 */
export function halfwayThresholds(roles: readonly NodeRoles[], start?: ArrayLike<number>): Float64Array {
  return Float64Array.from(roles, (r, i) => (start && start[i] > r.threshold ? (r.threshold + r.base) / 2 : (r.threshold + r.tipped) / 2));
}

/**
 * Predicted escape sequences and times at weak noise.
 * Rates: k = C exp(-barrier / level^2) per Barrier (state -> saddle -> other state). Gradient
 * systems take the Eyring–Kramers prefactor C = mu(s)/(2 pi) sqrt(|det J(m)| / |det J(s)|) (Berglund
 * 2013; prefactor.ts). Non-gradient systems take the Bouchet–Reygner prefactor from each barrier's
 * minimum-action path (Bouchet & Reygner 2016; bouchet-reygner.ts). Where either is not defined for
 * some edge (its conditions fail, the path is too coarse, the integral does not settle), every rate
 * is the leading exponential order exp(-barrier / level^2) with C = 1, said in a warning
 * (`prefactor: 'exponential-only'`): order probabilities are then right only where one barrier
 * dominates, and times only in logarithmic scale. Crossing orders: along the Barrier's path (state
 * to saddle, straight segment when it has none) and then the saddle's unstable-manifold branch
 * towards the other state (ODEX from x_s ± offset v), every first crossing of a node to the far side
 * of its escape threshold (the side away from the start state) is recorded with its (linearly
 * interpolated) time; crossings within 1e-6 (1 + |t|) count as simultaneous. The chain
 * (solveEscapeChain) assumes exponential holding times with the total exit rate and negligible
 * transit times. Throws NoiseSettingError for a bad level, start or thresholds (naming the field);
 * numerical trouble ends in diagnostics.
 */
export function predictEscapes(
  system: CompiledSystem,
  graph: NoiseGraph,
  barriers: readonly Barrier[],
  spec: NoiseSpec,
  options: PredictionOptions,
): Prediction {
  const n = system.dimension;
  const names = system.network?.nodeIds ?? system.variables;
  const states = graph.graph.states;
  if (!(Number.isFinite(spec.level) && spec.level > 0)) throw new NoiseSettingError('noise', `must be a positive finite number, got ${spec.level}`);
  if (!(Number.isInteger(options.start) && options.start >= 0 && options.start < states.length)) {
    throw new NoiseSettingError('start', `must index one of the ${states.length} stable states, got ${options.start}`);
  }
  const thresholds = options.thresholds ?? halfwayThresholds(graph.roles, states[options.start].x);
  if (thresholds.length !== n || !Array.from(thresholds).every(Number.isFinite)) {
    throw new NoiseSettingError('thresholds', `need ${n} finite values, one per node`);
  }
  const diagnostics: Diagnostic[] = [];
  const p = graph.p;
  const level2 = spec.level * spec.level;
  const startX = states[options.start].x;
  // side_i = +1: node i escapes upwards (starts below its threshold), -1: downwards.
  const side = Array.from({ length: n }, (_, i) => (startX[i] < thresholds[i] ? 1 : -1));

  const usable = barriers.filter((b) => {
    const ok = Number.isFinite(b.barrier) && b.barrier >= -1e-12 && b.from >= 0 && b.from < states.length && b.to >= 0 && b.to < states.length
      && b.saddle >= 0 && b.saddle < graph.saddles.length;
    if (!ok) diagnostics.push({ level: 'error', code: 'prediction-bad-barrier', p, message: `barrier from state ${b.from} over saddle ${b.saddle} is unusable (${fmt(b.barrier)}); the edge is left out of the prediction` });
    else if (!b.converged) diagnostics.push({ level: 'warning', code: 'prediction-unconverged-barrier', p, message: `barrier from state ${b.from} over saddle ${b.saddle} did not converge; its rate is uncertain` });
    return ok;
  });

  let kind: PrefactorKind = options.gradient ? 'eyring-kramers' : 'exponential-only';
  const prefactors: (number | null)[] = usable.map(() => null);
  if (options.gradient) {
    for (let k = 0; k < usable.length; k++) {
      const b = usable[k];
      const r = eyringKramersPrefactor(graph.states[b.from].eigenvalues, graph.saddles[b.saddle].eigenvalues);
      if (!r.ok) {
        kind = 'exponential-only';
        diagnostics.push({ level: 'warning', code: 'prediction-prefactor-undefined', p,
          message: `no Eyring–Kramers prefactor from state ${b.from} over saddle ${b.saddle}: ${r.reason}; every rate falls back to the leading exponential order` });
        break;
      }
      prefactors[k] = r.prefactor;
    }
    if (kind === 'exponential-only') prefactors.fill(null);
  } else {
    // Non-gradient: the Bouchet–Reygner prefactor from each barrier's minimum-action path, in the
    // scaled coordinates y = x / w where the noise is isotropic (bouchet-reygner.ts).
    kind = 'bouchet-reygner';
    const field = scaledField(system, p, spec.weights);
    for (let k = 0; k < usable.length; k++) {
      const b = usable[k];
      const r = bouchetReygnerPrefactor(field, b.path.map((x) => Float64Array.from(x, (v, i) => v / spec.weights[i])));
      if (!r.ok) {
        kind = 'exponential-only';
        diagnostics.push({ level: 'warning', code: 'prediction-exponential-only', p,
          message: `the scaled field is not a gradient and the Bouchet–Reygner prefactor from state ${b.from} over saddle ${b.saddle} is not available: ${r.reason}; every rate is exp(-barrier / sigma^2) with unit prefactor, so sequence probabilities hold only where one barrier dominates and mean times only to logarithmic order (log T ~ barrier / sigma^2)` });
        break;
      }
      prefactors[k] = r.prefactor;
    }
    if (kind === 'exponential-only') prefactors.fill(null);
  }

  const crossingCache = new Map<string, { groups: number[][]; ok: boolean }>();
  const rates: PredictedRate[] = [];
  const transitions: ChainTransition[] = [];
  let cancelled = false;
  usable.forEach((b, k) => {
    if (cancelled || options.signal?.aborted) { cancelled = true; return; }
    const key = `${b.from}:${b.saddle}:${b.to}`;
    let c = crossingCache.get(key);
    if (!c) {
      c = transitionCrossings(system, graph, b, thresholds, side, options);
      crossingCache.set(key, c);
      if (!c.ok) diagnostics.push({ level: 'warning', code: 'prediction-manifold', p,
        message: `the unstable manifold of saddle ${b.saddle} did not reach state ${b.to}; the crossing order of that transition is the order at the integration's end` });
    }
    const barrier = Math.max(0, b.barrier);
    const C = prefactors[k];
    const logRate = Math.log(C ?? 1) - barrier / level2;
    rates.push({ from: b.from, saddle: b.saddle, to: b.to, rate: Math.exp(logRate), logRate, prefactor: C, barrier, crossings: c.groups.map((g) => g.map((i) => names[i])) });
    transitions.push({ from: b.from, to: b.to, logRate, crossings: c.groups });
    options.progress?.({ fraction: (0.9 * (k + 1)) / usable.length, stage: 'crossings' });
  });
  if (cancelled) {
    diagnostics.push({ level: 'warning', code: 'prediction-cancelled', p, message: `cancelled after ${rates.length} of ${usable.length} transitions; no sequences were predicted` });
    const none = Array.from({ length: n }, () => Number.NaN);
    return { prefactor: kind, rates, sequences: [], meanFirstEscape: Number.NaN, meanKthEscape: none, meanLastEscape: Number.NaN,
      returnProbability: Number.NaN, incomplete: 1, thresholds: Array.from(thresholds), diagnostics };
  }

  const outOfStart = usable.filter((b) => b.from === options.start);
  if (outOfStart.length === 0) {
    diagnostics.push({ level: 'warning', code: 'prediction-no-exit', p, message: 'the start state has no barrier to any saddle; nothing escapes in the weak-noise prediction' });
  } else {
    const lowest = Math.min(...outOfStart.map((b) => b.barrier));
    const ratio = options.weakNoiseRatio ?? 3;
    if (lowest / level2 < ratio) {
      diagnostics.push({ level: 'warning', code: 'prediction-noise-not-weak', p,
        message: `the lowest barrier out of the start is ${fmt(lowest / level2)} sigma^2 (< ${ratio}): the weak-noise asymptotics (Kramers) are not accurate at this noise level` });
    }
  }

  const chain = solveEscapeChain({ states: states.length, nodes: n, start: options.start, transitions }, { ...(options.chain ?? {}), signal: options.signal ?? options.chain?.signal });
  options.progress?.({ fraction: 1, stage: 'chain' });
  diagnostics.push(...chain.diagnostics.map((d) => ({ ...d, p })));
  return {
    prefactor: kind,
    rates,
    sequences: chain.sequences.map((s) => ({ order: s.order.map((i) => names[i]), probability: s.probability })),
    meanFirstEscape: chain.meanKthEscape[0],
    meanKthEscape: chain.meanKthEscape,
    meanLastEscape: chain.meanKthEscape[n - 1],
    returnProbability: chain.returnProbability,
    incomplete: chain.incomplete,
    thresholds: Array.from(thresholds),
    diagnostics,
  };
}

/**
 * Nodes crossing to the escaped side of their thresholds along state -> saddle (the barrier's path,
 * or the straight segment) -> state `to` (unstable-manifold branch), grouped by simultaneity, in order.
 */
function transitionCrossings(
  system: CompiledSystem,
  graph: NoiseGraph,
  b: Barrier,
  thresholds: Float64Array,
  side: number[],
  options: PredictionOptions,
): { groups: number[][]; ok: boolean } {
  const n = system.dimension;
  const first = new Float64Array(n).fill(NaN);
  const escaped = (x: ArrayLike<number>, i: number) => side[i] * (x[i] - thresholds[i]) > 0;
  const scan = (x0: ArrayLike<number>, x1: ArrayLike<number>, t0: number, t1: number) => {
    for (let i = 0; i < n; i++) {
      if (!Number.isNaN(first[i]) || escaped(x0, i) || !escaped(x1, i)) continue;
      const f = (thresholds[i] - x0[i]) / (x1[i] - x0[i]);
      first[i] = t0 + f * (t1 - t0);
    }
  };
  const saddle = graph.saddles[b.saddle];
  const from = graph.states[b.from].x;
  const path = b.path.length >= 2 ? b.path : [from, saddle.x];
  // Uphill keys in (-1, 0]: fraction of the path's length still ahead; downhill keys are flow times.
  const lengths = [0];
  for (let k = 1; k < path.length; k++) lengths.push(lengths[k - 1] + dist(path[k - 1], path[k]));
  const total = lengths[lengths.length - 1] || 1;
  for (let k = 1; k < path.length; k++) scan(path[k - 1], path[k], lengths[k - 1] / total - 1, lengths[k] / total - 1);
  scan(path[path.length - 1], saddle.x, 0, 0);

  const target = graph.states[b.to].x;
  const v = saddle.unstableVector;
  let ok = false;
  if (v) {
    const settings: FlowSettings = { ...pickFlow(), ...(options.flow ?? {}) };
    const offset = (options.manifoldOffset ?? defaultRegimeOptions.manifoldOffset) * (1 + maxAbs(saddle.x));
    const radius = Math.min(1e-3 * (1 + maxAbs(target)), 0.25 * maxDist(target, saddle.x));
    // The branch whose first step points towards `to` is the one that reaches it.
    const others = graph.graph.states.filter((_, k) => k !== b.to)
      .map((st) => ({ x: st.x, r: Math.min(1e-3 * (1 + maxAbs(st.x)), 0.25 * maxDist(st.x, saddle.x)) }));
    const toward = saddle.x.reduce((a, c, i) => a + (target[i] - c) * v[i], 0) >= 0 ? 1 : -1;
    for (const sign of [toward, -toward]) {
      const saved = Float64Array.from(first);
      const x0 = saddle.x.map((c, i) => c + sign * offset * v[i]);
      scan(saddle.x, x0, 0, 0);
      let tPrev = 0;
      let xPrev = x0.slice();
      let arrived = false;
      integrateFlow(system, graph.p, x0, settings, (t, x) => {
        scan(xPrev, x, tPrev, t);
        tPrev = t;
        xPrev = x.slice();
        if (maxDist(x, target) < radius) { arrived = true; return true; }
        // Settled near another stable state: this is the other branch.
        return others.some((y) => maxDist(x, y.x) < y.r);
      });
      if (arrived) { ok = true; break; }
      first.set(saved);
    }
  }
  if (!ok) scan(saddle.x, target, 0, 1);
  const crossed = Array.from({ length: n }, (_, i) => i).filter((i) => !Number.isNaN(first[i])).sort((i, j) => first[i] - first[j]);
  const groups: number[][] = [];
  for (const i of crossed) {
    const last = groups[groups.length - 1];
    if (last && Math.abs(first[i] - first[last[0]]) <= 1e-6 * (1 + Math.abs(first[i]))) last.push(i);
    else groups.push([i]);
  }
  return { groups, ok };
}

function pickFlow(): FlowSettings {
  const o = defaultRegimeOptions;
  return { relativeTolerance: o.relativeTolerance, absoluteTolerance: o.absoluteTolerance, timeCap: o.timeCap, maxSteps: o.maxSteps, stateBound: o.stateBound };
}

function dist(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return Math.sqrt(s);
}

function maxDist(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}
