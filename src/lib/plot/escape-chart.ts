/**
 * A small chart of series against the parameter as a Figure (figure.ts primitives), so the screen,
 * SVG, PNG and PDF draw the same thing (svg.ts, the export menu's pdf-draw.ts). Used by the views of
 * an escape study (escape-charts.ts). Points carry a readout and a data-mark attribute; intervals
 * are bars with caps; series differ in colour AND marker shape (nothing relies on colour alone).
 * Layers, back to front: plot frame, regime bands, grid, vertical marks, intervals, lines, points,
 * axes, legend, caption, provenance footer.
 */
import { scaleLog } from 'd3';
import { wrapText, type Figure, type Prim } from './figure';
import { PAPER_PALETTE, type PlotPalette } from './palette';
import { linearAxis, type Tick } from './ticks';
import { drawAxes, r2 } from './figure';

export type MarkerShape = 'circle' | 'square' | 'triangle' | 'diamond' | 'down' | 'hexagon';
export const MARKER_SHAPES: readonly MarkerShape[] = ['circle', 'square', 'triangle', 'diamond', 'down', 'hexagon'];

/**
 * Colour and marker of the i-th series: six colours, six shapes, the shape shifted by one every six
 * series, so that the first 36 series all differ in colour or shape.
 */
export function seriesStyle(i: number): { colour: number; shape: MarkerShape } {
  return { colour: i % 6, shape: MARKER_SHAPES[(i + Math.floor(i / 6)) % MARKER_SHAPES.length] };
}

/** Series colours of the charts (invented; light on the paper set, dark on the night set). */
export const SERIES_LIGHT = ['#1f5f8b', '#b0243f', '#1f6f5c', '#7a4d06', '#5a3f9e', '#4a4f57'] as const;
export const SERIES_DARK = ['#8fc6ea', '#ff7d93', '#5fd3b4', '#f1c97a', '#b9a5ff', '#c5cad1'] as const;

export interface ChartPoint {
  readonly x: number;
  readonly y: number;
  readonly low?: number | null;
  readonly high?: number | null;
  /** Lines of the readout (hover, focus, click). */
  readonly readout: readonly string[];
}

export interface ChartSeries {
  readonly label: string;
  readonly colour: number;
  readonly shape: MarkerShape;
  /** Estimates as points (with interval bars when low/high are given). */
  readonly points: readonly ChartPoint[];
  /** A line through these (x, y), e.g. the weak-noise prediction; dashed when `dashed`. */
  readonly line?: readonly { x: number; y: number }[];
  readonly dashed?: boolean;
  /** Points joined by a thin line as well (barriers: one curve per saddle). */
  readonly joinPoints?: boolean;
}

export interface ChartVMark { readonly x: number; readonly y?: number; readonly label: string; readonly readout: readonly string[] }

export interface ChartInput {
  readonly title: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly series: readonly ChartSeries[];
  readonly xDomain?: readonly [number, number];
  readonly yDomain?: readonly [number, number];
  readonly yLog?: boolean;
  /** Vertical marks (exit switches), with a diamond at y when given. */
  readonly vmarks?: readonly ChartVMark[];
  readonly bands?: readonly { from: number; to: number; regime: 'weak' | 'intermediate' | 'strong' }[];
  readonly width?: number;
  readonly plotHeight?: number;
  readonly palette?: PlotPalette;
  readonly dark?: boolean;
  readonly caption?: string;
  /** Footer lines (provenance), printed small under the legend with the indicative note. */
  readonly footer?: readonly string[];
  /**
   * Pixels between the points of neighbouring series at one x, so that points and intervals of
   * several series at the same parameter value stay apart (the readout keeps the exact x). Default 0.
   */
  readonly dodge?: number;
  /** A note printed under the legend (what points and lines are; orders not drawn). */
  readonly note?: string;
}

/** A focusable mark of the chart: where it is and what its readout says. */
export interface ChartMark {
  readonly id: string;
  readonly kind: 'point' | 'vmark';
  readonly series: number;
  /** The data value on the horizontal axis (the parameter value, or the time of a survival chart). */
  readonly x: number;
  readonly cx: number;
  readonly cy: number;
  readonly label: string;
  readonly readout: readonly string[];
}

export interface ChartFigure extends Figure { readonly marks: ChartMark[] }


/** Path of a marker of `shape` centred at (cx, cy) within radius r. */
export function shapePath(shape: MarkerShape, cx: number, cy: number, r: number): string {
  const poly = (pts: [number, number][]) => 'M' + pts.map(([x, y]) => `${r2(x)},${r2(y)}`).join('L') + 'Z';
  switch (shape) {
    case 'circle': return `M${r2(cx - r)},${r2(cy)}A${r2(r)},${r2(r)} 0 1 0 ${r2(cx + r)},${r2(cy)}A${r2(r)},${r2(r)} 0 1 0 ${r2(cx - r)},${r2(cy)}Z`;
    case 'square': { const a = r * 0.82; return poly([[cx - a, cy - a], [cx + a, cy - a], [cx + a, cy + a], [cx - a, cy + a]]); }
    case 'triangle': return poly([[cx, cy - r], [cx + r * 0.92, cy + r * 0.68], [cx - r * 0.92, cy + r * 0.68]]);
    case 'down': return poly([[cx, cy + r], [cx + r * 0.92, cy - r * 0.68], [cx - r * 0.92, cy - r * 0.68]]);
    case 'diamond': return poly([[cx, cy - r], [cx + r, cy], [cx, cy + r], [cx - r, cy]]);
    case 'hexagon': return poly(Array.from({ length: 6 }, (_, k) => [cx + r * Math.cos((Math.PI / 3) * k), cy + r * Math.sin((Math.PI / 3) * k)] as [number, number]));
  }
}

/**
 * A base-10 logarithmic axis over [d0, d1] (both > 0) → [r0, r1], widened to whole decades, ticks at
 * the decades (and at 2 and 5 × 10^k when it spans at most three decades), from d3-scale's scaleLog.
 */
export function logAxis(domain: readonly [number, number], range: readonly [number, number]): { domain: [number, number]; ticks: Tick[]; map: (v: number) => number } {
  let [d0, d1] = domain;
  if (!(d0 > 0) || !(d1 > 0) || !Number.isFinite(d0) || !Number.isFinite(d1)) { d0 = 1; d1 = 10; }
  if (d0 > d1) [d0, d1] = [d1, d0];
  const lo = 10 ** Math.floor(Math.log10(d0));
  let hi = 10 ** Math.ceil(Math.log10(d1));
  if (hi <= lo) hi = lo * 10;
  const scale = scaleLog().domain([lo, hi]).range([range[0], range[1]]);
  const decades = Math.round(Math.log10(hi / lo));
  const values = scale.ticks().filter((v) => {
    const m = v / 10 ** Math.floor(Math.log10(v) + 1e-9);
    const lead = Math.round(m);
    return lead === 1 || (decades <= 3 && (lead === 2 || lead === 5));
  });
  const label = (v: number) => (v >= 1e-3 && v < 1e5 ? String(Number(v.toPrecision(6))) : v.toExponential(0).replace('e+', 'e'));
  return { domain: [lo, hi], ticks: values.map((value) => ({ value, pos: scale(value), label: label(value) })), map: (v: number) => scale(v) };
}

/** The chart as a Figure with its focusable marks. */
export function buildChart(input: ChartInput): ChartFigure {
  const pal = input.palette ?? PAPER_PALETTE;
  const colours = input.dark ? SERIES_DARK : SERIES_LIGHT;
  const width = input.width ?? 720;
  const plotH = input.plotHeight ?? 300;
  const m = { left: 72, right: 18, top: 26, bottom: 46 };
  const plot = { x: m.left, y: m.top, w: Math.max(120, width - m.left - m.right), h: plotH };

  const xs: number[] = [], ys: number[] = [];
  for (const s of input.series) {
    for (const p of s.points) { xs.push(p.x); ys.push(p.y); if (p.low != null) ys.push(p.low); if (p.high != null) ys.push(p.high); }
    for (const p of s.line ?? []) { xs.push(p.x); ys.push(p.y); }
  }
  for (const v of input.vmarks ?? []) { xs.push(v.x); if (v.y !== undefined) ys.push(v.y); }
  const ext = (v: number[], fallback: [number, number]): [number, number] => (v.length ? [Math.min(...v), Math.max(...v)] : fallback);
  let xd = input.xDomain ?? ext(xs, [0, 1]);
  if (!input.xDomain) { const s = (xd[1] - xd[0]) || Math.abs(xd[0]) * 0.1 || 1; xd = [xd[0] - 0.05 * s, xd[1] + 0.05 * s]; }
  const xTickCount = Math.max(3, Math.min(7, Math.round(plot.w / 70)));
  const px = linearAxis(xd, [plot.x, plot.x + plot.w], xTickCount, false);
  const X = px.map;
  let Y: (v: number) => number;
  let yTicks: Tick[];
  if (input.yLog) {
    const pos = ys.filter((v) => v > 0);
    const ax = logAxis(input.yDomain ?? ext(pos, [1, 10]), [plot.y + plot.h, plot.y]);
    Y = ax.map; yTicks = ax.ticks;
  } else {
    let yd = input.yDomain ?? ext(ys, [0, 1]);
    if (!input.yDomain) { const s = (yd[1] - yd[0]) || 1; yd = [Math.min(0, yd[0]), yd[1] + 0.06 * s]; }
    const ax = linearAxis(yd, [plot.y + plot.h, plot.y], 6, !input.yDomain);
    Y = ax.map; yTicks = ax.ticks;
  }
  const yClamp = (v: number) => Math.max(plot.y - 4, Math.min(plot.y + plot.h + 4, Y(v)));
  const items: Prim[] = [];
  const marks: ChartMark[] = [];

  items.push({ t: 'rect', x: plot.x, y: plot.y, w: plot.w, h: plot.h, fill: pal.paper, stroke: pal.grid, strokeWidth: 1 });
  for (const b of input.bands ?? []) {
    const x0 = Math.max(plot.x, X(Math.min(b.from, b.to))), x1 = Math.min(plot.x + plot.w, X(Math.max(b.from, b.to)));
    if (x1 <= x0) continue;
    items.push({ t: 'rect', x: r2(x0), y: plot.y, w: r2(x1 - x0), h: plot.h, fill: pal.band[b.regime], clip: true, data: { layer: 'band', regime: b.regime } });
    if (x1 - x0 > 40) items.push({ t: 'text', x: r2((x0 + x1) / 2), y: plot.y + 13, text: x1 - x0 > 130 ? `${b.regime} coupling` : b.regime, size: 9.5, weight: 600, anchor: 'middle', fill: pal.bandInk[b.regime], clip: true });
  }
  for (const t of px.ticks) items.push({ t: 'path', d: `M${r2(t.pos)},${plot.y}V${plot.y + plot.h}`, stroke: pal.grid, strokeWidth: 0.6 });
  for (const t of yTicks) items.push({ t: 'path', d: `M${plot.x},${r2(t.pos)}H${plot.x + plot.w}`, stroke: pal.grid, strokeWidth: 0.6 });

  for (const [k, v] of (input.vmarks ?? []).entries()) {
    const x = r2(X(v.x));
    items.push({ t: 'path', d: `M${x},${plot.y}V${plot.y + plot.h}`, stroke: pal.muted, strokeWidth: 1.2, dash: [2, 3], clip: true, data: { layer: 'vmark' } });
    const cy = v.y !== undefined ? r2(yClamp(v.y)) : plot.y + 8;
    items.push({ t: 'path', d: shapePath('diamond', x, cy, 5.5), fill: pal.paper, stroke: pal.ink, strokeWidth: 1.4, clip: true, data: { mark: 'vmark', x: String(v.x) } });
    items.push({ t: 'text', x: x + 4, y: plot.y - 8, text: v.label, size: 9.5, anchor: k % 2 ? 'end' : 'start', fill: pal.muted, italic: true });
    marks.push({ id: `v${k}`, kind: 'vmark', series: -1, x: v.x, cx: x, cy, label: v.label, readout: v.readout });
  }

  for (const [si, s] of input.series.entries()) {
    const colour = colours[s.colour % colours.length];
    if (s.line && s.line.length > 1) {
      const d = [...s.line].sort((a, b) => a.x - b.x).map((p, i) => `${i ? 'L' : 'M'}${r2(X(p.x))},${r2(Y(p.y))}`).join('');
      items.push({ t: 'path', d, stroke: colour, strokeWidth: 1.6, dash: s.dashed ? [6, 4] : undefined, fill: 'none', clip: true, linecap: 'round', data: { layer: 'line', series: s.label } });
    } else if (s.line && s.line.length === 1) {
      const p = s.line[0];
      items.push({ t: 'path', d: `M${r2(X(p.x) - 9)},${r2(Y(p.y))}h18`, stroke: colour, strokeWidth: 1.6, fill: 'none', clip: true, data: { layer: 'line', series: s.label } });
    }
    if (s.joinPoints && s.points.length > 1) {
      const d = [...s.points].sort((a, b) => a.x - b.x).map((p, i) => `${i ? 'L' : 'M'}${r2(X(p.x))},${r2(Y(p.y))}`).join('');
      items.push({ t: 'path', d, stroke: colour, strokeWidth: 1.3, fill: 'none', clip: true, linecap: 'round', data: { layer: 'join', series: s.label } });
    }
    const shift = (input.dodge ?? 0) * (si - (input.series.length - 1) / 2);
    for (const [pi, p] of s.points.entries()) {
      const cx = r2(X(p.x) + shift), cy = r2(yClamp(p.y));
      if (p.low != null && p.high != null) {
        const y0 = r2(yClamp(p.low)), y1 = r2(yClamp(p.high));
        items.push({ t: 'path', d: `M${cx},${y0}V${y1}M${cx - 3.5},${y0}h7M${cx - 3.5},${y1}h7`, stroke: colour, strokeWidth: 1.2, fill: 'none', clip: true, data: { layer: 'interval', series: s.label } });
      }
      items.push({ t: 'path', d: shapePath(s.shape, cx, cy, 4.6), fill: colour, stroke: pal.paper, strokeWidth: 1, clip: true, data: { mark: 'point', series: s.label, x: String(p.x), y: String(p.y) } });
      marks.push({ id: `s${si}-${pi}`, kind: 'point', series: si, x: p.x, cx, cy, label: s.label, readout: p.readout });
    }
  }

  const axisY = plot.y + plot.h;
  drawAxes(items, pal, plot, px.ticks, yTicks, input.xLabel, input.yLabel);

  // Legend: per series its marker (and its line style when it has one).
  let ly = axisY + m.bottom + 14;
  let lx = plot.x;
  const legendItem = (draw: (x: number, y: number) => void, label: string) => {
    const w = 30 + label.length * 6.2 + 16;
    if (lx + w > width - m.right && lx > plot.x) { lx = plot.x; ly += 18; }
    draw(lx, ly);
    items.push({ t: 'text', x: lx + 30, y: ly + 4, text: label, size: 11, anchor: 'start', fill: pal.ink });
    lx += w;
  };
  for (const s of input.series) {
    const colour = colours[s.colour % colours.length];
    const hasLine = !!s.line?.length;
    legendItem((x, y) => {
      if (hasLine) items.push({ t: 'path', d: `M${x},${y}h24`, stroke: colour, strokeWidth: 1.6, dash: s.dashed ? [6, 4] : undefined, fill: 'none' });
      else if (s.joinPoints) items.push({ t: 'path', d: `M${x},${y}h24`, stroke: colour, strokeWidth: 1.3, fill: 'none' });
      if (s.points.length) items.push({ t: 'path', d: shapePath(s.shape, x + 12, y, 4.6), fill: colour, stroke: pal.paper, strokeWidth: 1 });
    }, s.label);
  }
  if (input.vmarks?.length) legendItem((x, y) => items.push({ t: 'path', d: shapePath('diamond', x + 12, y, 5), fill: pal.paper, stroke: pal.ink, strokeWidth: 1.4 }), input.vmarks[0].label);
  ly += 12;
  if (input.note) for (const line of wrapText(input.note, 10.5, width - 32)) { ly += 15; items.push({ t: 'text', x: 16, y: ly, text: line, size: 10.5, anchor: 'start', fill: pal.muted, italic: true }); }
  if (input.caption) for (const line of wrapText(input.caption, 11.5, width - 32)) { ly += 16; items.push({ t: 'text', x: 16, y: ly, text: line, size: 11.5, anchor: 'start', fill: pal.ink }); }
  if (input.footer?.length) {
    ly += 20;
    for (const text of input.footer) for (const line of wrapText(text, 9, width - 32)) { items.push({ t: 'text', x: 16, y: ly, text: line, size: 9, anchor: 'start', fill: pal.muted, mono: true }); ly += 12; }
    items.push({ t: 'text', x: 16, y: ly, text: 'Model results are indicative; defer to domain experts and local regulation.', size: 9, anchor: 'start', fill: pal.muted, italic: true });
  }
  return { width, height: Math.ceil(ly + 12), background: pal.paper, plot, items, title: input.title, marks };
}
