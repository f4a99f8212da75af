/**
 * The path picture of an escape study as one Figure (figure.ts primitives) for the screen and the
 * export (SVG, PNG, PDF): the plane of two state variables (for 3-variable models a projection on
 * two chosen axes) with the stable states, the index-1 saddles, the minimum-action path of every
 * edge out of the start state as a solid line and a few sample Euler–Maruyama paths as thin
 * translucent lines (src/lib/noise/path-picture.ts computes them).
 *
 * Glyphs follow the diagram's stable/unstable colours: stable states are filled discs in the
 * stable colour (the start state with a ring around it), saddles are open diamonds in the unstable
 * colour. Minimum-action paths differ in colour AND dash pattern; sample paths are thin lines in the
 * muted ink. Every state, saddle and path has a focusable mark whose readout gives exact numbers.
 */
import type { PathPicture } from '../noise/path-picture';
import { wrapText, type Prim } from './figure';
import { PAPER_PALETTE, type PlotPalette } from './palette';
import { linearAxis, formatValue } from './ticks';
import { SERIES_DARK, SERIES_LIGHT, shapePath, type ChartFigure, type ChartMark } from './escape-chart';
import { escapeFooter, type EscapeProvenance } from './escape-charts';
import { drawAxes, r2 } from './figure';

export interface PathFigureOptions {
  /** State-variable indices on the horizontal and vertical axis; default [0, 1]. */
  readonly axes?: readonly [number, number];
  readonly width?: number;
  readonly palette?: PlotPalette;
  readonly dark?: boolean;
  readonly caption?: string;
  readonly provenance?: EscapeProvenance;
}

/** Dash patterns of the minimum-action paths, one per saddle out of the start state (solid first). */
const DASHES: (number[] | undefined)[] = [undefined, [7, 3], [2, 3], [9, 3, 2, 3]];

const vec = (x: readonly number[]) => `(${x.map((v) => formatValue(v, 8)).join(', ')})`;

/** The picture at its value, with the two axes `axes` (throws RangeError for a bad axis pair). */
export function pathFigure(pic: PathPicture, o: PathFigureOptions = {}): ChartFigure {
  const n = pic.names.length;
  const [ax, ay] = o.axes ?? [0, 1];
  if (!(Number.isInteger(ax) && Number.isInteger(ay) && ax >= 0 && ay >= 0 && ax < n && ay < n && ax !== ay)) {
    throw new RangeError(`axes: two different variable indices below ${n}, got [${ax}, ${ay}]`);
  }
  const pal = o.palette ?? PAPER_PALETTE;
  const colours = o.dark ? SERIES_DARK : SERIES_LIGHT;
  const width = o.width ?? 640;
  const m = { left: 72, right: 18, top: 26, bottom: 46 };
  const side = Math.max(160, Math.min(width - m.left - m.right, 520));
  const plot = { x: m.left, y: m.top, w: Math.max(160, width - m.left - m.right), h: side };

  const xs: number[] = [], ys: number[] = [];
  const add = (q: readonly number[]) => { xs.push(q[ax]); ys.push(q[ay]); };
  for (const s of pic.states) add(s.x);
  for (const s of pic.saddles) add(s.x);
  for (const mp of pic.minimumActionPaths) mp.path.forEach(add);
  for (const sp of pic.samples) sp.points.forEach(add);
  const pad = (lo: number, hi: number): [number, number] => { const s = (hi - lo) || Math.abs(lo) * 0.1 || 1; return [lo - 0.04 * s, hi + 0.04 * s]; };
  const xa = linearAxis(pad(Math.min(...xs), Math.max(...xs)), [plot.x, plot.x + plot.w], Math.max(3, Math.min(7, Math.round(plot.w / 80))), true);
  const ya = linearAxis(pad(Math.min(...ys), Math.max(...ys)), [plot.y + plot.h, plot.y], 6, true);
  const X = (q: readonly number[]) => r2(xa.map(q[ax]));
  const Y = (q: readonly number[]) => r2(ya.map(q[ay]));
  const line = (pts: readonly (readonly number[])[]) => pts.map((q, i) => `${i ? 'L' : 'M'}${X(q)},${Y(q)}`).join('');
  const items: Prim[] = [];
  const marks: ChartMark[] = [];
  const xName = pic.names[ax], yName = pic.names[ay];
  const at = `${pic.parameter} = ${formatValue(pic.p, 8)}`;

  items.push({ t: 'rect', x: plot.x, y: plot.y, w: plot.w, h: plot.h, fill: pal.paper, stroke: pal.grid, strokeWidth: 1 });
  for (const t of xa.ticks) items.push({ t: 'path', d: `M${r2(t.pos)},${plot.y}V${plot.y + plot.h}`, stroke: pal.grid, strokeWidth: 0.6 });
  for (const t of ya.ticks) items.push({ t: 'path', d: `M${plot.x},${r2(t.pos)}H${plot.x + plot.w}`, stroke: pal.grid, strokeWidth: 0.6 });

  // Sample paths, back-most: thin, translucent, muted ink.
  for (const sp of pic.samples) {
    if (sp.points.length < 2) continue;
    items.push({ t: 'path', d: line(sp.points), stroke: pal.muted, strokeWidth: 0.7, opacity: 0.35, fill: 'none', clip: true, linecap: 'round', data: { layer: 'sample', path: String(sp.index) } });
    const end = sp.points[sp.points.length - 1];
    const escaped = sp.escapeTimes.map((t, j) => `${pic.names[j]} ${t === null || !Number.isFinite(t) ? 'not escaped' : `escaped at t = ${formatValue(t, 6)}`}`);
    marks.push({ id: `sample-${sp.index}`, kind: 'point', series: -1, x: pic.p, cx: X(end), cy: Y(end), label: `sample path ${sp.index + 1}`, readout: [
      `Sample path ${sp.index + 1} of the study (${at})`,
      `stopped at t = ${formatValue(sp.times[sp.times.length - 1], 6)} after ${sp.steps} steps${sp.capped ? ' (step cap, not every node escaped)' : ' (every node escaped)'}`,
      `end point ${vec(end)}`,
      ...escaped,
      `drawn with ${sp.points.length} points (every ${sp.every} steps)`,
    ] });
  }
  // Minimum-action paths: solid/dashed, one colour each.
  pic.minimumActionPaths.forEach((mp, k) => {
    const colour = colours[(k + 1) % colours.length];
    items.push({ t: 'path', d: line(mp.path), stroke: colour, strokeWidth: 2.2, dash: DASHES[k % DASHES.length], fill: 'none', clip: true, linecap: 'round', data: { layer: 'minimum-action', saddle: String(mp.saddle) } });
    const mid = mp.path[Math.floor(mp.path.length / 2)];
    marks.push({ id: `map-${mp.saddle}`, kind: 'point', series: k, x: pic.p, cx: X(mid), cy: Y(mid), label: `minimum-action path over ${mp.label}`, readout: [
      `Minimum-action path ${pic.states[pic.start].label} → saddle ${mp.label} (${at})`,
      `barrier ${formatValue(mp.barrier, 8)} (level²), ${mp.method === 'potential' ? 'from the potential (gradient field)' : 'geometric minimum action method'}${mp.converged ? '' : ', not converged: indicative'}`,
      `${mp.path.length} points; the midpoint drawn here ${vec(mid)}`,
    ] });
  });
  // Saddles: open diamonds in the unstable colour.
  for (const s of pic.saddles) {
    items.push({ t: 'path', d: shapePath('diamond', X(s.x), Y(s.x), 6), fill: pal.paper, stroke: pal.unstable, strokeWidth: 2, clip: true, data: { mark: 'saddle', saddle: String(s.index) } });
    const barrier = pic.minimumActionPaths.find((mp) => mp.saddle === s.index);
    marks.push({ id: `saddle-${s.index}`, kind: 'point', series: -1, x: pic.p, cx: X(s.x), cy: Y(s.x), label: `saddle ${s.label}`, readout: [
      `Saddle ${s.label} (${at})`,
      `x = ${vec(s.x)}`,
      `eigenvalues (real parts) ${s.eigenvalues.map((v) => formatValue(v, 6)).join(', ')}`,
      ...(barrier ? [`barrier from the start ${formatValue(barrier.barrier, 8)} (level²)`] : []),
    ] });
  }
  // Stable states: filled discs, the start state ringed.
  const placed: [number, number, number][] = [];
  pic.states.forEach((s, k) => {
    if (k === pic.start) items.push({ t: 'path', d: shapePath('circle', X(s.x), Y(s.x), 9), fill: 'none', stroke: pal.stable, strokeWidth: 1.4, clip: true });
    items.push({ t: 'path', d: shapePath('circle', X(s.x), Y(s.x), 5.5), fill: pal.stable, stroke: pal.paper, strokeWidth: 1, clip: true, data: { mark: 'state', state: String(k) } });
    // Name beside the disc unless another state's name is already there (projections stack states;
    // the readout always names it).
    const lx0 = X(s.x) + 9, ly0 = Y(s.x) - 8;
    if (!placed.some(([px, py, w]) => Math.abs(py - ly0) < 12 && lx0 < px + w && px < lx0 + s.label.length * 5.6)) {
      items.push({ t: 'text', x: lx0, y: ly0, text: s.label, size: 10, anchor: 'start', fill: pal.ink, clip: true });
      placed.push([lx0, ly0, s.label.length * 5.6]);
    }
    marks.push({ id: `state-${k}`, kind: 'point', series: -1, x: pic.p, cx: X(s.x), cy: Y(s.x), label: `stable state ${s.label}`, readout: [
      `Stable state ${s.label}${k === pic.start ? ' (start of the paths)' : ''} (${at})`,
      `x = ${vec(s.x)}`,
      `eigenvalues (real parts) ${s.eigenvalues.map((v) => formatValue(v, 6)).join(', ')}`,
    ] });
  });

  const axisY = plot.y + plot.h;
  drawAxes(items, pal, plot, xa.ticks, ya.ticks, xName, yName);

  // Legend.
  let ly = axisY + m.bottom + 14;
  let lx = plot.x;
  const legendItem = (draw: (x: number, y: number) => void, label: string) => {
    const w = 30 + label.length * 6.2 + 16;
    if (lx + w > width - m.right && lx > plot.x) { lx = plot.x; ly += 18; }
    draw(lx, ly);
    items.push({ t: 'text', x: lx + 30, y: ly + 4, text: label, size: 11, anchor: 'start', fill: pal.ink });
    lx += w;
  };
  legendItem((x, y) => items.push({ t: 'path', d: shapePath('circle', x + 12, y, 5), fill: pal.stable, stroke: pal.paper, strokeWidth: 1 }), 'stable state');
  legendItem((x, y) => items.push({ t: 'path', d: shapePath('diamond', x + 12, y, 5.5), fill: pal.paper, stroke: pal.unstable, strokeWidth: 2 }), 'saddle');
  pic.minimumActionPaths.forEach((mp, k) => legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: colours[(k + 1) % colours.length], strokeWidth: 2.2, dash: DASHES[k % DASHES.length], fill: 'none' }), `minimum-action path over ${mp.label}`));
  if (pic.samples.length) legendItem((x, y) => items.push({ t: 'path', d: `M${x},${y}h24`, stroke: pal.muted, strokeWidth: 0.8, opacity: 0.6, fill: 'none' }), `sample paths (${pic.samples.length}, the study's first)`);
  ly += 12;
  const note = `At ${at}, noise level ${formatValue(pic.noise, 6)}, step ${formatValue(pic.dt, 4)}.${n === 3 ? ` Projection on (${xName}, ${yName}); ${pic.names[3 - ax - ay]} not shown.` : ''} Sample paths run until every element passed its escape threshold.`;
  for (const l of wrapText(note, 10.5, width - 32)) { ly += 15; items.push({ t: 'text', x: 16, y: ly, text: l, size: 10.5, anchor: 'start', fill: pal.muted, italic: true }); }
  if (o.caption) for (const l of wrapText(o.caption, 11.5, width - 32)) { ly += 16; items.push({ t: 'text', x: 16, y: ly, text: l, size: 11.5, anchor: 'start', fill: pal.ink }); }
  if (o.provenance) {
    ly += 20;
    for (const text of escapeFooter(o.provenance)) for (const l of wrapText(text, 9, width - 32)) { items.push({ t: 'text', x: 16, y: ly, text: l, size: 9, anchor: 'start', fill: pal.muted, mono: true }); ly += 12; }
    items.push({ t: 'text', x: 16, y: ly, text: 'Model results are indicative; defer to domain experts and local regulation.', size: 9, anchor: 'start', fill: pal.muted, italic: true });
  }
  return { width, height: Math.ceil(ly + 12), background: pal.paper, plot, items, title: `Path picture at ${at}`, marks };
}
