/** Axis ticks from d3-scale: nice round values for the current domain. */
import { scaleLinear } from 'd3';

export interface Tick { readonly value: number; readonly pos: number; readonly label: string }

export interface LinearAxis {
  readonly domain: [number, number];
  readonly range: [number, number];
  readonly ticks: Tick[];
  /** Maps a data value to the range. */
  readonly map: (v: number) => number;
}

/**
 * A linear axis over [d0, d1] → [r0, r1] with about `count` ticks at 1, 2 or 5 × 10^k steps
 * (d3-scale's ticks). With nice = true the domain is widened to the enclosing tick values, as for a
 * static figure; a zoomed view keeps its exact domain (nice = false). A zero-width domain is widened by
 * ±0.5 (or ±5 % of its magnitude) so the axis stays drawable.
 */
export function linearAxis(domain: readonly [number, number], range: readonly [number, number], count = 6, nice = false): LinearAxis {
  let [d0, d1] = domain;
  if (!Number.isFinite(d0) || !Number.isFinite(d1)) { d0 = 0; d1 = 1; }
  if (d0 === d1) {
    const pad = d0 === 0 ? 0.5 : Math.abs(d0) * 0.05;
    d0 -= pad; d1 += pad;
  }
  const scale = scaleLinear().domain([d0, d1]).range([range[0], range[1]]);
  if (nice) scale.nice(count);
  const values = scale.ticks(count);
  const fmt = scale.tickFormat(count);
  const [n0, n1] = scale.domain() as [number, number];
  return {
    domain: [n0, n1],
    range: [range[0], range[1]],
    ticks: values.map((value) => ({ value, pos: scale(value), label: fmt(value).replace('−', '-') === '-0' ? '0' : fmt(value) })),
    map: (v: number) => scale(v),
  };
}

/** Integer ticks only, labelled without decimals, for counts such as the number of tipped nodes. */
export function integerTicks(axis: LinearAxis): Tick[] {
  return axis.ticks.filter((t) => Number.isInteger(t.value)).map((t) => ({ ...t, label: String(t.value) }));
}

/** A number printed with `digits` significant digits, for tooltips and tables. */
export function formatValue(v: number, digits = 6): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e6) return String(Number(v.toPrecision(digits)));
  return v.toExponential(digits - 1);
}
