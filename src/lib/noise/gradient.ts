import type { CompiledSystem } from '../model/compiled-system';

/** Options of isGradient. */
export interface GradientOptions {
  /**
   * Largest allowed asymmetry max_ij |K_ij - K_ji| of the scaled Jacobian K = D^-1 J D, relative to
   * max(1, max_ij |K_ij|) at the same point. Default 1e-8: the Jacobians are compiled from symbolic
   * derivatives, so a gradient field gives exact symmetry up to rounding (about 1e-15 relative);
   * 1e-8 leaves room for rounding in large sums (common practice, no source).
   */
  readonly tolerance: number;
}

export const defaultGradientOptions: GradientOptions = { tolerance: 1e-8 };

export interface GradientTest {
  /** True when the scaled Jacobian is symmetric (within tolerance) at every sampled point. */
  readonly gradient: boolean;
  /** Largest relative asymmetry found over the samples (0 for n = 1). */
  readonly residual: number;
  /** The point where `residual` was found (original coordinates), or null without samples. */
  readonly worst: readonly number[] | null;
  readonly samples: number;
}

/**
 * Whether the noise-scaled field is a gradient at the sampled points. In the scaled coordinates
 * y = D^-1 x (D = diag(weights)) the drift is G(y) = D^-1 F(D y) with Jacobian K = D^-1 J_x D. A
 * C^1 field on a simply connected domain is a gradient, G = -grad U, iff K is symmetric everywhere
 * (Poincaré's lemma; e.g. Apostol, Calculus vol. II, §10.16). Only the given points are checked, so
 * `gradient: true` means "symmetric wherever we looked" (callers sample the equilibria, the straight
 * segments and the manifold paths between them), not a proof. Never throws; non-finite Jacobian
 * entries count as asymmetric.
 */
export function isGradient(
  system: CompiledSystem,
  p: number,
  points: readonly ArrayLike<number>[],
  weights: Float64Array,
  options?: Partial<GradientOptions>,
): GradientTest {
  const o = { ...defaultGradientOptions, ...(options ?? {}) };
  const n = system.dimension;
  const x = new Float64Array(n);
  const jac = new Float64Array(n * n);
  let residual = 0;
  let worst: number[] | null = null;
  for (const pt of points) {
    for (let i = 0; i < n; i++) x[i] = pt[i];
    system.jacobian(x, p, jac);
    let scale = 1;
    let asym = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const kij = (jac[i * n + j] * weights[j]) / weights[i];
        if (!Number.isFinite(kij)) { asym = Infinity; continue; }
        scale = Math.max(scale, Math.abs(kij));
        if (j > i) {
          const kji = (jac[j * n + i] * weights[i]) / weights[j];
          asym = Math.max(asym, Math.abs(kij - kji));
        }
      }
    }
    const rel = asym / scale;
    if (!(rel <= residual)) { residual = rel; worst = Array.from(x); }
    if (worst === null) worst = Array.from(x);
  }
  return { gradient: points.length > 0 && residual <= o.tolerance, residual, worst: points.length ? worst : null, samples: points.length };
}
