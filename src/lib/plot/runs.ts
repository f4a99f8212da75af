/**
 * Splitting a branch into runs of constant stability index, so that each run is drawn as one line
 * with one style (stable solid and heavy, unstable dashed and light).
 */
import type { Branch } from '../atlas/types';

export interface BranchRun {
  readonly branchId: string;
  /** Position of the run along its branch, 0-based. */
  readonly runIndex: number;
  /** Number of eigenvalues with positive real part along the run. */
  readonly unstable: number;
  readonly stable: boolean;
  /** First and last point index (inclusive) in branch.points. */
  readonly start: number;
  readonly end: number;
}

/**
 * Runs of a branch: a new run starts wherever `unstable` changes between consecutive points.
 * Consecutive runs share the point where the index changes (run k ends at index i, run k+1 starts at i),
 * so the drawn line has no gap at the bifurcation. A one-point branch gives one one-point run.
 */
export function splitRuns(branch: Pick<Branch, 'id' | 'points'>): BranchRun[] {
  const pts = branch.points;
  if (pts.length === 0) return [];
  const runs: BranchRun[] = [];
  let start = 0;
  for (let i = 1; i < pts.length; i++) {
    if (pts[i].unstable !== pts[i - 1].unstable) {
      const u = pts[start].unstable;
      runs.push({ branchId: branch.id, runIndex: runs.length, unstable: u, stable: u === 0, start, end: i });
      start = i;
    }
  }
  const u = pts[start].unstable;
  runs.push({ branchId: branch.id, runIndex: runs.length, unstable: u, stable: u === 0, start, end: pts.length - 1 });
  return runs;
}

/** All runs of all branches, in branch order. */
export function splitAllRuns(branches: readonly Pick<Branch, 'id' | 'points'>[]): BranchRun[] {
  return branches.flatMap((b) => splitRuns(b));
}
