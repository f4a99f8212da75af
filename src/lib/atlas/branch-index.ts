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

interface Entry {
  readonly list: number;
  readonly idx: number;
  /** Insertion order, so that the first hit is the same whatever the bucketing. */
  readonly seq: number;
}

/**
 * Spatial index of traced points for merge and duplicate-start checks. Points are bucketed on a 3-D
 * grid: the parameter (cells of the largest parameter step) and two fixed unit-length projections of
 * the state (cells of twice the largest arclength step). The parameter and first projection pick 3x3
 * coarse cells as before; the second projection only splits each coarse cell, and a query visits the
 * sub-cells within its hit radius, so every candidate that can be a hit is still visited and the hit
 * returned is the one the plain 3x3 scan in insertion order would return first. The split matters
 * on large diagrams: with hundreds of branches one projection puts hundreds of unrelated points in
 * each coarse cell (measured: the index took ~30 % of the 6-node bench before the split).
 */
export class BranchIndex {
  private readonly cells = new Map<number, Map<number, Entry[]>>();
  readonly lists: IndexedList[] = [];
  private readonly weights: Float64Array;
  private readonly weights2: Float64Array;
  private readonly projWidth: number;
  private seq = 0;
  private readonly visitLists: Entry[][] = [];
  /** Largest 2-norm distance between consecutive points of a list: bounds how far a hit can be from its indexed point. */
  private maxSegment = 0;

  constructor(private readonly cellWidth: number, private readonly n: number, private readonly maxStep: number) {
    // Golden-ratio and sqrt(2) weights: fixed directions unlikely to be orthogonal to differences between branches.
    const w = Float64Array.from({ length: n }, (_, i) => 1 + ((i * 0.6180339887498949) % 1));
    const norm = Math.hypot(...w);
    this.weights = w.map((v) => v / norm);
    const w2 = Float64Array.from({ length: n }, (_, i) => ((i + 1) * 1.4142135623730951) % 1 - 0.5);
    const norm2 = Math.hypot(...w2) || 1;
    this.weights2 = w2.map((v) => v / norm2);
    this.projWidth = 2 * maxStep;
  }

  private coords(y: Float64Array): [number, number] {
    let s = 0;
    for (let i = 0; i < this.n; i++) s += this.weights[i] * y[i];
    const pc = Math.floor(y[this.n] / this.cellWidth);
    const xc = Math.max(-1e7, Math.min(1e7, Math.floor(s / this.projWidth)));
    return [pc, xc];
  }

  private fine(y: Float64Array): number {
    let s = 0;
    for (let i = 0; i < this.n; i++) s += this.weights2[i] * y[i];
    return Math.max(-1e7, Math.min(1e7, Math.floor(s / this.projWidth)));
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
    if (l.points.length > 0) this.maxSegment = Math.max(this.maxSegment, dist2(l.points[l.points.length - 1].y, pt.y));
    l.points.push({ y: pt.y, t: pt.t });
    const [pc, xc] = this.coords(pt.y);
    const k = BranchIndex.key(pc, xc);
    let c = this.cells.get(k);
    if (!c) this.cells.set(k, (c = new Map()));
    const f = this.fine(pt.y);
    let e = c.get(f);
    if (!e) c.set(f, (e = []));
    e.push({ list, idx: l.points.length - 1, seq: this.seq++ });
  }

  /** Sub-cell offsets to visit so that every point within `radius` (2-norm) of y is seen. */
  private fineReach(radius: number): number {
    if (!(radius < Number.POSITIVE_INFINITY)) return 2e7;
    return Math.max(1, Math.ceil(radius / this.projWidth));
  }

  /** Is y (within tol in the 2-norm, tol below the cell sizes) a point already traced? */
  hasPoint(y: Float64Array, tol: number): boolean {
    return this.pointList(y, tol) !== null;
  }

  /** The list of a traced point within tol of y (the first one the scan meets), or null: hasPoint saying which. */
  pointList(y: Float64Array, tol: number): number | null {
    const [pc, xc] = this.coords(y);
    const f = this.fine(y);
    const fr = this.fineReach(tol);
    for (let a = -1; a <= 1; a++) {
      for (let b = -1; b <= 1; b++) {
        const c = this.cells.get(BranchIndex.key(pc + a, xc + b));
        if (!c) continue;
        for (const [fk, entries] of c) {
          if (Math.abs(fk - f) > fr) continue;
          for (const e of entries) if (dist2(this.lists[e.list].points[e.idx].y, y) < tol) return e.list;
        }
      }
    }
    return null;
  }

  /**
   * A traced segment of another list passing within tol of y with a nearly parallel tangent
   * (|cos| > 0.95), i.e. the same branch traced before. Crossing branches (branch points) are not parallel.
   */
  findParallel(y: Float64Array, t: Float64Array, tol: number, skip: (list: number) => boolean): { list: number; idx: number } | null {
    const m = this.n + 1;
    const reach = tol + this.maxStep;
    const [pc, xc] = this.coords(y);
    const f = this.fine(y);
    // A hit lies within tol of a segment that ends at the indexed point.
    const fr = this.fineReach(tol + this.maxSegment);
    let best: Entry | null = null;
    for (let a = -1; a <= 1; a++) {
      for (let b = -1; b <= 1; b++) {
        const c = this.cells.get(BranchIndex.key(pc + a, xc + b));
        if (!c) continue;
        const lists = this.visitLists;
        lists.length = 0;
        if (fr === 1) {
          for (let k = f - 1; k <= f + 1; k++) {
            const entries = c.get(k);
            if (entries) lists.push(entries);
          }
        } else {
          for (const [fk, entries] of c) if (Math.abs(fk - f) <= fr) lists.push(entries);
        }
        for (let li = 0; li < lists.length; li++) {
          const entries = lists[li];
          for (let ei = 0; ei < entries.length; ei++) {
            const e = entries[ei];
            if (best !== null && e.seq >= best.seq) break;
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
            if (dd < tol) {
              best = e;
              break;
            }
          }
        }
        // Coarse cells are scanned in the plain scan's order: a hit in an earlier cell wins.
        if (best !== null) return best;
      }
    }
    return null;
  }
}
