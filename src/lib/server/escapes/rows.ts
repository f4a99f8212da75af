/**
 * One parameter value of an escape study as one compact row (table escape_points) and back, and the
 * study as CSV. Pure: no database, so unit tests check the encoding (tests/lib/server/escapes/).
 * Arrays (sequence counts, time summaries with histogram bins, barriers, prediction) are small JSON
 * texts in their own columns, a few hundred bytes to a few kB per value; survival curves are not
 * stored (they follow from the histogram bins and the capped count up to the bin width), nor the
 * minimum-action paths (a browser view asks the engine for them when it draws a path picture).
 * Non-finite numbers (an infinite predicted time, an undefined mean) are stored and served as null.
 */
import type { EscapeReport } from '../../noise/escapes.ts';
import type { PredictedRate } from '../../noise/prediction.ts';
import type { Diagnostic } from '../../atlas/types.ts';

/** Finite numbers pass, anything else is null (JSON has no NaN or Infinity). */
const num = (v: number | null | undefined): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

export interface EscapeSequenceRow { order: string[]; count: number; probability: number; low: number; high: number }
export interface EscapeTimeRow {
  k: number; count: number; mean: number | null; meanHalfWidth: number | null; median: number | null; q05: number | null; q95: number | null;
  /** Equal bins over [0, tMax]: bin i is [i tMax / bins, (i + 1) tMax / bins). */
  histogram: number[];
}
export interface EscapeBarrierRow {
  /** The state left, the saddle crossed (by the states it joins), the state reached: node-id labels. */
  from: string; saddle: string; to: string;
  /** In units of noise level squared. */
  barrier: number | null;
  prefactor: number | null;
  logRate: number | null;
  /** Node ids passing their escape thresholds along the transition, groups crossing together. */
  crossings: string[][];
}
export interface EscapePredictionRow {
  prefactor: string;
  sequences: { order: string[]; probability: number | null }[];
  meanFirstEscape: number | null;
  meanKthEscape: (number | null)[];
  returnProbability: number | null;
}

/** A parameter value as the API serves it. */
export interface EscapePoint {
  index: number;
  p: number;
  status: 'done' | 'skipped';
  /** Why no study was possible at p (status 'skipped'). */
  reason: string | null;
  paths: number;
  dt: number | null;
  tMax: number | null;
  seed: number | null;
  nodeSteps: number;
  capped: number;
  returns: number;
  pathsWithReturns: number;
  sequences: EscapeSequenceRow[];
  escapeTimes: EscapeTimeRow[];
  between: { j: number; k: number; count: number; mean: number | null }[];
  prediction: EscapePredictionRow | null;
  barriers: EscapeBarrierRow[];
  stepCheck: Record<string, unknown> | null;
  estimate: { nodeSteps: number; stepsPerPath: number; basis: string } | null;
  diagnostics: { level: string; code: string; message: string }[];
  computeMs: number;
}

/** The escape_points row (column names) of one point; `cache_key` is added by the caller. */
export interface EscapePointDbRow {
  idx: number; p: number; status: 'done' | 'skipped'; reason: string | null; paths: number; dt: number | null; t_max: number | null;
  seed: number | null; node_steps: number; capped: number; returns: number; paths_with_returns: number;
  sequences: string; escape_times: string; between: string; prediction: string; barriers: string;
  step_check: string | null; estimate: string | null; diagnostics: string; compute_ms: number;
}

const diag = (d: readonly Diagnostic[]) => d.map((x) => ({ level: x.level, code: x.code, message: x.message }));

/** Labels of the escape graph's states and saddles, for the barrier rows (index -> label). */
export interface GraphLabels { states: string[]; saddles: string[] }

export function barrierRows(rates: readonly PredictedRate[], labels: GraphLabels): EscapeBarrierRow[] {
  return rates.map((r) => ({
    from: labels.states[r.from] ?? `state ${r.from}`,
    saddle: labels.saddles[r.saddle] ?? `saddle ${r.saddle}`,
    to: labels.states[r.to] ?? `state ${r.to}`,
    barrier: num(r.barrier),
    prefactor: num(r.prefactor),
    logRate: num(r.logRate),
    crossings: r.crossings.map((g) => [...g]),
  }));
}

/** A finished parameter value: the engine's report and the barrier rows. */
export function encodePoint(index: number, report: EscapeReport, barriers: EscapeBarrierRow[], computeMs: number): EscapePointDbRow {
  const times: EscapeTimeRow[] = report.escapeTimes.map((t) => ({
    k: t.k, count: t.count, mean: num(t.mean), meanHalfWidth: num(t.meanHalfWidth), median: num(t.median), q05: num(t.q05), q95: num(t.q95),
    histogram: [...t.histogram.counts],
  }));
  const prediction: EscapePredictionRow = {
    prefactor: report.prediction.prefactor,
    sequences: report.prediction.sequences.map((s) => ({ order: [...s.order], probability: num(s.probability) })),
    meanFirstEscape: num(report.prediction.meanFirstEscape),
    meanKthEscape: report.prediction.meanKthEscape.map(num),
    returnProbability: num(report.prediction.returnProbability),
  };
  return {
    idx: index, p: report.p, status: 'done', reason: null, paths: report.paths, dt: report.dt, t_max: report.tMax, seed: report.seed,
    node_steps: report.nodeSteps, capped: report.capped, returns: report.returns, paths_with_returns: report.pathsWithReturns,
    sequences: JSON.stringify(report.sequences.map((s) => ({ order: [...s.order], count: s.count, probability: s.probability, low: s.low, high: s.high }))),
    escape_times: JSON.stringify(times),
    between: JSON.stringify(report.between.map((b) => ({ j: b.j, k: b.k, count: b.count, mean: num(b.mean) }))),
    prediction: JSON.stringify(prediction),
    barriers: JSON.stringify(barriers),
    step_check: report.stepCheck ? JSON.stringify(report.stepCheck, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v)) : null,
    estimate: JSON.stringify(report.estimate),
    diagnostics: JSON.stringify(diag(report.diagnostics)),
    compute_ms: Math.round(computeMs),
  };
}

/** A parameter value where no study was possible (no escape graph, no start state): kept in its place with the reason. */
export function encodeSkipped(index: number, p: number, reason: string): EscapePointDbRow {
  return {
    idx: index, p, status: 'skipped', reason: reason.slice(0, 500), paths: 0, dt: null, t_max: null, seed: null, node_steps: 0, capped: 0,
    returns: 0, paths_with_returns: 0, sequences: '[]', escape_times: '[]', between: '[]', prediction: 'null', barriers: '[]',
    step_check: null, estimate: null, diagnostics: '[]', compute_ms: 0,
  };
}

const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v ?? null);

/** The API's shape of a stored row (as mysql2 returns it). */
export function decodePoint(r: Record<string, any>): EscapePoint {
  return {
    index: Number(r.idx), p: Number(r.p), status: r.status, reason: r.reason ?? null, paths: Number(r.paths),
    dt: r.dt === null ? null : Number(r.dt), tMax: r.t_max === null ? null : Number(r.t_max), seed: r.seed === null ? null : Number(r.seed),
    nodeSteps: Number(r.node_steps), capped: Number(r.capped), returns: Number(r.returns), pathsWithReturns: Number(r.paths_with_returns),
    sequences: parse(r.sequences) ?? [], escapeTimes: parse(r.escape_times) ?? [], between: parse(r.between) ?? [],
    prediction: parse(r.prediction), barriers: parse(r.barriers) ?? [], stepCheck: parse(r.step_check), estimate: parse(r.estimate),
    diagnostics: parse(r.diagnostics) ?? [], computeMs: Number(r.compute_ms),
  };
}

const cell = (v: unknown): string => {
  if (v === null || v === undefined) return '';
  const s = typeof v === 'number' ? String(v) : String(v);
  return /[",\n#]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};

export const ESCAPE_CSV_COLUMNS = ['record', 'p', 'item', 'count', 'value', 'low', 'high', 'median', 'q05', 'q95', 'predicted'] as const;

/**
 * The study as one long CSV table, one line per fact, after a block of '#' provenance lines:
 * record 'value' (p, paths in count, capped in value, status and reason in item), 'sequence' (item:
 * the order as ids joined by '>', count, value = probability, low/high = Wilson 95 %, predicted =
 * weak-noise probability), 'time' (item 'k=1', count, value = mean, low/high = mean -/+ half-width,
 * median, q05, q95, predicted = weak-noise mean), 'histogram' (item 'k=1 bin 3', count, low/high = the bin's time range),
 * 'barrier' (item 'state -> via saddle -> state', value = barrier / level^2, predicted = prefactor).
 */
export function escapesToCsv(points: readonly EscapePoint[], provenance: Record<string, string | number>): string {
  const lines: string[] = ['# Brinkmap escape study data'];
  for (const [k, v] of Object.entries(provenance)) lines.push(`# ${k}: ${String(v).replace(/\n/g, ' ')}`);
  lines.push('# Model results are indicative; defer to domain experts and local regulation.');
  lines.push(ESCAPE_CSV_COLUMNS.join(','));
  const row = (...cells: unknown[]) => lines.push(cells.map(cell).join(','));
  for (const pt of points) {
    row('value', pt.p, pt.status === 'done' ? 'done' : `skipped: ${pt.reason ?? ''}`, pt.paths, pt.capped, '', '', '', '', '', '');
    const predicted = new Map((pt.prediction?.sequences ?? []).map((s) => [s.order.join('>'), s.probability]));
    const seen = new Set<string>();
    for (const s of pt.sequences) {
      const key = s.order.join('>');
      seen.add(key);
      row('sequence', pt.p, key, s.count, s.probability, s.low, s.high, '', '', '', predicted.get(key) ?? '');
    }
    for (const [key, prob] of predicted) if (!seen.has(key)) row('sequence', pt.p, key, 0, 0, '', '', '', '', '', prob);
    for (const t of pt.escapeTimes) {
      const half = t.meanHalfWidth;
      row('time', pt.p, `k=${t.k}`, t.count, t.mean, t.mean !== null && half !== null ? t.mean - half : '', t.mean !== null && half !== null ? t.mean + half : '',
        t.median, t.q05, t.q95, pt.prediction?.meanKthEscape[t.k - 1] ?? '');
    }
    for (const t of pt.escapeTimes) {
      const bins = t.histogram.length;
      t.histogram.forEach((c, i) => {
        const a = pt.tMax !== null ? (pt.tMax * i) / bins : i;
        const b = pt.tMax !== null ? (pt.tMax * (i + 1)) / bins : i + 1;
        row('histogram', pt.p, `k=${t.k} bin ${i + 1}`, c, '', a, b, '', '', '', '');
      });
    }
    for (const b of pt.barriers) row('barrier', pt.p, `${b.from} -> via ${b.saddle} -> ${b.to}`, '', b.barrier, '', '', '', '', '', b.prefactor ?? '');
  }
  return `${lines.join('\n')}\n`;
}
