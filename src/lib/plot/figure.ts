/**
 * A static figure of a diagram as a flat list of drawing primitives in pixel coordinates.
 * One description, several back ends: SVG text (svg.ts), a PDF document (the export menu), PNG via the
 * SVG. Layers, back to front: regime bands, manual tags, grid, branches, special points, axes, legend,
 * caption, provenance footer.
 */
import type { Diagram, SpecialPointType } from '../atlas/types';
import type { BandTag, RegimeBand } from '../regimes/types';
import { markerFillRule, markerPath, SPECIAL_LABEL, SPECIAL_TYPES } from './markers';
import { PAPER_PALETTE, type PlotPalette } from './palette';
import { project, projectionLabel, type Projection } from './projection';
import { provenanceLine, type Provenance } from './provenance';
import { splitRuns } from './runs';
import { labelWidth, stackRows } from './stack-rows';
import { thinToBudget } from './thin';
import { integerTicks, linearAxis, type Tick } from './ticks';

export type Prim =
  | { readonly t: 'rect'; x: number; y: number; w: number; h: number; fill: string; opacity?: number; stroke?: string; strokeWidth?: number; clip?: boolean; data?: Record<string, string> }
  | { readonly t: 'path'; d: string; stroke?: string; strokeWidth?: number; dash?: number[]; fill?: string; fillRule?: 'nonzero' | 'evenodd'; opacity?: number; clip?: boolean; linecap?: 'butt' | 'round'; data?: Record<string, string> }
  | { readonly t: 'text'; x: number; y: number; text: string; size: number; weight?: 400 | 600; anchor: 'start' | 'middle' | 'end'; fill: string; rotate?: number; mono?: boolean; italic?: boolean; clip?: boolean; data?: Record<string, string> };

export interface Figure {
  readonly width: number;
  readonly height: number;
  readonly background: string;
  /** Plot area, the clip rectangle of primitives with clip = true. */
  readonly plot: { x: number; y: number; w: number; h: number };
  readonly items: Prim[];
  /** Title for the SVG <title> and PDF metadata. */
  readonly title: string;
}

export interface FigureInput {
  readonly diagram: Diagram;
  readonly projection: Projection;
  readonly regimes?: readonly RegimeBand[];
  readonly tags?: readonly BandTag[];
  readonly showTags?: boolean;
  /** Visible parameter range; defaults to the extent of the points. */
  readonly pDomain?: readonly [number, number];
  readonly yDomain?: readonly [number, number];
  readonly width?: number;
  /** Height of the plot area (the figure grows for legend, caption and footer). */
  readonly plotHeight?: number;
  readonly caption?: string;
  readonly provenance?: Provenance;
  readonly palette?: PlotPalette;
  /** Points per run at most; defaults to four per horizontal pixel of the plot. */
  readonly pointBudget?: number;
  /** Axis titles; default "parameter <name>" and the projection's label. Any Unicode (β, units). */
  readonly xLabel?: string;
  readonly yLabel?: string;
}

export const STABLE_WIDTH = 2.4;
export const UNSTABLE_WIDTH = 1.3;
export const UNSTABLE_DASH = [6, 4];
export const REGIME_LABEL = { weak: 'weak coupling', intermediate: 'intermediate coupling', strong: 'strong coupling' } as const;

/** Coordinates rounded to 1/100 px (smaller SVG, same picture). */
export const r2 = (v: number) => Math.round(v * 100) / 100;

/**
 * The axes of a plot rectangle, as every Brinkmap figure draws them: the left and bottom lines, tick
 * marks with their labels (mono, 10.5 px), the x title under the ticks and the y title turned along
 * the left edge.
 */
export function drawAxes(items: Prim[], pal: PlotPalette, plot: Figure['plot'], xTicks: readonly Tick[], yTicks: readonly Tick[], xTitle: string, yTitle: string): void {
  const axisY = plot.y + plot.h;
  items.push({ t: 'path', d: `M${plot.x},${axisY}H${plot.x + plot.w}M${plot.x},${plot.y}V${axisY}`, stroke: pal.ink, strokeWidth: 1, fill: 'none' });
  for (const t of xTicks) {
    items.push({ t: 'path', d: `M${r2(t.pos)},${axisY}v5`, stroke: pal.ink, strokeWidth: 1 });
    items.push({ t: 'text', x: r2(t.pos), y: axisY + 17, text: t.label, size: 10.5, anchor: 'middle', fill: pal.ink, mono: true });
  }
  for (const t of yTicks) {
    items.push({ t: 'path', d: `M${plot.x - 5},${r2(t.pos)}h5`, stroke: pal.ink, strokeWidth: 1 });
    items.push({ t: 'text', x: plot.x - 8, y: r2(t.pos + 3.5), text: t.label, size: 10.5, anchor: 'end', fill: pal.ink, mono: true });
  }
  items.push({ t: 'text', x: plot.x + plot.w / 2, y: axisY + 36, text: xTitle, size: 12, anchor: 'middle', fill: pal.ink, weight: 600 });
  items.push({ t: 'text', x: 16, y: plot.y + plot.h / 2, text: yTitle, size: 12, anchor: 'middle', fill: pal.ink, weight: 600, rotate: -90 });
}

/** Extent [min, max] of p and of the projected state over all points and special points. */
export function diagramExtent(diagram: Diagram, projection: Projection): { p: [number, number]; y: [number, number] } {
  let p0 = Infinity, p1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const b of diagram.branches) for (const pt of b.points) {
    const y = project(pt.x, projection);
    if (pt.p < p0) p0 = pt.p; if (pt.p > p1) p1 = pt.p;
    if (y < y0) y0 = y; if (y > y1) y1 = y;
  }
  if (!Number.isFinite(p0)) return { p: [0, 1], y: [0, 1] };
  return { p: [p0, p1], y: [y0, y1] };
}

/** Greedy word wrap by an average glyph width of 0.5 em (Inter's mean advance on prose, estimated from the exported figures). */
export function wrapText(text: string, size: number, width: number): string[] {
  const maxChars = Math.max(10, Math.floor(width / (size * 0.5)));
  const lines: string[] = [];
  for (const para of text.split(/\n/)) {
    let line = '';
    for (const word of para.split(/\s+/).filter(Boolean)) {
      if (line && (line + ' ' + word).length > maxChars) { lines.push(line); line = word; } else line = line ? line + ' ' + word : word;
    }
    lines.push(line);
  }
  return lines;
}

export function buildFigure(input: FigureInput): Figure {
  const pal = input.palette ?? PAPER_PALETTE;
  const { diagram, projection } = input;
  const width = input.width ?? 720;
  const plotH = input.plotHeight ?? 380;
  const m = { left: 68, right: 18, top: 30, bottom: 46 };
  const plot = { x: m.left, y: m.top, w: width - m.left - m.right, h: plotH };
  const ext = diagramExtent(diagram, projection);
  const pad = (d: [number, number]): [number, number] => { const s = (d[1] - d[0]) || 1; return [d[0] - 0.04 * s, d[1] + 0.04 * s]; };
  // About one tick label per 55 units of plot width (a label like "-0.25" in the mono face is about
  // 32 units), at most 7: narrow paper figures would otherwise print the labels edge to edge.
  const xTickCount = Math.max(3, Math.min(7, Math.round(plot.w / 55)));
  const px = linearAxis(input.pDomain ?? ext.p, [plot.x, plot.x + plot.w], xTickCount, !input.pDomain);
  const py = linearAxis(input.yDomain ?? pad(ext.y), [plot.y + plot.h, plot.y], 6, !input.yDomain);
  const X = px.map, Y = py.map;
  const items: Prim[] = [];

  items.push({ t: 'rect', x: plot.x, y: plot.y, w: plot.w, h: plot.h, fill: pal.paper, stroke: pal.grid, strokeWidth: 1 });

  // Regime bands, with a label strip along the top of the plot.
  for (const band of input.regimes ?? []) {
    const x0 = Math.max(plot.x, X(band.from)), x1 = Math.min(plot.x + plot.w, X(band.to));
    if (x1 <= x0) continue;
    items.push({ t: 'rect', x: r2(x0), y: plot.y, w: r2(x1 - x0), h: plot.h, fill: pal.band[band.regime], clip: true, data: { layer: 'band', regime: band.regime } });
    if (x1 - x0 > 40) {
      items.push({ t: 'text', x: r2((x0 + x1) / 2), y: plot.y - 9, text: x1 - x0 > 130 ? REGIME_LABEL[band.regime] : band.regime, size: 10.5, weight: 600, anchor: 'middle', fill: pal.bandInk[band.regime] });
    }
  }
  // Grid and axes.
  for (const t of px.ticks) items.push({ t: 'path', d: `M${r2(t.pos)},${plot.y}V${plot.y + plot.h}`, stroke: pal.grid, strokeWidth: 0.6 });
  const yTicks = projection.kind === 'tipped' ? integerTicks(py) : py.ticks;
  for (const t of yTicks) items.push({ t: 'path', d: `M${plot.x},${r2(t.pos)}H${plot.x + plot.w}`, stroke: pal.grid, strokeWidth: 0.6 });

  if (input.showTags) {
    const tags = input.tags ?? [];
    // Overlapping tags (or names running past their range) get their labels on stacked lines.
    const rows = stackRows(tags.map((tag) => {
      const x0 = Math.max(plot.x, X(tag.from)), x1 = Math.min(plot.x + plot.w, X(tag.to));
      return x1 <= x0 ? { start: 0, end: 0 } : { start: x0, end: Math.max(x1, x0 + 6 + labelWidth(tag.name, 9.5)) };
    }));
    for (const [k, tag] of tags.entries()) {
      const x0 = Math.max(plot.x, X(tag.from)), x1 = Math.min(plot.x + plot.w, X(tag.to));
      if (x1 <= x0) continue;
      items.push({ t: 'rect', x: r2(x0), y: plot.y + plot.h - 7, w: r2(x1 - x0), h: 7, fill: tag.colour, opacity: 0.85, clip: true, data: { layer: 'tag' } });
      items.push({ t: 'text', x: r2(x0 + 3), y: plot.y + plot.h - 11 - rows[k] * 12, text: tag.name, size: 9.5, anchor: 'start', fill: pal.ink, italic: true, clip: true });
    }
  }

  // Branches, one path per run of constant stability index.
  const budget = input.pointBudget ?? Math.max(200, Math.round(plot.w * 4));
  for (const branch of diagram.branches) {
    for (const run of splitRuns(branch)) {
      const pts = branch.points.slice(run.start, run.end + 1);
      const xs = pts.map((p) => X(p.p)), ys = pts.map((p) => Y(project(p.x, projection)));
      const keep = thinToBudget(xs, ys, budget);
      const d = keep.map((i, k) => `${k === 0 ? 'M' : 'L'}${r2(xs[i])},${r2(ys[i])}`).join('');
      items.push({
        t: 'path', d, fill: 'none', clip: true, linecap: 'round',
        stroke: run.stable ? pal.stable : pal.unstable,
        strokeWidth: run.stable ? STABLE_WIDTH : UNSTABLE_WIDTH,
        dash: run.stable ? undefined : UNSTABLE_DASH,
        data: { branch: branch.id, run: String(run.runIndex), stability: run.stable ? 'stable' : `unstable-${run.unstable}` },
      });
    }
  }

  // Special points.
  for (const sp of diagram.bifurcations) {
    const cx = X(sp.p), cy = Y(project(sp.x, projection));
    if (cx < plot.x - 6 || cx > plot.x + plot.w + 6) continue;
    items.push({ t: 'path', d: markerPath(sp.type, cx, cy, 6.5), fill: pal.marker[sp.type], fillRule: markerFillRule(sp.type), stroke: pal.paper, strokeWidth: 1.2, clip: true, data: { special: sp.id, type: sp.type } });
  }

  // Axis lines, tick labels, titles.
  const axisY = plot.y + plot.h;
  const xTitle = input.xLabel?.trim() || `parameter ${diagram.parameter}`;
  const yTitle = input.yLabel?.trim() || projectionLabel(projection, diagram.variables);
  drawAxes(items, pal, plot, px.ticks, yTicks, xTitle, yTitle);

  // Legend: line styles, then the glyphs of the types present.
  let ly = axisY + m.bottom + 14;
  let lx = plot.x;
  const legendItem = (draw: (x: number, y: number) => void, label: string) => {
    const w = 30 + label.length * 6.2 + 16;
    if (lx + w > width - m.right) { lx = plot.x; ly += 18; }
    draw(lx, ly);
    items.push({ t: 'text', x: lx + 30, y: ly + 4, text: label, size: 11, anchor: 'start', fill: pal.ink });
    lx += w;
  };
  legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: pal.stable, strokeWidth: STABLE_WIDTH, fill: 'none' }), 'stable branch');
  legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: pal.unstable, strokeWidth: UNSTABLE_WIDTH, dash: UNSTABLE_DASH, fill: 'none' }), 'unstable branch');
  const present = new Set<SpecialPointType>(diagram.bifurcations.map((b) => b.type));
  for (const type of SPECIAL_TYPES) {
    if (!present.has(type)) continue;
    legendItem((x, y) => items.push({ t: 'path', d: markerPath(type, x + 12, y, 6), fill: pal.marker[type], fillRule: markerFillRule(type) }), SPECIAL_LABEL[type].toLowerCase());
  }
  ly += 12;

  // Caption and provenance footer.
  if (input.caption) {
    for (const line of wrapText(input.caption, 11.5, width - 2 * 16)) {
      ly += 16;
      items.push({ t: 'text', x: 16, y: ly, text: line, size: 11.5, anchor: 'start', fill: pal.ink });
    }
  }
  if (input.provenance) {
    ly += 20;
    for (const line of wrapText(provenanceLine(input.provenance), 9, width - 2 * 16)) {
      items.push({ t: 'text', x: 16, y: ly, text: line, size: 9, anchor: 'start', fill: pal.muted, mono: true });
      ly += 12;
    }
    items.push({ t: 'text', x: 16, y: ly, text: 'Model results are indicative; defer to domain experts and local regulation.', size: 9, anchor: 'start', fill: pal.muted, italic: true });
  }
  const height = Math.ceil(ly + 12);
  const title = `Branches of ${projectionLabel(projection, diagram.variables)} against ${diagram.parameter}`;
  return { width, height, background: pal.paper, plot, items, title };
}
