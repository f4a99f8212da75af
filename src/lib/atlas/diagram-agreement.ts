import { BranchIndex } from './branch-index.js';
import type { TracedPoint } from '../numerics/branch-point-data.js';
import type { Branch, Diagram } from './types.js';

export interface DiagramAgreement {
  /** Special points of the reference with one of the same type in the other diagram within the tolerance (|dp| and every |dx_i|). */
  readonly specialFound: number;
  readonly specialTotal: number;
  /** Points of the reference's branches within the point tolerance of a branch of the other diagram (running the same way). */
  readonly pointsOn: number;
  readonly pointsTotal: number;
  /** Identical as JSON text. */
  readonly identical: boolean;
}

/**
 * How much of `reference` the diagram `other` contains: every special point to `specialTol` (the
 * state of a branch point to `branchPointStateTol`), every
 * branch point on some branch of `other` (2-norm distance in (x, p) to its polyline below
 * `pointTol`, with a nearly parallel direction, BranchIndex.findParallel). Used to compare a trace
 * in blocks with the one-block trace (docs/numerics.md §11).
 */
export function diagramAgreement(reference: Diagram, other: Diagram, specialTol: number, pointTol: number, branchPointStateTol = specialTol): DiagramAgreement {
  const n = reference.variables.length;
  let specialFound = 0;
  for (const a of reference.bifurcations) {
    const xTol = a.evidence.kind === 'branch-point' ? branchPointStateTol : specialTol;
    if (other.bifurcations.some((b) => b.type === a.type && Math.abs(b.p - a.p) <= specialTol && b.x.every((v, i) => Math.abs(v - a.x[i]) <= xTol))) specialFound++;
  }
  const { index } = polylineIndex(branchPolylines(other.branches, n), n, widthOf(reference) / 600);
  let pointsOn = 0;
  let pointsTotal = 0;
  for (const ys of branchPolylines(reference.branches, n)) {
    for (let j = 0; j < ys.length; j++) {
      pointsTotal++;
      if (index.findParallel(ys[j], direction(ys, j), pointTol, () => false)) pointsOn++;
    }
  }
  return { specialFound, specialTotal: reference.bifurcations.length, pointsOn, pointsTotal, identical: JSON.stringify(reference) === JSON.stringify(other) };
}

/**
 * Points of a diagram's branches that run along another of its branches (within `pointTol`, nearly
 * parallel), leaving out the two points at each end of a branch (where a 'merged' branch meets the
 * one it ran onto): 0 when no stretch of a branch is traced twice.
 */
export function overlapPoints(d: Diagram, pointTol: number): number {
  const n = d.variables.length;
  const { lines, index } = polylineIndex(branchPolylines(d.branches, n), n, widthOf(d) / 600);
  let overlap = 0;
  lines.forEach((ys, k) => {
    for (let j = 2; j < ys.length - 2; j++) if (index.findParallel(ys[j], direction(ys, j), pointTol, (l) => l === k)) overlap++;
  });
  return overlap;
}

/** y = [x, p]. */
export function pointY(p: number, x: readonly number[], n: number): Float64Array {
  const y = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) y[i] = x[i];
  y[n] = p;
  return y;
}

/** The polylines of stored branches, y = [x, p] per point. */
export function branchPolylines(branches: readonly Branch[], n: number): Float64Array[][] {
  return branches.map((b) => b.points.map((q) => pointY(q.p, q.x, n)));
}

/**
 * A BranchIndex over polylines (list k = polyline k), each point with the secant direction through
 * its neighbours (`direction`) as its tangent, for findParallel on stored branches. `maxStep`
 * defaults to the longest segment.
 */
export function polylineIndex(lines: Float64Array[][], n: number, cellWidth: number, maxStep?: number): { lines: Float64Array[][]; index: BranchIndex } {
  let step = maxStep ?? 0;
  if (maxStep === undefined) for (const ys of lines) for (let j = 1; j < ys.length; j++) step = Math.max(step, dist(ys[j - 1], ys[j]));
  const index = new BranchIndex(cellWidth, n, Math.max(step, 1e-9));
  lines.forEach((ys, k) => {
    const l = index.addList(k);
    for (let j = 0; j < ys.length; j++) index.push(l, { y: ys[j], t: direction(ys, j) } as TracedPoint);
  });
  return { lines, index };
}

function widthOf(d: Diagram): number {
  return Math.abs(Number(d.settings.to) - Number(d.settings.from)) || 1;
}

function dist(a: Float64Array, b: Float64Array): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d += (a[i] - b[i]) ** 2;
  return Math.sqrt(d);
}

/** Unit secant through the neighbours of point j (the nearest distinct ones). */
export function direction(ys: readonly Float64Array[], j: number): Float64Array {
  const m = ys[j].length;
  let a = Math.max(0, j - 1);
  let b = Math.min(ys.length - 1, j + 1);
  const t = new Float64Array(m);
  for (let tries = 0; tries < 4; tries++) {
    const d = dist(ys[a], ys[b]);
    if (d > 0) {
      for (let i = 0; i < m; i++) t[i] = (ys[b][i] - ys[a][i]) / d;
      return t;
    }
    a = Math.max(0, a - 1);
    b = Math.min(ys.length - 1, b + 1);
  }
  return t;
}
