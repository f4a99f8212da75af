/**
 * Eyring–Kramers prefactor of the escape rate over one index-1 saddle of a gradient system.
 *
 * Derivation of the convention (docs/noise.md, "Weak-noise prediction"). Berglund (Markov Processes
 * Relat. Fields 19, 2013, the Eyring–Kramers law as stated in its introduction; formula from memory,
 * re-derived in 1-D below) states, for
 *   dx = -grad V(x) dt + sqrt(2 eps) dW,
 * the mean transition time from the minimum m over the saddle s to the next well
 *   E[tau] = 2 pi / |lambda_1(s)| * sqrt(|det Hess V(s)| / det Hess V(m)) * exp((V(s) - V(m)) / eps) (1 + o(1)),
 * lambda_1(s) the negative eigenvalue of Hess V(s). Our noise is `level dW` in the scaled coordinates
 * y = x / w, so sqrt(2 eps) = level, eps = level^2 / 2 and exp((V(s) - V(m)) / eps) = exp(2 dV / level^2)
 * = exp(barrier / level^2) with barrier = 2 dV (the quasi-potential convention of docs/noise.md). The
 * rate k = 1 / E[tau] = C exp(-barrier / level^2) therefore has
 *   C = |lambda_1(s)| / (2 pi) * sqrt(det Hess V(m) / |det Hess V(s)|).
 * In scaled coordinates the drift is D^-1 F(D y), D = diag(w), with Jacobian D^-1 J D, and for a
 * gradient field Hess V = -(D^-1 J D). Similarity leaves the spectrum alone, so det Hess V = (-1)^n det J
 * and lambda_1(s) = -mu(s), mu(s) > 0 the unstable eigenvalue of J at s. Hence
 *   C = mu(s) / (2 pi) * sqrt(|det J(m)| / |det J(s)|),  |det J| = prod_k |lambda_k(J)|,
 * independent of the weights. 1-D check: x' = x - x^3, J(-1) = -2, J(0) = 1: C = sqrt 2 / (2 pi),
 * E[tau] = pi sqrt 2 exp(1 / (2 sigma^2)) (Kramers 1940; Berglund 2013).
 */
import type { Eigenvalue } from '../atlas/types';

export interface PrefactorResult {
  /** C in k = C exp(-barrier / level^2); NaN when `ok` is false. */
  readonly prefactor: number;
  /** The saddle's unstable eigenvalue mu(s) used. */
  readonly unstableEigenvalue: number;
  readonly ok: boolean;
  /** Why the prefactor is not defined (non-hyperbolic state or saddle, wrong index). */
  readonly reason?: string;
}

/** Smallest |lambda| (relative to the largest) for which the quadratic approximation is trusted (common practice, no source). */
export const DEFAULT_DEGENERACY_TOLERANCE = 1e-8;

/**
 * C = mu(s) / (2 pi) sqrt(|det J(m)| / |det J(s)|), the Eyring–Kramers prefactor (Berglund 2013) from
 * the Jacobian spectra of the stable state m and the index-1 saddle s (derivation in the file head).
 * Assumptions: the field is a gradient in the scaled coordinates (checked by the caller), m is a
 * non-degenerate minimum (all Re lambda < 0) and s has exactly one positive eigenvalue and no
 * eigenvalue near zero (|lambda| > tolerance * max|lambda|); otherwise `ok` is false and the reason
 * says which (near a saddle-node the law needs the non-quadratic corrections reviewed in Berglund 2013).
 */
export function eyringKramersPrefactor(
  state: readonly Eigenvalue[],
  saddle: readonly Eigenvalue[],
  tolerance = DEFAULT_DEGENERACY_TOLERANCE,
): PrefactorResult {
  const fail = (reason: string, mu = Number.NaN): PrefactorResult => ({ prefactor: Number.NaN, unstableEigenvalue: mu, ok: false, reason });
  if (state.length === 0 || state.length !== saddle.length) return fail('state and saddle spectra must have the same, positive length');
  const scale = Math.max(...state.map(modulus), ...saddle.map(modulus));
  if (!(scale > 0) || !Number.isFinite(scale)) return fail('spectra are zero or not finite');
  const small = tolerance * scale;
  if (state.some((e) => !(e.re < -small))) return fail('the state is not a non-degenerate stable equilibrium');
  const positive = saddle.filter((e) => e.re > small);
  if (positive.length !== 1 || positive[0].im !== 0) return fail('the saddle does not have exactly one real unstable eigenvalue');
  if (saddle.some((e) => modulus(e) <= small)) return fail('the saddle has an eigenvalue near zero (non-quadratic saddle)', positive[0].re);
  // Log-sum of moduli avoids overflow of the determinants in larger networks.
  let logRatio = 0;
  for (const e of state) logRatio += Math.log(modulus(e));
  for (const e of saddle) logRatio -= Math.log(modulus(e));
  const mu = positive[0].re;
  return { prefactor: (mu / (2 * Math.PI)) * Math.exp(0.5 * logRatio), unstableEigenvalue: mu, ok: true };
}

function modulus(e: Eigenvalue): number {
  return Math.hypot(e.re, e.im);
}
