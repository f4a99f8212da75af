/**
 * Regime regions of a map (docs/maps.md §6): labelAt (src/lib/regimes) on a coarse grid, grouped into
 * connected regions, each with the curves that separate it from its neighbours.
 */
import type { Diagnostic, Diagram } from '../atlas/types.js';
import type { CompiledSystem } from '../model/compiled-system.js';
import { labelAt } from '../regimes/label-at.js';
import type { Regime } from '../regimes/types.js';
import type { MapCurve, MapRegion } from './map-types.js';

/** Does the polyline of a curve cross the segment u-w in the parameter plane? */
function crosses(curve: MapCurve, u: [number, number], w: [number, number]): boolean {
  const pts = curve.points;
  const orient = (p: readonly number[], q: readonly number[], r: readonly number[]) => (q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]);
  for (let i = 0; i + 1 < pts.length; i++) {
    const p = pts[i].p;
    const q = pts[i + 1].p;
    const d1 = orient(u, w, p);
    const d2 = orient(u, w, q);
    const d3 = orient(p, q, u);
    const d4 = orient(p, q, w);
    // Touching counts (curves end exactly on the range bounds, where grid rows lie); collinear does not.
    const apart = (e1: number, e2: number) => (e1 <= 0 && e2 >= 0) || (e1 >= 0 && e2 <= 0);
    if (!(d1 === 0 && d2 === 0) && apart(d1, d2) && apart(d3, d4)) return true;
  }
  return false;
}

/**
 * Regime regions (docs/maps.md §5): the label of `labelAt` (src/lib/regimes) at every grid sample
 * (columns in the first parameter x rows in the second, each row on the one-parameter diagram at that
 * second value), grouped into 4-connected components of equal label; for every pair of neighbouring
 * samples with different labels, the curves crossing the segment between them are the region's
 * bounding curves (no curve there: an unlocated edge, e.g. a saddle connection).
 */
export function regimeRegions(
  diagrams: ReadonlyMap<number, { system: CompiledSystem; diagram: Diagram }>,
  rows: readonly number[], cols: readonly number[], curves: readonly MapCurve[], diagnostics: Diagnostic[], isCancelled: () => boolean,
): MapRegion[] {
  const R = rows.length;
  const C = cols.length;
  const label: { regime: Regime | null; reason: string }[] = [];
  for (let r = 0; r < R; r++) {
    const entry = diagrams.get(rows[r])!;
    for (let c = 0; c < C; c++) {
      if (isCancelled()) return [];
      try {
        const l = labelAt(entry.system, entry.diagram, cols[c]);
        label.push({ regime: l.regime, reason: l.reason });
      } catch (e) {
        label.push({ regime: null, reason: `label failed: ${e instanceof Error ? e.message : String(e)}` });
      }
    }
  }
  const key = (i: number) => label[i].regime ?? `none:${label[i].reason}`;
  const comp = new Array<number>(R * C).fill(-1);
  const regions: { regime: Regime | null; reason: string; cells: number[]; bounded: Set<string>; unlocated: number }[] = [];
  for (let i = 0; i < R * C; i++) {
    if (comp[i] >= 0) continue;
    const id = regions.length;
    const cells: number[] = [];
    const stack = [i];
    comp[i] = id;
    while (stack.length > 0) {
      const cur = stack.pop()!;
      cells.push(cur);
      const r = Math.floor(cur / C);
      const c = cur % C;
      for (const [dr, dc] of [[1, 0], [-1, 0], [0, 1], [0, -1]]) {
        const r2 = r + dr;
        const c2 = c + dc;
        if (r2 < 0 || r2 >= R || c2 < 0 || c2 >= C) continue;
        const nb = r2 * C + c2;
        if (comp[nb] < 0 && key(nb) === key(i)) {
          comp[nb] = id;
          stack.push(nb);
        }
      }
    }
    regions.push({ regime: label[i].regime, reason: label[i].reason, cells: cells.sort((x, y) => x - y), bounded: new Set(), unlocated: 0 });
  }
  for (let i = 0; i < R * C; i++) {
    const r = Math.floor(i / C);
    const c = i % C;
    for (const nb of [c + 1 < C ? i + 1 : -1, r + 1 < R ? i + C : -1]) {
      if (nb < 0 || comp[nb] === comp[i]) continue;
      const u: [number, number] = [cols[c], rows[r]];
      const w: [number, number] = [cols[nb % C], rows[Math.floor(nb / C)]];
      const hit = curves.filter((cv) => crosses(cv, u, w)).map((cv) => cv.id);
      for (const side of [comp[i], comp[nb]]) {
        for (const h of hit) regions[side].bounded.add(h);
        if (hit.length === 0) regions[side].unlocated++;
      }
    }
  }
  if (regions.length > 1 && regions.some((g) => g.unlocated > 0)) {
    diagnostics.push({ level: 'info', code: 'region-edge-unlocated', message: 'some neighbouring grid samples differ in regime with no continued curve between them (a saddle connection or crossover of the regime rule, which this map does not continue; or a curve outside the seeds)' });
  }
  return regions.map((g, k) => ({
    id: `r${k + 1}`,
    regime: g.regime,
    reason: g.reason,
    samples: g.cells.map((i) => [cols[i % C], rows[Math.floor(i / C)]] as [number, number]),
    boundedBy: [...g.bounded].sort(),
    unlocatedEdges: g.unlocated,
  }));
}
