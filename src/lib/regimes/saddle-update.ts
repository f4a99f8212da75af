import type { CompiledSystem } from '../model/compiled-system';
import type { Eigenvalue } from '../atlas/types';
import type { Equilibrium } from './equilibria-at';
import { luWorkspace, rememberJacobian, spectrum } from './linear-algebra';

/**
 * What the last full spectrum of an index-1 saddle said, carried along while the saddle is continued
 * without one: the Jacobian there, its unstable eigenvalue and the largest real part of the others.
 */
export interface SpectralReference {
  readonly jac: Float64Array;
  readonly value: number;
  readonly rest: number;
}

const references = new WeakMap<Equilibrium, SpectralReference>();

/** Records the full spectrum's data of an index-1 saddle (analyseEquilibrium does, for every one). */
export function rememberReference(e: Equilibrium, ref: SpectralReference): void {
  references.set(e, ref);
}

export function referenceOf(e: Equilibrium): SpectralReference | undefined {
  return references.get(e);
}

/** Why an update was refused (the caller then computes the full spectrum); 'accepted' otherwise. */
export type SaddleUpdateOutcome = 'accepted' | 'no-reference' | 'singular' | 'not-converged' | 'not-unstable' | 'separation' | 'parity';

/**
 * The unstable eigenpair of an index-1 saddle continued from `previous` (same branch, nearby p),
 * without the full spectrum, with a proof that the saddle still has index 1 and no eigenvalue within
 * `tol` of the imaginary axis; null (with the reason in `outcome`) when the proof fails, and the
 * caller computes the full spectrum (analyseEquilibrium).
 *
 * Method. Shifted inverse iteration from the previous unit eigenvector v₀ (Golub & Van Loan, Matrix
 * Computations, 4th ed., §7.6.1): shift μ = ρ₀ + 1e-8 max(1, |ρ₀|) with ρ₀ = v₀ᵀ J v₀ the Rayleigh
 * quotient of v₀ at the new point (the shift rule of the full path, linear-algebra.ts), passes of
 * (J − μ I) y⁺ = y, normalized, until ‖J y − ρ y‖₂ ≤ 1e-12 max(1, ‖J‖_F) with ρ = yᵀ J y (at most
 * six passes; each shrinks the other components by |λ − μ| / |λ_j − μ|, and v₀ is already close);
 * accepted when that residual is reached and λ = ρ > tol.
 *
 * Safeguards, all required:
 * 1. Separation (the ordering cannot have changed). Let J_r be the Jacobian of the reference (the last
 *    point where the full spectrum was computed), λ_r its unstable eigenvalue, ρ_r the largest real
 *    part of its other eigenvalues, and E = ‖J − J_r‖_F ≥ ‖J − J_r‖₂. For a normal J_r (symmetric: two-way
 *    links with equal weights) every eigenvalue of J_r + t(J − J_r), 0 ≤ t ≤ 1, lies within tE of one of
 *    J_r (Bauer–Fike, Golub & Van Loan Thm. 7.2.2, with κ(V) = 1); the disc of radius E about λ_r and
 *    the half-plane Re ≤ ρ_r + E are disjoint when λ_r − E > ρ_r + E, so by continuity each keeps its
 *    count of eigenvalues along t: one (real, since a complex one would bring its conjugate) near λ_r,
 *    and n − 1 with Re ≤ ρ_r + E. Required: λ_r − E > ρ_r + E, ρ_r + E < −tol and |λ − λ_r| ≤ E (the
 *    eigenvalue found is the one near λ_r). For a non-normal J_r the factor κ(V) ≥ 1 is not computed,
 *    so there the test is a heuristic, backed by 2.
 * 2. Parity, for a Jacobian that is not exactly symmetric (exact for any J): sign det J = (−1)^(n − r)
 *    with r the number of real positive eigenvalues (complex pairs contribute |λ|² > 0), so an index-1
 *    saddle has sign det J = (−1)^(n−1). This refuses a continuation that crossed a fold of the saddle or
 *    that Newton's method took onto a stable state or an index-2 saddle (r = 0 or 2). (For a symmetric J
 *    it is implied by 1.)
 * The reference stays the point of the last full spectrum, so E grows with the distance from it and a
 * long run of updates ends in a full spectrum by itself. `eigenvalues` of an updated saddle are
 * computed on first use.
 */
export function updateSaddle(
  system: CompiledSystem,
  x: Float64Array,
  p: number,
  residual: number,
  tol: number,
  previous: Equilibrium,
  outcome?: { reason: SaddleUpdateOutcome },
): Equilibrium | null {
  const reason = tryUpdate(system, x, p, residual, tol, previous);
  if (outcome) outcome.reason = typeof reason === 'string' ? reason : 'accepted';
  return typeof reason === 'string' ? null : reason;
}

const MAX_PASSES = 6;

function tryUpdate(system: CompiledSystem, x: Float64Array, p: number, residual: number, tol: number, previous: Equilibrium): Equilibrium | SaddleUpdateOutcome {
  const ref = references.get(previous);
  const v0 = previous.unstableVector;
  if (!ref || !v0) return 'no-reference';
  const n = system.dimension;
  const jac = system.jacobian(x, p, new Float64Array(n * n));
  let e2 = 0;
  let j2 = 0;
  let symmetric = true;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const a = jac[i * n + j];
      const d = a - ref.jac[i * n + j];
      e2 += d * d;
      j2 += a * a;
      if (j > i && a !== jac[j * n + i]) symmetric = false;
    }
  }
  const dist = Math.sqrt(e2);
  if (!(ref.value - dist > ref.rest + dist) || !(ref.rest + dist < -tol)) return 'separation';
  const lu = luWorkspace(n);
  if (!symmetric) {
    lu.factor(jac);
    if (lu.singular || !(Math.sign(lu.determinant) === (n % 2 === 1 ? 1 : -1))) return 'parity';
  }
  let y: Float64Array = Float64Array.from(v0);
  let rho = rayleigh(jac, n, y);
  const mu = rho + 1e-8 * Math.max(1, Math.abs(rho));
  const shifted = shiftedWork(n);
  shifted.set(jac);
  for (let i = 0; i < n; i++) shifted[i * n + i] -= mu;
  lu.factor(shifted);
  const accuracy = 1e-12 * Math.max(1, Math.sqrt(j2));
  let converged = false;
  for (let pass = 0; pass < MAX_PASSES && !converged; pass++) {
    const z = lu.solve(y);
    if (!z) return 'singular';
    let norm = 0;
    for (let i = 0; i < n; i++) norm += z[i] * z[i];
    norm = Math.sqrt(norm);
    if (!(norm > 0) || !Number.isFinite(norm)) return 'singular';
    for (let i = 0; i < n; i++) z[i] /= norm;
    y = z;
    rho = rayleigh(jac, n, y);
    converged = residualOf(jac, n, y, rho) <= accuracy;
  }
  if (!converged) return 'not-converged';
  if (!(rho > tol)) return 'not-unstable';
  if (!(Math.abs(rho - ref.value) <= dist)) return 'separation';
  let big = 0;
  for (let i = 1; i < n; i++) if (Math.abs(y[i]) > Math.abs(y[big])) big = i;
  const sign = y[big] < 0 ? -1 : 1;
  const unstableVector = Array.from(y, (c) => sign * c);
  const out = updated(x, residual, rho, unstableVector, previous.branch, jac, n);
  references.set(out, ref);
  rememberJacobian(out, jac);
  return out;
}

/** An updated saddle; its eigenvalues are computed on first use. */
function updated(x: Float64Array, residual: number, value: number, vector: number[], branch: string | undefined, jac: Float64Array, n: number): Equilibrium {
  let values: Eigenvalue[] | null = null;
  return {
    x: Array.from(x), residual, unstable: 1, neutral: 0, unstableValue: value, unstableVector: vector, branch,
    get eigenvalues() {
      if (!values) { const s = spectrum(jac, n); values = s.re.map((re, k) => ({ re, im: s.im[k] })); }
      return values;
    },
  };
}

const shiftedWorks = new Map<number, Float64Array>();
function shiftedWork(n: number): Float64Array {
  let w = shiftedWorks.get(n);
  if (!w) shiftedWorks.set(n, (w = new Float64Array(n * n)));
  return w;
}

/** yᵀ J y / yᵀ y. */
function rayleigh(jac: Float64Array, n: number, y: ArrayLike<number>): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) s += jac[i * n + j] * y[j];
    num += y[i] * s;
    den += y[i] * y[i];
  }
  return num / den;
}

/** ‖J y − ρ y‖₂. */
function residualOf(jac: Float64Array, n: number, y: ArrayLike<number>, rho: number): number {
  let r2 = 0;
  for (let i = 0; i < n; i++) {
    let s = -rho * y[i];
    for (let j = 0; j < n; j++) s += jac[i * n + j] * y[j];
    r2 += s * s;
  }
  return Math.sqrt(r2);
}
