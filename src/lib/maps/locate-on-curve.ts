/**
 * Location of a test function's zero between two consecutive points of a curve (docs/maps.md §4).
 */
import { dot } from '../numerics/vector.js';
import { correctExtended, type ExtendedSystem } from '../numerics/extended-system.js';

export interface Located {
  readonly y: Float64Array;
  readonly value: number;
  readonly converged: boolean;
}

/**
 * Zero of a test function between two consecutive curve points ya, yb (values fa, fb of opposite
 * sign): the Illinois variant of regula falsi (Dahlquist & Björck, Numerical Methods, §6.2) on the
 * chord parameter u in [0, 1]; the trial point solves the extended system with
 * d . (y - (ya + u (yb - ya))) = 0, d the unit chord (residual 1e-12). Stops when the bracket is
 * shorter than 1e-13 (1 + |y|) along the chord or the value is exactly 0; cap 100 iterations.
 */
export function locateOnChord(ext: ExtendedSystem, ya: Float64Array, yb: Float64Array, fa: number, fb: number, test: (y: Float64Array) => number): Located | null {
  const N = ya.length;
  const chord = new Float64Array(N);
  let len = 0;
  for (let k = 0; k < N; k++) {
    chord[k] = yb[k] - ya[k];
    len += chord[k] ** 2;
  }
  len = Math.sqrt(len);
  if (!(len > 0)) return null;
  for (let k = 0; k < N; k++) chord[k] /= len;
  let size = 1;
  for (let k = 0; k < N; k++) size = Math.max(size, 1 + Math.abs(ya[k]));
  let lo = 0;
  let hi = 1;
  let flo = fa;
  let fhi = fb;
  let side = 0;
  let best: Located | null = null;
  for (let it = 0; it < 100; it++) {
    const u = (lo * fhi - hi * flo) / (fhi - flo);
    const g = new Float64Array(N);
    for (let k = 0; k < N; k++) g[k] = ya[k] + u * (yb[k] - ya[k]);
    const r = correctExtended(ext, g, chord, dot(chord, g), { residualTolerance: 1e-12, stepTolerance: 1e-13, maxIterations: 20, earlyStepTolerance: 1e-13, maxDisplacement: len });
    if (!r.converged && !(r.residual < 1e-11)) break;
    const value = test(r.y);
    if (!Number.isFinite(value)) break;
    best = { y: r.y, value, converged: false };
    if (value === 0 || (hi - lo) * len < 1e-13 * size) return { ...best, converged: true };
    if (Math.sign(value) === Math.sign(flo)) {
      lo = u;
      flo = value;
      if (side === -1) fhi /= 2;
      side = -1;
    } else {
      hi = u;
      fhi = value;
      if (side === 1) flo /= 2;
      side = 1;
    }
  }
  return best;
}
