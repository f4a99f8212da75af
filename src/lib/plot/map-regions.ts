/**
 * Regime regions of a two-parameter map drawn from the curves themselves (docs/maps.md §6 and "Maps
 * in the workspace"): the plane is cut into thin horizontal strips (in the second parameter); in
 * each strip every curve polyline is cut at the strip's lower and upper edge, so an interval between
 * two neighbouring crossings is a trapezoid whose sides run along the curves. The interval takes the
 * regime of a grid sample of the two rows either side of the strip that lies between the same two
 * curves (matched by curve id), the nearer row first; without one, of a sample of those rows inside
 * the interval; without one, it stays unshaded (a label is never carried past the neighbouring rows). The grid only names the regime; the boundaries
 * are the curves' own points. Pure: no DOM.
 */
import type { MapDocumentView } from './map-types';
import type { Regime } from '../regimes/types';

export interface Crossing { readonly curve: string; readonly p1: number }

/**
 * Where the polylines cross the line p2 = y, sorted by p1: one crossing per crossed segment, a vertex
 * exactly on y counted once (segments half-open in p2). `closed` counts both ends of every segment
 * (a curve ending exactly on y, as curves do on the range's edges, is then found; a vertex on y may
 * appear twice).
 */
export function crossingsAt(curves: MapDocumentView['curves'], y: number, closed = false): Crossing[] {
  const out: Crossing[] = [];
  for (const c of curves) {
    const pts = c.points;
    for (let i = 0; i + 1 < pts.length; i++) {
      const [a0, b0] = pts[i].p, [a1, b1] = pts[i + 1].p;
      // Half-open in the second coordinate, so a vertex exactly on y is counted once.
      const inside = closed ? (Math.min(b0, b1) <= y && y <= Math.max(b0, b1) && b0 !== b1) : (b0 <= y && y < b1) || (b1 <= y && y < b0);
      if (inside) {
        const t = (y - b0) / (b1 - b0);
        out.push({ curve: c.id, p1: a0 + t * (a1 - a0) });
      }
    }
  }
  return out.sort((u, v) => u.p1 - v.p1);
}

export interface RegionPiece {
  readonly regime: Regime;
  /** Polygon corners [p1, p2]: lower-left, lower-right, upper-right, upper-left. */
  readonly corners: [number, number][];
}

const EDGE = '|';

/** Curve ids left and right of p1 among the crossings (EDGE for the plot's border). */
function between(cross: readonly Crossing[], p1: number): [string, string] {
  let left = EDGE, right = EDGE;
  for (const c of cross) {
    if (c.p1 <= p1) left = c.curve;
    else { right = c.curve; break; }
  }
  return [left, right];
}

export interface RegionStripOptions {
  /** Strips over the second parameter's range (default 160). */
  readonly strips?: number;
}

/**
 * Region pieces of the map over ranges.first x ranges.second. Each interval of each strip becomes one
 * quadrilateral; neighbouring pieces of one regime share their edges exactly, so they draw as one area.
 */
export function regionPieces(map: MapDocumentView, options: RegionStripOptions = {}): RegionPiece[] {
  const strips = options.strips ?? 160;
  const [a0, a1] = [Math.min(...map.ranges.first), Math.max(...map.ranges.first)];
  const [b0, b1] = [Math.min(...map.ranges.second), Math.max(...map.ranges.second)];
  const samples: { p: [number, number]; regime: Regime; pair: [string, string] }[] = [];
  for (const g of map.regions) {
    if (!g.regime) continue;
    for (const p of g.samples) samples.push({ p, regime: g.regime, pair: between(crossingsAt(map.curves, p[1]), p[0]) });
  }
  if (samples.length === 0) return [];
  const rows = [...new Set(samples.map((q) => q.p[1]))].sort((u, v) => u - v);
  const pieces: RegionPiece[] = [];
  for (let k = 0; k < strips; k++) {
    const lo = b0 + ((b1 - b0) * k) / strips;
    const hi = b0 + ((b1 - b0) * (k + 1)) / strips;
    const mid = (lo + hi) / 2;
    const below = rows.filter((y) => y <= mid).pop() ?? rows[0];
    const above = rows.find((y) => y > mid) ?? rows[rows.length - 1];
    const cross = crossingsAt(map.curves, mid).filter((c) => c.p1 > a0 && c.p1 < a1);
    const lower = crossingsAt(map.curves, lo, true);
    const upper = crossingsAt(map.curves, hi, true);
    // The crossing of the same curve at the strip's edges nearest to its mid crossing (else the mid one: a vertical side).
    const at = (edge: readonly Crossing[], c: Crossing | null, fallback: number) => {
      if (!c) return fallback;
      let best = c.p1, d = Infinity;
      for (const e of edge) if (e.curve === c.curve && Math.abs(e.p1 - c.p1) < d) { d = Math.abs(e.p1 - c.p1); best = e.p1; }
      return Math.min(a1, Math.max(a0, best));
    };
    for (let i = 0; i <= cross.length; i++) {
      const left = i > 0 ? cross[i - 1] : null;
      const right = i < cross.length ? cross[i] : null;
      const pair: [string, string] = [left?.curve ?? EDGE, right?.curve ?? EDGE];
      const l = left?.p1 ?? a0, r = right?.p1 ?? a1;
      if (r <= l) continue;
      // Only the grid rows either side of the strip name it: a label carried from far rows would cross curves that turn in between.
      const near = samples.filter((q) => q.p[1] === below || q.p[1] === above);
      let pick: (typeof samples)[number] | null = null;
      let bestD = Infinity;
      for (const q of near) {
        if (q.pair[0] !== pair[0] || q.pair[1] !== pair[1]) continue;
        const d = Math.abs(q.p[1] - mid);
        if (d < bestD) { bestD = d; pick = q; }
      }
      if (!pick) {
        for (const q of near) {
          if (q.p[0] < l || q.p[0] > r) continue;
          const d = Math.abs(q.p[1] - mid);
          if (d < bestD) { bestD = d; pick = q; }
        }
      }
      if (!pick) continue;
      pieces.push({
        regime: pick.regime,
        corners: [[at(lower, left, a0), lo], [at(lower, right, a1), lo], [at(upper, right, a1), hi], [at(upper, left, a0), hi]],
      });
    }
  }
  return pieces;
}
