/**
 * A two-parameter map as a Figure (figure.ts primitives) so the screen, SVG, PNG and PDF draw the
 * same thing: regime regions shaded from the curves (map-regions.ts) in the diagram's band palette,
 * grid, the one-parameter slice (the document's value of the second parameter) as a horizontal line,
 * the curves by type (map-glyphs.ts line styles), the codimension-two points with their own glyphs,
 * axes, legend, caption and provenance footer. Also returns the marks and probes the interactive view
 * needs for readouts (exact stored numbers) and the axes to turn a pointer position into (p1, p2).
 */
import { wrapText, type Figure, type Prim } from './figure';
import { PAPER_PALETTE, type PlotPalette } from './palette';
import { INDICATIVE_NOTE, provenanceLine, type Provenance } from './provenance';
import { formatValue, linearAxis, type LinearAxis } from './ticks';
import { thinToBudget } from './thin';
import type { MapDocumentView } from './map-types';
import { regionPieces } from './map-regions';
import { MAP_CURVE_LABEL, MAP_CURVE_STYLE, MAP_CURVE_TYPES, MAP_POINT_TYPES, mapCurveColour, mapPointColour, mapPointLabel, mapPointPath } from './map-glyphs';
import { REGIME_LABEL } from './figure';
import type { Regime } from '../regimes/types';
import { drawAxes, r2 } from './figure';

export interface MapMark {
  readonly id: string;
  /** 'point': a codimension-two point; 'curve': a point of a curve. */
  readonly kind: 'point' | 'curve';
  readonly type: string;
  readonly curve?: string;
  readonly index?: number;
  readonly cx: number;
  readonly cy: number;
  readonly p: readonly [number, number];
  readonly readout: readonly string[];
}

export interface MapFigure extends Figure {
  readonly xAxis: LinearAxis;
  readonly yAxis: LinearAxis;
  /** Codimension-two points and a few evenly spaced points per curve: focusable, with readouts. */
  readonly marks: MapMark[];
  /** Curve points for the nearest-point readout under the pointer (thinned to the pixel budget). */
  readonly probes: MapMark[];
}

export interface MapFigureInput {
  readonly map: MapDocumentView;
  /** The document's own value of the second parameter: drawn as the one-parameter diagram's slice. */
  readonly secondValue?: number | null;
  /** One-parameter diagrams computed at other values of the second parameter (slices of this map run): drawn like the document's line, labelled at the left. */
  readonly slices?: readonly { readonly value: number; readonly active?: boolean }[];
  readonly width?: number;
  readonly plotHeight?: number;
  readonly palette?: PlotPalette;
  readonly caption?: string;
  readonly provenance?: Provenance;
  /** State variable names for readouts. */
  readonly variables?: readonly string[];
  /** Focusable points per curve besides its ends (default 6). */
  readonly focusPerCurve?: number;
}


/** Readout lines of a curve point or a codimension-two point, exact stored numbers (formatValue, 6 significant digits for the state). */
export function mapReadout(names: readonly string[], head: string, p: readonly [number, number], x: readonly number[], variables?: readonly string[], extra: string[] = []): string[] {
  const state = x.length <= 6
    ? x.map((v, i) => `${variables?.[i] ?? `x${i + 1}`} = ${formatValue(v)}`).join(', ')
    : `${x.length} state values (see CSV)`;
  return [head, `${names[0]} = ${String(p[0])}`, `${names[1]} = ${String(p[1])}`, ...extra, state];
}

export function buildMapFigure(input: MapFigureInput): MapFigure {
  const pal = input.palette ?? PAPER_PALETTE;
  const { map } = input;
  const names = [String(map.parameters[0]), String(map.parameters[1])];
  const width = input.width ?? 720;
  const plotH = input.plotHeight ?? 400;
  const m = { left: 72, right: 18, top: 18, bottom: 46 };
  const plot = { x: m.left, y: m.top, w: width - m.left - m.right, h: plotH };
  const first = [Math.min(...map.ranges.first), Math.max(...map.ranges.first)] as [number, number];
  const second = [Math.min(...map.ranges.second), Math.max(...map.ranges.second)] as [number, number];
  const xTickCount = Math.max(3, Math.min(7, Math.round(plot.w / 60)));
  // Exact domains (no widening): the map is computed on exactly these ranges, and its curves end on them.
  const xAxis = linearAxis(first, [plot.x, plot.x + plot.w], xTickCount, false);
  const yAxis = linearAxis(second, [plot.y + plot.h, plot.y], 6, false);
  const X = xAxis.map, Y = yAxis.map;
  const items: Prim[] = [];
  items.push({ t: 'rect', x: plot.x, y: plot.y, w: plot.w, h: plot.h, fill: pal.paper, stroke: pal.grid, strokeWidth: 1 });

  // Regions: one path per regime, its pieces as sub-paths.
  const byRegime = new Map<Regime, string[]>();
  for (const piece of regionPieces(map)) {
    const d = `M${piece.corners.map(([a, b]) => `${r2(X(a))},${r2(Y(b))}`).join('L')}Z`;
    (byRegime.get(piece.regime) ?? byRegime.set(piece.regime, []).get(piece.regime)!).push(d);
  }
  for (const regime of ['weak', 'intermediate', 'strong'] as Regime[]) {
    const ds = byRegime.get(regime);
    if (!ds) continue;
    // A hairline in the fill colour closes the anti-aliasing seams between neighbouring pieces.
    items.push({ t: 'path', d: ds.join(''), fill: pal.band[regime], stroke: pal.band[regime], strokeWidth: 0.6, clip: true, data: { layer: 'region', regime } });
  }
  // Regime names at the centre of each labelled region's samples.
  for (const g of map.regions) {
    if (!g.regime || g.samples.length === 0) continue;
    const half = g.regime.length * 3.4 + 4;
    const cx = Math.min(plot.x + plot.w - half, Math.max(plot.x + half, g.samples.reduce((s, q) => s + X(q[0]), 0) / g.samples.length));
    const cy = g.samples.reduce((s, q) => s + Y(q[1]), 0) / g.samples.length;
    items.push({ t: 'text', x: r2(cx), y: r2(cy), text: g.regime, size: 11, weight: 600, anchor: 'middle', fill: pal.bandInk[g.regime], clip: true, data: { label: 'region', regime: g.regime } });
  }

  for (const t of xAxis.ticks) items.push({ t: 'path', d: `M${r2(t.pos)},${plot.y}V${plot.y + plot.h}`, stroke: pal.grid, strokeWidth: 0.6 });
  for (const t of yAxis.ticks) items.push({ t: 'path', d: `M${plot.x},${r2(t.pos)}H${plot.x + plot.w}`, stroke: pal.grid, strokeWidth: 0.6 });

  // The one-parameter diagram's slice.
  const sv = input.secondValue;
  const slice = sv !== undefined && sv !== null && sv >= second[0] && sv <= second[1];
  if (slice) {
    const y = r2(Y(sv));
    items.push({ t: 'path', d: `M${plot.x},${y}H${plot.x + plot.w}`, stroke: pal.muted, strokeWidth: 1.2, dash: [2, 3], clip: true, data: { layer: 'slice' } });
    items.push({ t: 'text', x: plot.x + plot.w - 4, y: y - 4, text: `this model: ${names[1]} = ${formatValue(sv)}`, size: 10, anchor: 'end', fill: pal.muted, italic: true, clip: true });
  }
  // Slices computed on demand at clicked values (docs/maps.md, "From the map back to one parameter").
  for (const s of input.slices ?? []) {
    if (!(s.value >= second[0] && s.value <= second[1])) continue;
    const y = r2(Y(s.value));
    const ink = s.active ? pal.ink : pal.muted;
    items.push({ t: 'path', d: `M${plot.x},${y}H${plot.x + plot.w}`, stroke: ink, strokeWidth: s.active ? 1.6 : 1, dash: [6, 3], clip: true, data: { layer: 'slice', value: String(s.value), active: String(Boolean(s.active)) } });
    items.push({ t: 'text', x: plot.x + 4, y: y - 4, text: `${names[1]} = ${formatValue(s.value)}`, size: 10, anchor: 'start', fill: ink, italic: !s.active, weight: s.active ? 600 : undefined, clip: true });
  }

  // Curves.
  const marks: MapMark[] = [];
  const probes: MapMark[] = [];
  const budget = Math.max(200, Math.round(plot.w * 3));
  const perCurve = input.focusPerCurve ?? 6;
  for (const c of map.curves) {
    const xs = c.points.map((q) => X(q.p[0])), ys = c.points.map((q) => Y(q.p[1]));
    if (xs.length === 0) continue;
    const keep = thinToBudget(xs, ys, budget);
    const style = MAP_CURVE_STYLE[c.type];
    items.push({
      t: 'path', d: keep.map((i, k) => `${k === 0 ? 'M' : 'L'}${r2(xs[i])},${r2(ys[i])}`).join(''), fill: 'none', clip: true,
      stroke: mapCurveColour(c.type, pal.marker), strokeWidth: style.width, dash: style.dash ? [...style.dash] : undefined, linecap: style.linecap,
      data: { curve: c.id, type: c.type },
    });
    const mk = (i: number): MapMark => {
      const q = c.points[i];
      return {
        id: `${c.id}:${i}`, kind: 'curve', type: c.type, curve: c.id, index: i, cx: r2(xs[i]), cy: r2(ys[i]), p: q.p,
        readout: mapReadout(names, `${MAP_CURVE_LABEL[c.type]} ${c.id}, point ${i + 1} of ${c.points.length}`, q.p, q.x, input.variables,
          q.frequency !== undefined ? [`frequency ω = ${formatValue(q.frequency)}`] : []),
      };
    };
    for (const i of keep) probes.push(mk(i));
    const n = c.points.length;
    const focus = new Set<number>([0, n - 1]);
    for (let k = 1; k <= perCurve; k++) focus.add(Math.round((k * (n - 1)) / (perCurve + 1)));
    for (const i of [...focus].sort((u, v) => u - v)) marks.push(mk(i));
  }

  // Codimension-two points.
  for (const pt of map.points) {
    const cx = X(pt.p[0]), cy = Y(pt.p[1]);
    items.push({ t: 'path', d: mapPointPath(pt.type, cx, cy, 8), fill: mapPointColour(pt.type, pal), stroke: pal.paper, strokeWidth: 1.3, clip: true, data: { point: pt.id, type: pt.type } });
    marks.push({
      id: pt.id, kind: 'point', type: pt.type, cx: r2(cx), cy: r2(cy), p: pt.p,
      readout: mapReadout(names, `${mapPointLabel(pt.type)} point ${pt.id} (on ${pt.curves.join(', ')})`, pt.p, pt.x, input.variables, [String(pt.evidence.reason), ...(pt.note ? [`Note: ${pt.note}`] : [])]),
    });
  }

  // Axes.
  const axisY = plot.y + plot.h;
  drawAxes(items, pal, plot, xAxis.ticks, yAxis.ticks, `swept parameter ${names[0]}`, `second parameter ${names[1]}`);

  // Legend: the curve types present, the point types present, the regimes present, the slice.
  let ly = axisY + m.bottom + 14;
  let lx = plot.x;
  const legendItem = (draw: (x: number, y: number) => void, label: string, key: string) => {
    const w = 30 + label.length * 6.2 + 16;
    if (lx + w > width - m.right) { lx = plot.x; ly += 18; }
    draw(lx, ly);
    items.push({ t: 'text', x: lx + 30, y: ly + 4, text: label, size: 11, anchor: 'start', fill: pal.ink, data: { legend: key } });
    lx += w;
  };
  const curveTypes = new Set(map.curves.map((c) => c.type));
  for (const type of MAP_CURVE_TYPES) {
    if (!curveTypes.has(type)) continue;
    const style = MAP_CURVE_STYLE[type];
    legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: mapCurveColour(type, pal.marker), strokeWidth: style.width, dash: style.dash ? [...style.dash] : undefined, linecap: style.linecap, fill: 'none' }), MAP_CURVE_LABEL[type], type);
  }
  const pointTypes = new Set<string>(map.points.map((p) => p.type));
  const known = new Set<string>(MAP_POINT_TYPES);
  for (const type of [...MAP_POINT_TYPES.filter((t) => pointTypes.has(t)), ...[...pointTypes].filter((t) => !known.has(t)).sort()]) {
    legendItem((x, y) => items.push({ t: 'path', d: mapPointPath(type, x + 12, y, 7), fill: mapPointColour(type, pal) }), `${mapPointLabel(type)} point`, type);
  }
  for (const regime of ['weak', 'intermediate', 'strong'] as Regime[]) {
    if (!byRegime.has(regime)) continue;
    legendItem((x, y) => items.push({ t: 'rect', x, y: y - 6, w: 24, h: 12, fill: pal.band[regime], stroke: pal.grid, strokeWidth: 0.6 }), REGIME_LABEL[regime], regime);
  }
  if (slice) legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: pal.muted, strokeWidth: 1.2, dash: [2, 3], fill: 'none' }), 'one-parameter diagram of this model', 'slice');
  if ((input.slices ?? []).some((s) => s.value >= second[0] && s.value <= second[1])) {
    legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: pal.muted, strokeWidth: 1, dash: [6, 3], fill: 'none' }), `diagram at a picked ${names[1]} (parameter overridden)`, 'picked-slice');
  }
  ly += 12;

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
    items.push({ t: 'text', x: 16, y: ly, text: INDICATIVE_NOTE, size: 9, anchor: 'start', fill: pal.muted, italic: true });
  }
  const height = Math.ceil(ly + 12);
  return { width, height, background: pal.paper, plot, items, title: `Two-parameter map of ${names[0]} and ${names[1]}`, xAxis, yAxis, marks, probes };
}

/** The data point (p1, p2) under pixel (px, py) of the figure (inverse of the axes, linear). */
export function pixelToParameters(fig: Pick<MapFigure, 'xAxis' | 'yAxis'>, px: number, py: number): [number, number] {
  const inv = (a: LinearAxis, v: number) => a.domain[0] + ((v - a.range[0]) / (a.range[1] - a.range[0])) * (a.domain[1] - a.domain[0]);
  return [inv(fig.xAxis, px), inv(fig.yAxis, py)];
}

/** The probe nearest to (px, py) within maxDistance pixels, or null. */
export function nearestMark(probes: readonly MapMark[], px: number, py: number, maxDistance = 12): MapMark | null {
  let best: MapMark | null = null, d2 = maxDistance * maxDistance;
  for (const m of probes) {
    const d = (m.cx - px) ** 2 + (m.cy - py) ** 2;
    if (d <= d2) { d2 = d; best = m; }
  }
  return best;
}
