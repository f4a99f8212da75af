import type { TracedPoint } from '../numerics/branch-point-data.js';
import { distanceToSegment, dist2, dot } from '../numerics/vector.js';

export interface IndexedList {
  readonly branch: number;
  readonly points: TracedPoint[];
}

/**
 * Spatial index of traced points bucketed by parameter cells, for merge and duplicate-start checks.
 * Cell width is at least the largest parameter step, so consecutive points fall in neighbouring cells.
 */
export class BranchIndex {
  private readonly cells = new Map<number, { list: number; idx: number }[]>();
  readonly lists: IndexedList[] = [];
  constructor(private readonly cellWidth: number, private readonly n: number, private readonly maxStep: number) {}

  private key(p: number): number {
    return Math.floor(p / this.cellWidth);
  }

  addList(branch: number): number {
    this.lists.push({ branch, points: [] });
    return this.lists.length - 1;
  }

  push(list: number, pt: TracedPoint): void {
    const l = this.lists[list];
    l.points.push(pt);
    const k = this.key(pt.y[this.n]);
    let c = this.cells.get(k);
    if (!c) this.cells.set(k, (c = []));
    c.push({ list, idx: l.points.length - 1 });
  }

  /** Is y (within tol in the 2-norm) a point already traced? */
  hasPoint(y: Float64Array, tol: number): boolean {
    const k = this.key(y[this.n]);
    for (let d = -1; d <= 1; d++) {
      for (const e of this.cells.get(k + d) ?? []) {
        if (dist2(this.lists[e.list].points[e.idx].y, y) < tol) return true;
      }
    }
    return false;
  }

  /**
   * A traced segment of another list passing within tol of y with a nearly parallel tangent
   * (|cos| > 0.95), i.e. the same branch traced before. Crossing branches (branch points) are not parallel.
   */
  findParallel(y: Float64Array, t: Float64Array, tol: number, skip: (list: number) => boolean): { list: number; idx: number } | null {
    const k = this.key(y[this.n]);
    const m = this.n + 1;
    const reach = tol + this.maxStep;
    for (let d = -1; d <= 1; d++) {
      for (const e of this.cells.get(k + d) ?? []) {
        const pts = this.lists[e.list].points;
        const q = pts[e.idx];
        // Cheap rejection before the segment distances: neighbours are at most a few cell widths apart.
        let far = false;
        for (let i = 0; i < m; i++) {
          if (Math.abs(q.y[i] - y[i]) > reach) {
            far = true;
            break;
          }
        }
        if (far || skip(e.list)) continue;
        if (Math.abs(dot(q.t, t)) < 0.95) continue;
        const prev = e.idx > 0 ? pts[e.idx - 1] : q;
        const next = e.idx + 1 < pts.length ? pts[e.idx + 1] : q;
        const dd = Math.min(distanceToSegment(y, prev.y, q.y), distanceToSegment(y, q.y, next.y));
        if (dd < tol) return e;
      }
    }
    return null;
  }
}
