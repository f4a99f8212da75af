/**
 * The views of an escape study as charts (escape-chart.ts): exit barriers out of the start state,
 * escape-order probabilities (Monte Carlo points with Wilson 95 % intervals, weak-noise prediction
 * as lines), mean escape times on a log axis, and the survival curves at one parameter value. Every
 * readout states the exact stored numbers (docs/noise.md, "Views of an escape study").
 */
import type { EscapePoint } from '../server/escapes/rows';
import { buildChart, seriesStyle, type ChartFigure, type ChartSeries } from './escape-chart';
import {
  barrierSeries, exitSwitchMarks, sequenceSeries, survivalFromHistogram, timingSeries, type EscapeStudyInfo,
} from './escape-series';
import type { PlotPalette } from './palette';
import { provenanceLine, type Provenance } from './provenance';
import { formatValue } from './ticks';

export type EscapeChartKind = 'barriers' | 'sequences' | 'timing' | 'survival';

/** Orders drawn at most in the sequence chart; the others are named in a note (all are in the data). */
export const MAX_DRAWN_ORDERS = 6;

export interface EscapeProvenance extends Provenance {
  readonly noise: number | null;
  readonly paths: number | null;
  readonly seed: number | null;
  readonly start: string | null;
}

/** The footer of an exported escape chart: the diagram's provenance line, then the study's settings. */
export function escapeFooter(p: EscapeProvenance): string[] {
  const parts = [
    p.noise !== null ? `noise level ${p.noise}` : null,
    p.paths !== null ? `${p.paths} paths per value` : null,
    p.seed !== null ? `seed ${p.seed}` : null,
    p.start ? `start ${p.start}` : null,
  ].filter(Boolean);
  return [provenanceLine(p), `Escape study: ${parts.join(' · ')}`];
}

export interface EscapeChartOptions {
  readonly width?: number;
  readonly plotHeight?: number;
  readonly palette?: PlotPalette;
  readonly dark?: boolean;
  readonly caption?: string;
  readonly provenance?: EscapeProvenance;
  readonly xLabel?: string;
  readonly yLabel?: string;
  /** The survival chart's parameter value. */
  readonly at?: number;
}

type Bands = { from: number; to: number; regime: 'weak' | 'intermediate' | 'strong' }[];

/** Regime bands from the study's band edges (pairs of from/to per regime, as compute.ts stores them). */
export function bandsFromEdges(edges: readonly unknown[]): Bands {
  const out: Bands = [];
  let open: { p: number; regime: string } | null = null;
  for (const raw of edges) {
    const e = raw as { p?: unknown; regime?: unknown; side?: unknown };
    if (typeof e.p !== 'number' || typeof e.regime !== 'string') continue;
    if (e.side === 'from') open = { p: e.p, regime: e.regime };
    else if (e.side === 'to' && open && open.regime === e.regime && ['weak', 'intermediate', 'strong'].includes(e.regime)) {
      out.push({ from: open.p, to: e.p, regime: e.regime as Bands[number]['regime'] });
      open = null;
    }
  }
  return out;
}

const f = (v: number | null | undefined, d = 4) => (v === null || v === undefined ? '—' : formatValue(v, d));

export interface EscapeStudyView {
  readonly points: readonly EscapePoint[];
  readonly study: (EscapeStudyInfo & { bandEdges?: readonly unknown[] }) | null;
  /** Parameter name (the study's, or the model's sweep while the study runs). */
  readonly parameter: string;
  readonly start: string;
}

export function barrierChart(v: EscapeStudyView, o: EscapeChartOptions = {}): ChartFigure {
  const par = v.parameter;
  const series: ChartSeries[] = barrierSeries(v.points, v.start).map((s, i) => ({
    label: `to ${s.label}`, ...seriesStyle(i), joinPoints: true,
    points: s.points.map((q) => ({
      x: q.p, y: q.barrier,
      readout: [
        `${v.start} → ${s.label} at ${par} = ${formatValue(q.p)}`,
        `exit barrier ${formatValue(q.barrier)} (units of level²)`,
        `prefactor ${f(q.prefactor)}, log rate ${f(q.logRate)}`,
        ...(q.crossings.length ? [`thresholds crossed: ${q.crossings.map((g) => g.join(' + ')).join(', then ')}`] : []),
      ],
    })),
  }));
  const vmarks = exitSwitchMarks(v.study ? { ...v.study, start: v.start } : null).map((s) => ({
    x: s.p, y: s.barrier, label: 'exit switch',
    readout: [`exit switch at ${par} = ${formatValue(s.p)}`, `barrier ${formatValue(s.barrier)} (level²) through both saddles`, `${s.saddles[0]} / ${s.saddles[1]}`],
  }));
  return buildChart({
    title: `Exit barriers out of ${v.start} against ${par}`,
    xLabel: o.xLabel ?? `parameter ${par}`, yLabel: o.yLabel ?? 'exit barrier (level²)',
    note: `Barriers in units of the noise level squared; escape rates go like exp(−barrier / level²). From ${v.start}.`,
    series, vmarks, bands: bandsFromEdges(v.study?.bandEdges ?? []), ...common(o, v),
  });
}

export function sequenceChart(v: EscapeStudyView, o: EscapeChartOptions = {}): ChartFigure {
  const par = v.parameter;
  const all = sequenceSeries(v.points);
  const drawn = all.slice(0, MAX_DRAWN_ORDERS);
  const rest = all.slice(MAX_DRAWN_ORDERS);
  const series: ChartSeries[] = drawn.map((s, i) => ({
    label: s.label, ...seriesStyle(i), dashed: true,
    line: s.predicted.map((q) => ({ x: q.p, y: q.probability })),
    points: s.estimates.map((e) => {
      const pr = s.predicted.find((q) => q.p === e.p);
      return {
        x: e.p, y: e.probability, low: e.low, high: e.high,
        readout: [
          `${s.label} at ${par} = ${formatValue(e.p)}`,
          `Monte Carlo ${formatValue(e.probability, 4)} (95 % interval ${formatValue(e.low, 4)} to ${formatValue(e.high, 4)})`,
          `${e.count} of ${e.paths} paths`,
          `weak-noise prediction ${pr ? formatValue(pr.probability, 4) : '—'}`,
        ],
      };
    }),
  }));
  return buildChart({
    title: `Probability of each escape order against ${par}`,
    xLabel: o.xLabel ?? `parameter ${par}`, yLabel: o.yLabel ?? 'probability of the order',
    series, yDomain: [0, 1], bands: bandsFromEdges(v.study?.bandEdges ?? []), dodge: 5,
    note: `Points: Monte Carlo share of paths with 95 % Wilson intervals; dashed lines: weak-noise prediction.${rest.length ? ` ${rest.length} rarer order${rest.length === 1 ? '' : 's'} not drawn (${rest.slice(0, 4).map((s) => s.label).join('; ')}${rest.length > 4 ? '; …' : ''}); the CSV and JSON hold all.` : ''}`,
    ...common(o, v),
  });
}

export function timingChart(v: EscapeStudyView, o: EscapeChartOptions = {}): ChartFigure {
  const par = v.parameter;
  const series: ChartSeries[] = timingSeries(v.points).map((s, i) => ({
    label: s.kind === 'kth' ? `mean time to the ${s.label}` : `mean time from the ${s.label}`,
    ...seriesStyle(i), dashed: true,
    line: s.predicted.map((q) => ({ x: q.p, y: q.mean })),
    points: s.estimates.map((e) => {
      const pr = s.predicted.find((q) => q.p === e.p);
      const lo = e.halfWidth !== null && e.mean - e.halfWidth > 0 ? e.mean - e.halfWidth : null;
      return {
        x: e.p, y: e.mean, low: lo, high: lo !== null && e.halfWidth !== null ? e.mean + e.halfWidth : null,
        readout: [
          `${s.kind === 'kth' ? 'time to the' : 'time from the'} ${s.label} at ${par} = ${formatValue(e.p)}`,
          `mean ${formatValue(e.mean, 5)}${e.halfWidth !== null ? ` ± ${formatValue(e.halfWidth, 3)} (95 %)` : ''} over ${e.count} paths`,
          ...(e.median !== null ? [`median ${f(e.median, 5)}, 5 % to 95 %: ${f(e.q05, 4)} to ${f(e.q95, 4)}`] : []),
          ...(s.kind === 'kth' ? [`weak-noise prediction ${pr ? formatValue(pr.mean, 5) : '—'}`] : []),
        ],
      };
    }),
  }));
  return buildChart({
    title: `Mean escape times against ${par}`,
    xLabel: o.xLabel ?? `parameter ${par}`, yLabel: o.yLabel ?? 'mean time (log scale)',
    note: 'Points: Monte Carlo means with the 95 % interval of the mean; dashed lines: weak-noise prediction of the mean k-th escape time.',
    series, yLog: true, dodge: 5, bands: bandsFromEdges(v.study?.bandEdges ?? []), ...common(o, v),
  });
}

/** Survival P(T_k > t) of every k at the parameter value `at` (the done point nearest to it). */
export function survivalChart(v: EscapeStudyView, o: EscapeChartOptions = {}): ChartFigure | null {
  const pts = v.points.filter((pt) => pt.status === 'done' && pt.tMax !== null);
  if (!pts.length) return null;
  const par = v.parameter;
  const at = o.at ?? pts[0].p;
  const pt = pts.reduce((a, b) => (Math.abs(b.p - at) < Math.abs(a.p - at) ? b : a));
  const curves = pt.escapeTimes.map((t) => survivalFromHistogram(t.histogram, pt.paths, pt.tMax!));
  // Up to the first bin edge where every curve is below 0.5 % (the rest of [0, tMax] is empty), at least two bins.
  const edges = curves[0]?.map((c) => c.t) ?? [];
  const last = edges.findIndex((_, i) => curves.every((c) => (c[i]?.survival ?? 0) <= 0.005));
  const tEnd = last > 0 ? edges[Math.min(edges.length - 1, Math.max(2, last + 1))] : pt.tMax!;
  const series: ChartSeries[] = pt.escapeTimes.map((t, i) => {
    const curve = curves[i].filter((c) => c.t <= tEnd);
    return {
      label: `before escape ${t.k}`, ...seriesStyle(i), joinPoints: true,
      points: curve.map((c) => ({ x: c.t, y: c.survival, readout: [`at ${par} = ${formatValue(pt.p)}, t = ${formatValue(c.t, 4)}`, `share of paths before escape ${t.k}: ${formatValue(c.survival, 4)}`, `${pt.paths} paths, bins of ${formatValue(pt.tMax! / Math.max(1, t.histogram.length), 4)}`] })),
    };
  });
  return buildChart({
    title: `Share of paths still waiting for each escape at ${par} = ${formatValue(pt.p)}`,
    xLabel: o.xLabel ?? 'time t', yLabel: o.yLabel ?? 'share of paths not yet escaped',
    series, yDomain: [0, 1], xDomain: [0, tEnd], ...common(o, v),
  });
}

function common(o: EscapeChartOptions, _v: EscapeStudyView) {
  return {
    width: o.width, plotHeight: o.plotHeight, palette: o.palette, dark: o.dark, caption: o.caption,
    footer: o.provenance ? escapeFooter(o.provenance) : undefined,
  };
}

export function escapeChart(kind: EscapeChartKind, v: EscapeStudyView, o: EscapeChartOptions = {}): ChartFigure | null {
  switch (kind) {
    case 'barriers': return barrierChart(v, o);
    case 'sequences': return sequenceChart(v, o);
    case 'timing': return timingChart(v, o);
    case 'survival': return survivalChart(v, o);
  }
}
