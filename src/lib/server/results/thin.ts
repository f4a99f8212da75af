/**
 * Thinning a diagram to a point budget for drawing. A branch keeps, whatever the budget: both ends,
 * both neighbours of every change of the unstable count (where stability is lost or gained) and
 * every turning point of the parameter (a fold); the rest of each branch's share of the budget is
 * spread evenly by index. Shares are proportional to branch length. The shape a person sees is
 * kept; the exact stored points remain available unthinned. (Common practice, no source.)
 */
import type { Branch, BranchPoint, Diagram } from '../../atlas/types.ts';

function keepIndices(points: readonly BranchPoint[], share: number): number[] {
  const n = points.length;
  if (n <= share || n <= 2) return points.map((_, i) => i);
  const keep = new Set<number>([0, n - 1]);
  for (let i = 1; i < n; i++) {
    if (points[i].unstable !== points[i - 1].unstable) { keep.add(i - 1); keep.add(i); }
    if (i < n - 1) {
      const a = points[i].p - points[i - 1].p;
      const b = points[i + 1].p - points[i].p;
      if (a * b < 0) keep.add(i);
    }
  }
  const room = Math.max(0, share - keep.size);
  if (room > 0) {
    const stride = (n - 1) / (room + 1);
    for (let k = 1; k <= room; k++) keep.add(Math.round(k * stride));
  }
  return [...keep].sort((x, y) => x - y);
}

/** The diagram with at most about `budget` points in all (never fewer than the kept features). */
export function thinDiagram(diagram: Diagram, budget: number): Diagram & { thinned?: { from: number; to: number } } {
  const total = diagram.branches.reduce((s, b) => s + b.points.length, 0);
  if (total <= budget) return diagram;
  const branches: Branch[] = diagram.branches.map((b) => {
    const share = Math.max(2, Math.floor((budget * b.points.length) / total));
    const idx = keepIndices(b.points, share);
    return { ...b, points: idx.map((i) => b.points[i]) };
  });
  const after = branches.reduce((s, b) => s + b.points.length, 0);
  return { ...diagram, branches, thinned: { from: total, to: after } };
}
