import { describe, expect, it } from 'vitest';
import { splitAllRuns, splitRuns } from '../../../src/lib/plot/runs';
import { makeTwoLakeDiagram } from '../../fixtures/two-lake';

const pt = (p: number, unstable: number) => ({ p, x: [p], unstable });

describe('splitRuns', () => {
  it('starts a new run at every change of the unstable count, sharing the change point', () => {
    const runs = splitRuns({ id: 'b', points: [pt(0, 0), pt(1, 0), pt(2, 1), pt(3, 1), pt(4, 2), pt(5, 0)] });
    expect(runs.map((r) => [r.start, r.end, r.unstable, r.stable])).toEqual([
      [0, 2, 0, true], [2, 4, 1, false], [4, 5, 2, false], [5, 5, 0, true],
    ]);
  });
  it('a branch of constant index is one run over all points', () => {
    expect(splitRuns({ id: 'b', points: [pt(0, 1), pt(1, 1), pt(2, 1)] })).toEqual([
      { branchId: 'b', runIndex: 0, unstable: 1, stable: false, start: 0, end: 2 },
    ]);
  });
  it('an empty branch has no runs', () => {
    expect(splitRuns({ id: 'b', points: [] })).toEqual([]);
  });
  it('the symmetric two-lake branch splits into index 0, 1, 2, 1, 0', () => {
    // Derivation (tests/fixtures/two-lake.ts): on x₁ = x₂ = x the eigenvalues are 1 − 3x² and 1 − 3x² − 2d.
    // With d = 0.1: both negative for |x| > 1/√3, one positive for √(0.8/3) < |x| < 1/√3, both positive inside.
    const d = makeTwoLakeDiagram({ coupling: 0.1, pointsPerBranch: 401 });
    expect(splitRuns(d.branches[0]).map((r) => r.unstable)).toEqual([0, 1, 2, 1, 0]);
    expect(splitAllRuns(d.branches).length).toBeGreaterThan(5);
  });
});
