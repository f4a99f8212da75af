import type { CompiledSystem } from '../model/compiled-system.js';
import type { BorderedWorkspace } from './bordered.js';
import { eigenvalues, pairSumTest, unstableCount, type PairSumTest, type Spectrum } from './eigenvalues.js';

/** A converged point on a branch with everything the test functions need. */
export interface TracedPoint {
  /** (x_1..x_n, p). */
  readonly y: Float64Array;
  /** Unit tangent, oriented along the direction of travel. */
  readonly t: Float64Array;
  /** det [DH; t^T]: the branch-point test function. */
  readonly det: number;
  readonly spectrum: Spectrum;
  readonly unstable: number;
  /** Hopf / neutral-saddle test function (see pairSumTest). */
  readonly hopf: PairSumTest;
}

/** Eigenvalues of J_x at y and the derived stability and Hopf test values. */
export function pointData(system: CompiledSystem, y: Float64Array, t: Float64Array, det: number, ws: BorderedWorkspace): TracedPoint {
  const n = ws.n;
  for (let i = 0; i < n; i++) ws.x[i] = y[i];
  system.jacobian(ws.x, y[n], ws.jx);
  const spectrum = eigenvalues(ws.jx, n);
  return { y, t, det, spectrum, unstable: unstableCount(spectrum), hopf: pairSumTest(spectrum) };
}

/** The three test functions at a point: fold (t_p), branch point (det), Hopf (pair-sum test). */
export function testValues(pt: TracedPoint): { fold: number; branch: number; hopf: number } {
  return { fold: pt.t[pt.t.length - 1], branch: pt.det, hopf: pt.hopf.value };
}
