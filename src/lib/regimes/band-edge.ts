import type { Regime, RegimeBand, StartState } from './types';

/** What a band's edge is, read from its `bounds` text (see RegimeBand.bounds). */
export type BandEdgeKind = 'special point' | 'saddle connection' | 'engagement crossover' | 'label undefined' | 'sweep bound';

const LOCATED = ['saddle connection', 'engagement crossover', 'label undefined'] as const;

/** 'sweep-bound' -> sweep bound; 'saddle connection: ...' -> saddle connection; special-point types -> special point. */
export function bandEdgeKind(bound: string): BandEdgeKind {
  if (bound === 'sweep-bound') return 'sweep bound';
  const colon = bound.indexOf(':');
  const head = colon > 0 ? bound.slice(0, colon) : '';
  return (LOCATED as readonly string[]).includes(head) ? (head as BandEdgeKind) : 'special point';
}

/** Whether the edge was located by bisection (a crossover), not a special point or a sweep end. */
export const isLocatedEdge = (bound: string): boolean => {
  const k = bandEdgeKind(bound);
  return k === 'saddle connection' || k === 'engagement crossover';
};

/** The located crossovers at band edges, from the bands alone: p, kind and the words of `bounds`. */
export function locatedBandEdges(bands: readonly RegimeBand[]): { p: number; kind: BandEdgeKind; text: string }[] {
  const out: { p: number; kind: BandEdgeKind; text: string }[] = [];
  const seen = new Set<string>();
  for (const b of bands) {
    for (const [p, bound] of [[b.from, b.bounds[0]], [b.to, b.bounds[1]]] as const) {
      if (bound === undefined || !isLocatedEdge(bound)) continue;
      const key = `${p}|${bound}`;
      if (seen.has(key)) continue;
      seen.add(key);
      out.push({ p, kind: bandEdgeKind(bound), text: bound });
    }
  }
  return out.sort((u, v) => u.p - v.p);
}

/** A stretch of the range with no band (the label is undefined there), and why in words. */
export interface UnlabelledStretch {
  readonly from: number;
  readonly to: number;
  readonly start: StartState;
  readonly reason: string;
}

/**
 * The stretches of [from, to] that no band of a start state covers, per start state present (all-base
 * when bands carry none). The reason is read off the neighbouring band's bound ("label undefined: no
 * label above: no way out of all-base found" gives "no way out of all-base found"); a stretch with no
 * such bound says so. Gaps narrower than 1e-12 (1 + |p|) are rounding between bands, not stretches.
 */
export function unlabelledStretches(bands: readonly RegimeBand[], from: number, to: number): UnlabelledStretch[] {
  const out: UnlabelledStretch[] = [];
  const starts = [...new Set(bands.map((b) => b.start ?? 'all-base'))];
  if (starts.length === 0) starts.push('all-base');
  for (const start of starts) {
    const own = bands.filter((b) => (b.start ?? 'all-base') === start).sort((u, v) => u.from - v.from);
    let at = from;
    let before: RegimeBand | undefined;
    const push = (lo: number, hi: number, next: RegimeBand | undefined) => {
      if (hi - lo <= 1e-12 * (1 + Math.abs(lo))) return;
      const why = undefinedReason(before?.bounds[1]) ?? undefinedReason(next?.bounds[0]);
      out.push({ from: lo, to: hi, start, reason: why ?? 'no label here (see the run’s diagnostics)' });
    };
    for (const b of own) {
      if (b.from > at) push(at, Math.min(b.from, to), b);
      at = Math.max(at, b.to);
      before = b;
    }
    if (at < to) push(at, to, undefined);
  }
  return out;
}

function undefinedReason(bound: string | undefined): string | null {
  if (!bound || bandEdgeKind(bound) !== 'label undefined') return null;
  return bound.replace(/^label undefined:\s*/, '').replace(/^no label (above|below):\s*/, '');
}

/**
 * unlabelledStretches over the range a diagram was traced on (its settings' `from` and `to`); a
 * diagram that does not record them gets only the gaps between bands, and no bands give none (a run
 * without regime analysis has nothing to explain).
 */
export function unlabelledInRun(bands: readonly RegimeBand[], settings: Readonly<Record<string, unknown>>): UnlabelledStretch[] {
  if (bands.length === 0) return [];
  const from = typeof settings.from === 'number' ? settings.from : Math.min(...bands.map((b) => b.from));
  const to = typeof settings.to === 'number' ? settings.to : Math.max(...bands.map((b) => b.to));
  return unlabelledStretches(bands, Math.min(from, to), Math.max(from, to));
}

/** One row of a band table: a band, or an unlabelled stretch (regime null) with its reason. */
export interface BandTableRow {
  readonly from: number;
  readonly to: number;
  readonly regime: Regime | null;
  readonly bounds: readonly string[];
  readonly reason: string;
}

/** Bands and unlabelled stretches in one list ordered by `from`, for the diagram's and the report's tables. */
export function bandTableRows(bands: readonly RegimeBand[], gaps: readonly UnlabelledStretch[]): BandTableRow[] {
  return [
    ...bands.map((b) => ({ from: b.from, to: b.to, regime: b.regime, bounds: b.bounds, reason: b.reason })),
    ...gaps.map((g) => ({ from: g.from, to: g.to, regime: null, bounds: [], reason: g.reason })),
  ].sort((u, v) => u.from - v.from);
}
