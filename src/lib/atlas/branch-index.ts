import type { TracedPoint } from '../numerics/branch-point-data.js';
import { distanceToSegment, dist2, dot } from '../numerics/vector.js';

/** What the index keeps of a point: position and tangent (not the spectrum, to keep the heap small). */
export interface IndexedPoint {
  readonly y: Float64Array;
  readonly t: Float64Array;
}

export interface IndexedList {
  readonly branch: number;
  readonly points: IndexedPoint[];
}

/**
 * Spatial index of traced points for merge and duplicate-start checks. Points are bucketed on a 2-D
 * grid: the parameter (cells of the largest parameter step) and a fixed unit-length projection of
 * the state (cells of twice the largest arclength step). A point within `reach` of the query lies in
 * the query's cell or a neighbouring one in both coordinates, so 9 cells are searched.
 */
export class BranchIndex {
  private readonly cells = new Map<number, { list: number; idx: number }[]>();
  readonly lists: IndexedList[] = [];
  private readonly weights: Float64Array;
  private readonly projWidth: number;

  constructor(private readonly cellWidth: number, private readonly n: number, private readonly maxStep: number) {
    // Golden-ratio weights: a fixed direction unlikely to be orthogonal to differences between branches.
    const w = Float64Array.from({ length: n }, (_, i) => 1 + ((i * 0.6180339887498949) % 1));
    const norm = Math.hypot(...w);
    this.weights = w.map((v) => v / norm);
    this.projWidth = 2 * maxStep;
  }

  private coords(y: Float64Array): [number, number] {
    let s = 0;
    for (let i = 0; i < this.n; i++) s += this.weights[i] * y[i];
    const pc = Math.floor(y[this.n] / this.cellWidth);
    const xc = Math.max(-1e7, Math.min(1e7, Math.floor(s / this.projWidth)));
    return [pc, xc];
  }

  private static key(pc: number, xc: number): number {
    return pc * 4e7 + xc;
  }

  addList(branch: number): number {
    this.lists.push({ branch, points: [] });
    return this.lists.length - 1;
  }

  push(list: number, pt: TracedPoint): void {
    const l = this.lists[list];
    l.points.push({ y: pt.y, t: pt.t });
    const [pc, xc] = this.coords(pt.y);
    const k = BranchIndex.key(pc, xc);
    let c = this.cells.get(k);
    if (!c) this.cells.set(k, (c = []));
    c.push({ list, idx: l.points.length - 1 });
  }

  private *near(y: Float64Array): Generator<{ list: number; idx: number }> {
    const [pc, xc] = this.coords(y);
    for (let a = -1; a <= 1; a++) {
      for (let b = -1; b <= 1; b++) {
        const c = this.cells.get(BranchIndex.key(pc + a, xc + b));
        if (c) yield* c;
      }
    }
  }

  /** Is y (within tol in the 2-norm, tol below the cell sizes) a point already traced? */
  hasPoint(y: Float64Array, tol: number): boolean {
    for (const e of this.near(y)) {
      if (dist2(this.lists[e.list].points[e.idx].y, y) < tol) return true;
    }
    return false;
  }

  /**
   * A traced segment of another list passing within tol of y with a nearly parallel tangent
   * (|cos| > 0.95), i.e. the same branch traced before. Crossing branches (branch points) are not parallel.
   */
  findParallel(y: Float64Array, t: Float64Array, tol: number, skip: (list: number) => boolean): { list: number; idx: number } | null {
    const m = this.n + 1;
    const reach = tol + this.maxStep;
    for (const e of this.near(y)) {
      const pts = this.lists[e.list].points;
      const q = pts[e.idx];
      // Cheap rejection before the segment distances: neighbours are at most one step apart.
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
    return null;
  }
}
