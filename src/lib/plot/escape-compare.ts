/**
 * Two to four escape studies on one parameter axis (the compare page, docs/noise.md "Views of an
 * escape study"): the probability of each escape order, the mean time to the first escape and the
 * lowest exit barrier out of the start state, one series per study (and order). Colour follows the
 * order, marker shape the study, so a reader tells both apart without colour.
 */
import type { EscapePoint } from '../server/escapes/rows';
import { buildChart, MARKER_SHAPES, type ChartFigure, type ChartSeries } from './escape-chart';
import { escapeFooter, type EscapeChartOptions, type EscapeProvenance } from './escape-charts';
import { barrierSeries, sequenceSeries, timingSeries } from './escape-series';
import { formatValue } from './ticks';

export interface ComparedStudy {
  /** "run 12". */
  readonly label: string;
  readonly parameter: string;
  readonly start: string;
  readonly noise: number | null;
  readonly points: readonly EscapePoint[];
  readonly provenance: EscapeProvenance;
}

export type EscapeCompareKind = 'sequences' | 'first-escape' | 'lowest-barrier';

/** Orders drawn when studies are compared: fewer than for one study, each appears once per study. */
export const MAX_COMPARED_ORDERS = 4;

/** The orders drawn: the likeliest over all studies (largest estimated share anywhere), at most `max`. */
export function sharedOrders(studies: readonly ComparedStudy[], max = MAX_COMPARED_ORDERS): string[] {
  const best = new Map<string, number>();
  for (const s of studies) {
    for (const q of sequenceSeries(s.points)) {
      const top = Math.max(0, ...q.estimates.map((e) => e.probability));
      best.set(q.label, Math.max(best.get(q.label) ?? 0, top));
    }
  }
  return [...best.entries()].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0])).slice(0, max).map(([k]) => k);
}

/** Lowest finite exit barrier out of the start state at every done value of a study. */
export function lowestBarrier(points: readonly EscapePoint[], start: string): { p: number; barrier: number; to: string }[] {
  const out = new Map<number, { p: number; barrier: number; to: string }>();
  for (const s of barrierSeries(points, start)) {
    for (const q of s.points) {
      const old = out.get(q.p);
      if (!old || q.barrier < old.barrier) out.set(q.p, { p: q.p, barrier: q.barrier, to: s.label });
    }
  }
  return [...out.values()].sort((a, b) => a.p - b.p);
}

const shape = (k: number) => MARKER_SHAPES[k % MARKER_SHAPES.length];

export function compareChart(kind: EscapeCompareKind, studies: readonly ComparedStudy[], o: EscapeChartOptions = {}): ChartFigure {
  const par = studies[0]?.parameter ?? 'parameter';
  // With a provenance (the export's footer switch on) the footer names every study compared.
  const footer = o.provenance ? studies.flatMap((s) => escapeFooter(s.provenance)) : undefined;
  const series: ChartSeries[] = [];
  let title = '', yLabel = '', yLog = false, yDomain: [number, number] | undefined, note = '';
  if (kind === 'sequences') {
    const orders = sharedOrders(studies);
    for (const [k, st] of studies.entries()) {
      const all = sequenceSeries(st.points);
      for (const [i, label] of orders.entries()) {
        const s = all.find((x) => x.label === label);
        if (!s) continue;
        series.push({
          label: `${st.label}: ${label}`, colour: i, shape: shape(k), dashed: k > 0,
          line: s.predicted.map((q) => ({ x: q.p, y: q.probability })),
          points: s.estimates.map((e) => ({
            x: e.p, y: e.probability, low: e.low, high: e.high,
            readout: [`${st.label}: ${label} at ${par} = ${formatValue(e.p)}`, `Monte Carlo ${formatValue(e.probability, 4)} (95 % interval ${formatValue(e.low, 4)} to ${formatValue(e.high, 4)})`, `${e.count} of ${e.paths} paths`],
          })),
        });
      }
    }
    title = `Escape orders of ${studies.map((s) => s.label).join(', ')} against ${par}`;
    yLabel = 'probability of the order'; yDomain = [0, 1];
    const more = new Set(studies.flatMap((st) => sequenceSeries(st.points).map((q) => q.label))).size - orders.length;
    note = (more > 0 ? `The ${orders.length} likeliest orders; ${more} more in the data. ` : '') + 'Colour: the order; marker: the study. Points: Monte Carlo with 95 % intervals; lines: weak-noise prediction (solid for the first study, dashed for the others).';
  } else if (kind === 'first-escape') {
    for (const [k, st] of studies.entries()) {
      const first = timingSeries(st.points).find((s) => s.kind === 'kth' && s.k === 1);
      if (!first) continue;
      series.push({
        label: `${st.label}${st.noise !== null ? ` (noise ${st.noise})` : ''}`, colour: k, shape: shape(k), dashed: true,
        line: first.predicted.map((q) => ({ x: q.p, y: q.mean })),
        points: first.estimates.map((e) => {
          const lo = e.halfWidth !== null && e.mean - e.halfWidth > 0 ? e.mean - e.halfWidth : null;
          return { x: e.p, y: e.mean, low: lo, high: lo !== null ? e.mean + e.halfWidth! : null,
            readout: [`${st.label}: first escape at ${par} = ${formatValue(e.p)}`, `mean ${formatValue(e.mean, 5)}${e.halfWidth !== null ? ` ± ${formatValue(e.halfWidth, 3)} (95 %)` : ''} over ${e.count} paths`] };
        }),
      });
    }
    title = `Mean time to the first escape against ${par}`;
    yLabel = 'mean first escape time (log scale)'; yLog = true;
    note = 'Points: Monte Carlo means with the 95 % interval of the mean; dashed: weak-noise prediction.';
  } else {
    for (const [k, st] of studies.entries()) {
      const low = lowestBarrier(st.points, st.start);
      series.push({
        label: st.label, colour: k, shape: shape(k), joinPoints: true,
        points: low.map((q) => ({ x: q.p, y: q.barrier, readout: [`${st.label}: lowest exit out of ${st.start} at ${par} = ${formatValue(q.p)}`, `barrier ${formatValue(q.barrier)} (level²), towards ${q.to}`] })),
      });
    }
    title = `Lowest exit barrier out of the start state against ${par}`;
    yLabel = 'lowest exit barrier (level²)';
    note = 'Barriers in units of each study\'s noise level squared; the same model and noise weights give the same barriers.';
  }
  return buildChart({
    title, xLabel: o.xLabel ?? `parameter ${par}`, yLabel: o.yLabel ?? yLabel, series, yLog, yDomain, note, dodge: kind === 'sequences' ? 3 : 5,
    width: o.width, plotHeight: o.plotHeight, palette: o.palette, dark: o.dark, caption: o.caption,
    footer,
  });
}
