import type { CompiledSystem } from '../model/compiled-system';

/** Options of potentialDifference. */
export interface PotentialOptions {
  /** Each polyline segment is split into this many equal pieces, each integrated by 5-point Gauss–Legendre. Default 4. */
  readonly pieces: number;
}

export const defaultPotentialOptions: PotentialOptions = { pieces: 4 };

// 5-point Gauss–Legendre nodes and weights on [-1, 1] (Abramowitz & Stegun, Table 25.4).
const GL_X = [0, -0.5384693101056831, 0.5384693101056831, -0.906179845938664, 0.906179845938664];
const GL_W = [0.5688888888888889, 0.47862867049936647, 0.47862867049936647, 0.23692688505618908, 0.23692688505618908];

export interface PotentialDifference {
  /** U(end) - U(start) for G = -grad U in scaled coordinates, i.e. -int_path sum_i F_i dx_i / w_i^2. */
  readonly difference: number;
  /** Rate evaluations used. */
  readonly evaluations: number;
  /** False when a rate evaluation was not finite (the difference is then NaN). */
  readonly finite: boolean;
}

/**
 * Potential difference along a polyline x_0, ..., x_m (original coordinates) for a gradient field.
 * In scaled coordinates y = x / w the drift is G = D^-1 F and dy = D^-1 dx, so
 *   U(x_m) - U(x_0) = -int G . dy = -int sum_i F_i(x) dx_i / w_i^2.
 * Composite 5-point Gauss–Legendre on every segment (exact for polynomial rates of degree <= 9 along
 * a segment, e.g. cubic networks). For a gradient field the result does not depend on the path;
 * for a field that is not one it is the work along this particular path and means nothing by itself,
 * so callers test isGradient first and compare two paths. The barrier of Freidlin–Wentzell theory is
 * 2 (U(saddle) - U(state)) (docs/noise.md).
 */
export function potentialDifference(
  system: CompiledSystem,
  p: number,
  path: readonly ArrayLike<number>[],
  weights: Float64Array,
  options?: Partial<PotentialOptions>,
): PotentialDifference {
  const o = { ...defaultPotentialOptions, ...(options ?? {}) };
  const n = system.dimension;
  const pieces = Math.max(1, Math.floor(o.pieces));
  const x = new Float64Array(n);
  const f = new Float64Array(n);
  const iw2 = weights.map((w) => 1 / (w * w));
  let sum = 0;
  let evaluations = 0;
  for (let s = 0; s + 1 < path.length; s++) {
    const a = path[s];
    const b = path[s + 1];
    for (let k = 0; k < pieces; k++) {
      const t0 = k / pieces;
      const h = 1 / pieces;
      for (let q = 0; q < 5; q++) {
        const t = t0 + 0.5 * h * (1 + GL_X[q]);
        for (let i = 0; i < n; i++) x[i] = a[i] + t * (b[i] - a[i]);
        system.rates(x, p, f);
        evaluations++;
        let dot = 0;
        for (let i = 0; i < n; i++) dot += f[i] * (b[i] - a[i]) * iw2[i];
        sum += 0.5 * h * GL_W[q] * dot;
      }
    }
  }
  const finite = Number.isFinite(sum);
  return { difference: finite ? -sum : Number.NaN, evaluations, finite };
}
