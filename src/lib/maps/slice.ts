/**
 * A one-parameter slice of a map (docs/maps.md §4): where its saddle-node curves cross a given value
 * of the second parameter. Each crossing of a curve segment is interpolated linearly and then solved
 * exactly: Newton on the fold system (saddle-node-curve.ts) with the second parameter fixed by the
 * border e_b, so the slice points are saddle-nodes of the one-parameter system at that value to the
 * corrector tolerance, not interpolated points.
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { correctExtended } from '../numerics/extended-system.js';
import { SaddleNodeSystem } from './saddle-node-curve.js';
import type { TwoParameterSystem } from './two-parameter-system.js';
import type { MapCurve } from './trace-map.js';

export interface SlicePoint {
  readonly curve: string;
  readonly p: number;
  readonly x: number[];
  readonly converged: boolean;
}

export function saddleNodesAt(sys: TwoParameterSystem, curves: readonly MapCurve[], b: number): SlicePoint[] {
  const n = sys.dimension;
  const out: SlicePoint[] = [];
  for (const curve of curves) {
    if (curve.type !== 'saddle-node') continue;
    const pts = curve.points;
    for (let i = 0; i + 1 < pts.length; i++) {
      const b0 = pts[i].p[1];
      const b1 = pts[i + 1].p[1];
      // Half-open test so a crossing exactly at a curve point is counted once.
      if (!((b0 <= b && b < b1) || (b1 <= b && b < b0) || (i + 2 === pts.length && b1 === b && b0 !== b))) continue;
      const w = b1 === b0 ? 0 : (b - b0) / (b1 - b0);
      const x = Float64Array.from(pts[i].x, (v, k) => v + w * (pts[i + 1].x[k] - v));
      const a = pts[i].p[0] + w * (pts[i + 1].p[0] - pts[i].p[0]);
      const j = sys.jacobian(x, a, b, new Float64Array(n * n));
      const svd = new SingularValueDecomposition(Matrix.from1DArray(n, n, j), { computeLeftSingularVectors: false });
      let imin = 0;
      for (let k = 1; k < n; k++) if (svd.diagonal[k] < svd.diagonal[imin]) imin = k;
      const v = Float64Array.from({ length: n }, (_, r) => svd.rightSingularVectors.get(r, imin));
      const ext = new SaddleNodeSystem(sys, v);
      const y = new Float64Array(2 * n + 2);
      y.set(x, 0);
      y.set(v, n);
      y[2 * n] = a;
      y[2 * n + 1] = b;
      const e = new Float64Array(2 * n + 2);
      e[2 * n + 1] = 1;
      const r = correctExtended(ext, y, e, b, { residualTolerance: 1e-13, stepTolerance: 1e-13, maxIterations: 30, earlyStepTolerance: 1e-13 });
      out.push({ curve: curve.id, p: r.y[2 * n], x: Array.from(r.y.subarray(0, n)), converged: r.converged || r.residual < 1e-12 });
    }
  }
  return out;
}
