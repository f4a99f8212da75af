/**
 * The series behind the three charts of an escape study (docs/noise.md, "Views of an escape
 * study"), read from the rows the API serves (/api/runs/:id/escapes, src/lib/server/escapes/rows.ts):
 * exit barriers out of the start state, escape-order probabilities with their intervals beside the
 * weak-noise prediction, and mean escape times. Pure: no browser, no server.
 */
import type { EscapePoint } from '../server/escapes/rows';
import { wilsonInterval } from '../noise/escape-statistics';

/** What the charts need of a stored study (the API's `study`, null while the run goes on). */
export interface EscapeStudyInfo {
  readonly parameter: string;
  readonly noise: number;
  readonly start: string;
  readonly exitSwitches: readonly unknown[];
}

export interface BarrierSeries {
  /** The saddle crossed, as its label (states joined). */
  readonly key: string;
  /** The state reached, e.g. "n1 tipped". */
  readonly label: string;
  readonly points: { p: number; barrier: number; prefactor: number | null; logRate: number | null; crossings: string[][] }[];
}

export interface ExitSwitchMark { readonly p: number; readonly barrier: number; readonly saddles: readonly [string, string] }

export interface SequenceEstimate { p: number; probability: number; low: number; high: number; count: number; paths: number }
export interface SequenceSeries {
  /** Node ids in escape order. */
  readonly order: string[];
  /** "n1 → n2". */
  readonly label: string;
  /** Monte Carlo estimates, one per done value (count 0 included: the interval still says something). */
  readonly estimates: SequenceEstimate[];
  /** Weak-noise prediction, where it gives a finite probability. */
  readonly predicted: { p: number; probability: number }[];
}

export interface TimeEstimate { p: number; mean: number; halfWidth: number | null; count: number; median: number | null; q05: number | null; q95: number | null }
export interface TimingSeries {
  /** 'kth' = mean time to the k-th escape; 'between' = mean time from the j-th to the k-th escape. */
  readonly kind: 'kth' | 'between';
  readonly k: number;
  readonly j: number | null;
  readonly label: string;
  readonly estimates: TimeEstimate[];
  readonly predicted: { p: number; mean: number }[];
}

/** The state the paths start from, as barrier rows name it. */
export const startLabel = (start: string): string => (start === 'all-tipped' ? 'all-tipped' : 'all-base');

export const orderLabel = (order: readonly string[]): string => order.join(' → ');

const byP = <T extends { p: number }>(a: T, b: T) => a.p - b.p;
const done = (points: readonly EscapePoint[]) => points.filter((pt) => pt.status === 'done').sort(byP);

/**
 * One series per saddle out of the start state, over every done value where the barrier is finite.
 * Series are ordered by their lowest barrier (the likeliest exit first).
 */
export function barrierSeries(points: readonly EscapePoint[], start: string): BarrierSeries[] {
  const from = startLabel(start);
  const map = new Map<string, { label: string; points: BarrierSeries['points'] }>();
  for (const pt of done(points)) {
    // Two saddles may join the same pair of states: the second is its own series ("… (2)").
    const seen = new Map<string, number>();
    for (const b of pt.barriers) {
      if (b.from !== from || b.barrier === null) continue;
      const nth = (seen.get(b.saddle) ?? 0) + 1;
      seen.set(b.saddle, nth);
      const key = nth === 1 ? b.saddle : `${b.saddle} (${nth})`;
      let s = map.get(key);
      if (!s) { s = { label: nth === 1 ? b.to : `${b.to} (saddle ${nth})`, points: [] }; map.set(key, s); }
      s.points.push({ p: pt.p, barrier: b.barrier, prefactor: b.prefactor, logRate: b.logRate, crossings: b.crossings });
    }
  }
  const out = [...map.entries()].map(([key, s]) => ({ key, label: s.label, points: s.points }));
  const low = (s: BarrierSeries) => Math.min(...s.points.map((q) => q.barrier));
  return out.sort((a, b) => low(a) - low(b) || a.key.localeCompare(b.key));
}

/**
 * The study's exit switches out of the start state (the stored ExitSwitch objects: p, state label
 * as stateLabel spells it, saddles, barrier). Switches of other states are left out; malformed entries are skipped.
 */
export function exitSwitchMarks(study: Pick<EscapeStudyInfo, 'exitSwitches' | 'start'> | null): ExitSwitchMark[] {
  if (!study) return [];
  const from = startLabel(study.start);
  const out: ExitSwitchMark[] = [];
  for (const raw of study.exitSwitches) {
    const s = raw as { p?: unknown; state?: unknown; saddles?: unknown; barrier?: unknown };
    if (typeof s.p !== 'number' || typeof s.barrier !== 'number' || !Array.isArray(s.saddles)) continue;
    if (s.state !== from) continue;
    out.push({ p: s.p, barrier: s.barrier, saddles: [String(s.saddles[0]), String(s.saddles[1])] });
  }
  return out.sort(byP);
}

/**
 * One series per escape order seen in the Monte Carlo or named by the prediction. At a done value
 * where an order was never seen, its estimate is 0 with the Wilson interval of 0 of n, so the
 * chart shows how small an unseen order can be: the engine's Wilson (1927) interval of 0 of n,
 * which is [0, z² / (n + z²)] (x = 0 in the score interval: centre (z²/2n) / (1 + z²/n) and
 * half-width (z / (1 + z²/n)) · z / 2n add up to z² / (n + z²)).
 * Ordered by the largest estimated probability, then by label.
 */
export function sequenceSeries(points: readonly EscapePoint[]): SequenceSeries[] {
  const pts = done(points);
  const orders = new Map<string, string[]>();
  for (const pt of pts) {
    for (const s of pt.sequences) orders.set(orderLabel(s.order), s.order);
    for (const s of pt.prediction?.sequences ?? []) orders.set(orderLabel(s.order), s.order);
  }
  const series: SequenceSeries[] = [...orders.entries()].map(([label, order]) => {
    const estimates: SequenceEstimate[] = [];
    const predicted: { p: number; probability: number }[] = [];
    for (const pt of pts) {
      const seen = pt.sequences.find((s) => orderLabel(s.order) === label);
      if (seen) estimates.push({ p: pt.p, probability: seen.probability, low: seen.low, high: seen.high, count: seen.count, paths: pt.paths });
      else if (pt.paths > 0) estimates.push({ p: pt.p, probability: 0, ...wilsonInterval(0, pt.paths), count: 0, paths: pt.paths });
      const pr = pt.prediction?.sequences.find((s) => orderLabel(s.order) === label);
      if (pr && pr.probability !== null) predicted.push({ p: pt.p, probability: pr.probability });
    }
    return { order, label, estimates, predicted };
  });
  const top = (s: SequenceSeries) => Math.max(0, ...s.estimates.map((e) => e.probability), ...s.predicted.map((e) => e.probability));
  return series.sort((a, b) => top(b) - top(a) || a.label.localeCompare(b.label));
}

const ordinal = (k: number) => `${k}${k % 100 >= 11 && k % 100 <= 13 ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[k % 10] ?? 'th'}`;

/**
 * Mean time to the k-th escape (with the prediction's mean k-th escape time) and mean time between
 * consecutive escapes (j = k − 1), per done value. Means that are not positive and finite are left
 * out: the axis is logarithmic.
 */
export function timingSeries(points: readonly EscapePoint[]): TimingSeries[] {
  const pts = done(points);
  const ks = new Set<number>();
  for (const pt of pts) for (const t of pt.escapeTimes) ks.add(t.k);
  const positive = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v) && v > 0;
  const out: TimingSeries[] = [];
  for (const k of [...ks].sort((a, b) => a - b)) {
    const estimates: TimeEstimate[] = [];
    const predicted: { p: number; mean: number }[] = [];
    for (const pt of pts) {
      const t = pt.escapeTimes.find((x) => x.k === k);
      if (t && positive(t.mean) && t.count > 0) estimates.push({ p: pt.p, mean: t.mean, halfWidth: t.meanHalfWidth, count: t.count, median: t.median, q05: t.q05, q95: t.q95 });
      const m = pt.prediction?.meanKthEscape[k - 1];
      if (positive(m)) predicted.push({ p: pt.p, mean: m });
    }
    if (estimates.length || predicted.length) out.push({ kind: 'kth', k, j: null, label: `${ordinal(k)} escape`, estimates, predicted });
  }
  const pairs = new Map<string, { j: number; k: number }>();
  for (const pt of pts) for (const b of pt.between) if (b.k === b.j + 1) pairs.set(`${b.j}-${b.k}`, { j: b.j, k: b.k });
  for (const { j, k } of [...pairs.values()].sort((a, b) => a.j - b.j)) {
    const estimates: TimeEstimate[] = [];
    for (const pt of pts) {
      const b = pt.between.find((x) => x.j === j && x.k === k);
      if (b && positive(b.mean) && b.count > 0) estimates.push({ p: pt.p, mean: b.mean, halfWidth: null, count: b.count, median: null, q05: null, q95: null });
    }
    if (estimates.length) out.push({ kind: 'between', k, j, label: `${ordinal(j)} to ${ordinal(k)} escape`, estimates, predicted: [] });
  }
  return out;
}

/**
 * Empirical survival P(T_k > t) at the bin edges t_i = i·tMax/bins, from the stored histogram of the
 * k-th escape time and the number of paths: paths that never reached the k-th escape (capped) count
 * as surviving to tMax. S(t_i) = 1 − (Σ_{m<i} count_m) / paths, exact at the edges (the stored
 * histogram is the only record of the times, docs/noise.md "Rows").
 */
export function survivalFromHistogram(histogram: readonly number[], paths: number, tMax: number): { t: number; survival: number }[] {
  const bins = histogram.length;
  if (bins === 0 || paths <= 0 || !(tMax > 0)) return [];
  const out = [{ t: 0, survival: 1 }];
  let seen = 0;
  for (let i = 0; i < bins; i++) {
    seen += histogram[i];
    out.push({ t: ((i + 1) * tMax) / bins, survival: 1 - seen / paths });
  }
  return out;
}

/** Parameter values of the done points (the axis the three charts share). */
export function studyValues(points: readonly EscapePoint[]): number[] {
  return done(points).map((pt) => pt.p);
}
