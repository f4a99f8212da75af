import { describe, expect, it } from 'vitest';
import { BranchIndex } from '../../../src/lib/atlas/branch-index.js';
import type { TracedPoint } from '../../../src/lib/numerics/branch-point-data.js';
import { distanceToSegment, dist2, dot } from '../../../src/lib/numerics/vector.js';

/**
 * Reference: the plain scan the index must agree with (the first version of the index): 3 x 3 cells of
 * (parameter cell, one projection cell), entries in insertion order, first hit returned
 * (common practice, no source).
 */
class PlainScan {
  readonly lists: { branch: number; points: { y: Float64Array; t: Float64Array }[] }[] = [];
  private readonly cells = new Map<number, { list: number; idx: number }[]>();
  private readonly w: Float64Array;
  constructor(private readonly cellWidth: number, private readonly n: number, private readonly maxStep: number) {
    const w = Float64Array.from({ length: n }, (_, i) => 1 + ((i * 0.6180339887498949) % 1));
    const norm = Math.hypot(...w);
    this.w = w.map((v) => v / norm);
  }
  private coords(y: Float64Array): [number, number] {
    let s = 0;
    for (let i = 0; i < this.n; i++) s += this.w[i] * y[i];
    return [Math.floor(y[this.n] / this.cellWidth), Math.max(-1e7, Math.min(1e7, Math.floor(s / (2 * this.maxStep))))];
  }
  addList(branch: number): number {
    this.lists.push({ branch, points: [] });
    return this.lists.length - 1;
  }
  push(list: number, y: Float64Array, t: Float64Array): void {
    this.lists[list].points.push({ y, t });
    const [pc, xc] = this.coords(y);
    const k = pc * 4e7 + xc;
    if (!this.cells.has(k)) this.cells.set(k, []);
    this.cells.get(k)!.push({ list, idx: this.lists[list].points.length - 1 });
  }
  findParallel(y: Float64Array, t: Float64Array, tol: number, skip: (l: number) => boolean) {
    const [pc, xc] = this.coords(y);
    const reach = tol + this.maxStep;
    for (let a = -1; a <= 1; a++) for (let b = -1; b <= 1; b++) {
      for (const e of this.cells.get((pc + a) * 4e7 + xc + b) ?? []) {
        const pts = this.lists[e.list].points;
        const q = pts[e.idx];
        if (q.y.some((v, i) => Math.abs(v - y[i]) > reach) || skip(e.list)) continue;
        if (Math.abs(dot(q.t, t)) < 0.95) continue;
        const prev = e.idx > 0 ? pts[e.idx - 1] : q;
        const next = e.idx + 1 < pts.length ? pts[e.idx + 1] : q;
        if (Math.min(distanceToSegment(y, prev.y, q.y), distanceToSegment(y, q.y, next.y)) < tol) return e;
      }
    }
    return null;
  }
  hasPoint(y: Float64Array, tol: number): boolean {
    const [pc, xc] = this.coords(y);
    for (let a = -1; a <= 1; a++) for (let b = -1; b <= 1; b++) {
      for (const e of this.cells.get((pc + a) * 4e7 + xc + b) ?? []) if (dist2(this.lists[e.list].points[e.idx].y, y) < tol) return true;
    }
    return false;
  }
}

describe('BranchIndex', () => {
  it('findParallel and hasPoint give the same answers as the plain scan on 40 random overlapping polylines (same first hit)', () => {
    let s = 9;
    const rnd = () => (s = (s * 16807) % 2147483647) / 2147483647;
    for (const n of [1, 3, 6]) {
      const maxStep = 0.02;
      const cellWidth = 1 / 600;
      const index = new BranchIndex(cellWidth, n, maxStep);
      const plain = new PlainScan(cellWidth, n, maxStep);
      const all: { y: Float64Array; t: Float64Array }[] = [];
      for (let b = 0; b < 40; b++) {
        const l1 = index.addList(b);
        const l2 = plain.addList(b);
        // Polylines in a small box so that many pass through the same cells; some copy an earlier one.
        const y = Float64Array.from({ length: n + 1 }, () => 0.2 * rnd());
        const dir = Float64Array.from({ length: n + 1 }, () => rnd() - 0.5);
        for (let k = 0; k < 60; k++) {
          const t = Float64Array.from(dir, (v) => v / Math.hypot(...dir));
          const h = maxStep * (0.2 + 0.8 * rnd());
          for (let i = 0; i <= n; i++) {
            y[i] += h * t[i];
            dir[i] += 0.3 * (rnd() - 0.5);
          }
          const yy = Float64Array.from(y);
          index.push(l1, { y: yy, t } as unknown as TracedPoint);
          plain.push(l2, yy, t);
          all.push({ y: yy, t });
        }
      }
      let hits = 0;
      let present = 0;
      for (let q = 0; q < 3000; q++) {
        const base = all[Math.floor(rnd() * all.length)];
        const y = Float64Array.from(base.y, (v) => v + 0.004 * (rnd() - 0.5));
        const t = Float64Array.from(base.t, (v) => v + 0.2 * (rnd() - 0.5));
        const tn = Math.hypot(...t);
        for (let i = 0; i <= n; i++) t[i] /= tn;
        const tol = 1e-7 + 0.05 * maxStep * rnd() + (q % 10 === 0 ? 0.01 : 0);
        const skipList = Math.floor(rnd() * 80);
        const skip = (l: number) => l === skipList;
        const got = index.findParallel(y, t, tol, skip);
        const want = plain.findParallel(y, t, tol, skip);
        expect(got === null ? null : { list: got.list, idx: got.idx }).toEqual(want);
        if (want) hits++;
        const ptol = 3e-3 * rnd();
        const has = plain.hasPoint(y, ptol);
        expect(index.hasPoint(y, ptol)).toBe(has);
        if (has) present++;
      }
      // Both outcomes occur often enough for the comparison to mean something.
      expect(hits).toBeGreaterThan(200);
      expect(present).toBeGreaterThan(100);
      expect(present).toBeLessThan(2900);
    }
  });
});
