import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import { changesEscapeGraph, cutPoints } from '../regimes/intervals';
import { fmt } from '../regimes/element-roles';
import type { RegimeOptions } from '../regimes/options';
import type { CancelSignal, ExitSwitch, NoiseGraph, Progress } from './types';
import { noiseGraphAt } from './graph-at';
import { barriersAt, saddleLabel, stateLabel, type BarrierOptions } from './barriers';

/** Settings of exitSwitches. */
export interface ExitSwitchOptions {
  /** Interior samples in each interval between special points that can change the escape graph. Default 4. */
  readonly samplesPerInterval: number;
  /** Bisection stops when the bracket is this narrow (absolute, in p). Default 1e-8. */
  readonly parameterTolerance: number;
  /** Bisection steps per switch at most. Default 80. */
  readonly maxBisections: number;
  /**
   * Barriers within this of the lowest one (relative to max(|lowest|, 1e-12)) tie: mirror images
   * in a symmetric network. A switch needs the tied sets at two neighbouring samples to be disjoint.
   * Default 1e-7 (the potential is exact to rounding; gMAM's mirrored runs agree far closer than
   * their discretization error because they repeat the same arithmetic on mirrored data).
   */
  readonly tieTolerance: number;
  readonly barrier: Partial<BarrierOptions>;
  readonly regime: Partial<RegimeOptions>;
  /**
   * Only the switches out of these states (labels as stateLabel spells them, e.g. 'all-base'): the
   * barriers of the other states' edges are not computed. Default: every state.
   */
  readonly states?: readonly string[];
  readonly progress?: Progress;
  readonly signal?: CancelSignal;
}

export const defaultExitSwitchOptions: ExitSwitchOptions = {
  samplesPerInterval: 4, parameterTolerance: 1e-8, maxBisections: 80, tieTolerance: 1e-7, barrier: {}, regime: {},
};

/** Barriers out of every state at one sampled parameter value, by labels. */
export interface ExitSample {
  readonly p: number;
  readonly exits: readonly { readonly state: string; readonly saddle: string; readonly barrier: number }[];
}

export interface ExitSwitchResult {
  readonly switches: ExitSwitch[];
  readonly samples: ExitSample[];
  readonly diagnostics: Diagnostic[];
  readonly cancelled: boolean;
}

type Table = Map<string, Map<string, number>>;

/**
 * Exit switches along [from, to]: where the lowest barrier out of a stable state passes from one
 * adjacent saddle to another (Freidlin–Wentzell exit saddle; docs/noise.md, "Exit barriers"). The
 * range is cut at the diagram's special points that can change the escape graph (regimes'
 * cutPoints / changesEscapeGraph); each interval is sampled at `samplesPerInterval` interior points,
 * and at each the escape graph (noiseGraphAt) and its barriers (barriersAt) are computed. States are
 * identified by pattern, saddles by the patterns of the two states their manifold joins. Between
 * neighbouring samples where the tied lowest sets are disjoint, the difference of the two barriers is
 * bisected to `parameterTolerance` in p. The switch is reported with the common barrier (mean of the
 * two at the final midpoint). The located p is as accurate as the barriers: potential barriers to
 * rounding, gMAM barriers to their discretization (2.4e-7 relative at 200 segments, docs/noise.md), divided by the slope of the
 * difference. A switch whose saddle vanishes inside the bracket (a bifurcation, not a crossing) is a
 * diagnostic, not a switch. Two switches between the same two samples cancel and are missed
 * (raise samplesPerInterval). Never throws for numerical trouble.
 */
export function exitSwitches(
  system: CompiledSystem,
  diagram: Diagram,
  from: number,
  to: number,
  weights: Float64Array,
  options?: Partial<ExitSwitchOptions>,
): ExitSwitchResult {
  const o = { ...defaultExitSwitchOptions, ...(options ?? {}) };
  const names = system.network?.nodeIds ?? system.variables;
  const diagnostics: Diagnostic[] = [];
  const seen = new Set<string>();
  const note = (d: Diagnostic) => {
    const key = `${d.code}|${d.message}`;
    if (!seen.has(key)) { seen.add(key); diagnostics.push(d); }
  };
  const lo = Math.min(from, to);
  const hi = Math.max(from, to);
  const cuts = cutPoints(diagram, lo, hi, 1e-9, (sp) => changesEscapeGraph(system, sp));
  const ps: number[] = [];
  const m = Math.max(1, Math.floor(o.samplesPerInterval));
  for (let k = 0; k + 1 < cuts.length; k++) {
    const a = cuts[k].p;
    const b = cuts[k + 1].p;
    if (!(b - a > o.parameterTolerance)) continue;
    for (let j = 1; j <= m; j++) ps.push(a + ((b - a) * j) / (m + 1));
  }

  const evaluate = (p: number, only?: { state: string; saddles: readonly string[] }): Table | null => {
    let g;
    try {
      g = noiseGraphAt(system, diagram, p, o.regime);
    } catch (e) {
      note({ level: 'error', code: 'exit-switch-failed', p, message: `the escape graph at ${system.parameter} = ${fmt(p)} failed: ${e instanceof Error ? e.message : String(e)}` });
      return null;
    }
    if (!g.ok) {
      note({ level: 'warning', code: 'exit-switch-no-graph', p, message: `no escape graph at ${system.parameter} = ${fmt(p)}: ${g.reason}` });
      return null;
    }
    const labels = saddleKeys(g, names);
    const states = g.graph.states.map((s) => stateLabel(s.pattern, names));
    const res = barriersAt(system, g, weights, {
      ...o.barrier, regime: { ...o.regime, ...(o.barrier.regime ?? {}) }, signal: o.signal,
      pairs: only ? (k, e) => states[k] === only.state && only.saddles.includes(labels[e])
        : o.states ? (k) => o.states!.includes(states[k]) : undefined,
    });
    for (const d of res.diagnostics) note(d);
    const table: Table = new Map();
    for (const b of res.barriers) {
      const s = states[b.from];
      if (!table.has(s)) table.set(s, new Map());
      table.get(s)!.set(labels[b.saddle], b.barrier);
    }
    return table;
  };

  const samples: ExitSample[] = [];
  const tables: (Table | null)[] = [];
  let cancelled = false;
  for (let k = 0; k < ps.length; k++) {
    if (o.signal?.aborted) { cancelled = true; break; }
    const t = evaluate(ps[k]);
    tables.push(t);
    samples.push({ p: ps[k], exits: t ? [...t].flatMap(([state, row]) => [...row].map(([saddle, barrier]) => ({ state, saddle, barrier }))) : [] });
    o.progress?.({ fraction: (0.5 * (k + 1)) / ps.length, stage: 'exit-switch samples' });
  }

  const switches: ExitSwitch[] = [];
  // Per state, walk the samples with an anchor: the last sample whose lowest set is compared with
  // the next one. A sample where two barriers happen to tie (a crossing hit exactly) keeps the anchor,
  // so the samples on both sides of it are compared; a tie that persists (symmetry) never yields
  // disjoint sets and is no switch.
  const stateNames = new Set<string>();
  for (const t of tables) if (t) for (const k of t.keys()) stateNames.add(k);
  let done = 0;
  const pending: { state: string; s1: string; s2: string; pa: number; pb: number }[] = [];
  for (const state of stateNames) {
    let anchor: { k: number; set: string[] } | null = null;
    for (let k = 0; k < tables.length; k++) {
      const row = tables[k]?.get(state);
      if (!row || row.size === 0) { anchor = null; continue; }
      const set = lowest(row, o.tieTolerance);
      if (!anchor) { anchor = { k, set }; continue; }
      if (!anchor.set.some((x) => set.includes(x))) {
        pending.push({ state, s1: anchor.set[0], s2: set[0], pa: ps[anchor.k], pb: ps[k] });
        anchor = { k, set };
      } else if (set.length === 1 || anchor.set.length > 1) anchor = { k, set };
    }
  }
  for (const { state, s1, s2, pa, pb } of pending) {
    if (o.signal?.aborted) { cancelled = true; break; }
    o.progress?.({ fraction: 0.5 + (0.5 * ++done) / (pending.length + 1), stage: 'exit-switch bisection' });
    const ka = ps.indexOf(pa);
    const kb = ps.indexOf(pb);
    const rowA = tables[ka]!.get(state)!;
    const rowB = tables[kb]!.get(state)!;
    if (!rowA.has(s2) || !rowB.has(s1)) {
      note({ level: 'info', code: 'exit-saddle-vanished', p: pb,
        message: `the lowest exit of ${state} passes from saddle ${s1} to ${s2} between ${system.parameter} = ${fmt(pa)} and ${fmt(pb)} because one of them exists only on one side (a bifurcation, not a crossing of barriers)` });
      continue;
    }
    const found = bisect(state, s1, s2, pa, pb, evaluate, o);
    if (found.ok) switches.push({ p: found.p, state, saddles: [s1, s2], barrier: found.barrier });
    else note({ level: 'warning', code: 'exit-switch-bracket', p: found.p,
      message: `the exit switch of ${state} between saddles ${s1} and ${s2} in [${fmt(pa)}, ${fmt(pb)}] was not located: ${found.reason}` });
  }
  o.progress?.({ fraction: 1, stage: 'exit switches' });
  switches.sort((u, v) => u.p - v.p);
  return { switches, samples, diagnostics, cancelled };
}

function bisect(
  state: string, s1: string, s2: string, pa: number, pb: number,
  evaluate: (p: number, only?: { state: string; saddles: readonly string[] }) => Table | null,
  o: ExitSwitchOptions,
): { ok: true; p: number; barrier: number } | { ok: false; p: number; reason: string } {
  let a = pa;
  let b = pb;
  let last: [number, number] | null = null;
  for (let it = 0; it < o.maxBisections; it++) {
    if (b - a <= o.parameterTolerance) break;
    if (o.signal?.aborted) return { ok: false, p: 0.5 * (a + b), reason: 'cancelled' };
    const mid = 0.5 * (a + b);
    const row = evaluate(mid, { state, saddles: [s1, s2] })?.get(state);
    const b1 = row?.get(s1);
    const b2 = row?.get(s2);
    if (b1 === undefined || b2 === undefined) return { ok: false, p: mid, reason: `a saddle or the state disappeared at ${fmt(mid)}` };
    last = [b1, b2];
    // s1 is lowest at a, s2 at b: the difference b1 - b2 goes from negative to positive.
    if (b1 - b2 < 0) a = mid; else b = mid;
  }
  if (b - a > o.parameterTolerance) return { ok: false, p: 0.5 * (a + b), reason: `bracket still ${(b - a).toExponential(2)} wide after ${o.maxBisections} bisections` };
  const p = 0.5 * (a + b);
  const row = evaluate(p, { state, saddles: [s1, s2] })?.get(state);
  const b1 = row?.get(s1) ?? last?.[0];
  const b2 = row?.get(s2) ?? last?.[1];
  if (b1 === undefined || b2 === undefined) return { ok: false, p, reason: 'no barrier at the final midpoint' };
  return { ok: true, p, barrier: 0.5 * (b1 + b2) };
}

/** Keys of the saddles with the lowest barrier (ties within tol), lowest first. */
function lowest(row: Map<string, number>, tol: number): string[] {
  let min = Infinity;
  for (const v of row.values()) if (v < min) min = v;
  const cut = min + tol * Math.max(Math.abs(min), 1e-12);
  return [...row].filter(([, v]) => v <= cut).sort((x, y) => x[1] - y[1]).map(([k]) => k);
}

/**
 * saddleLabel per saddle. Two saddles between the same two states are told apart by their own
 * pattern ("all-base -> all-tipped via a tipped"), and where that is the same too, numbered in
 * index order (" #2"), which is not stable along the parameter.
 */
export function saddleKeys(g: NoiseGraph, names: readonly string[]): string[] {
  const labels = g.graph.saddles.map((_, e) => saddleLabel(g, e, names));
  const withPattern = labels.map((l, e) => (labels.filter((x) => x === l).length > 1 ? `${l} via ${stateLabel(g.graph.saddles[e].pattern, names)}` : l));
  const count = new Map<string, number>();
  return withPattern.map((l) => {
    const c = (count.get(l) ?? 0) + 1;
    count.set(l, c);
    return withPattern.filter((x) => x === l).length > 1 ? `${l} #${c}` : l;
  });
}
