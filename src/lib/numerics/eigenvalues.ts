import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { hessenbergQrEigenvalues } from './hessenberg-qr.js';
import { symmetricEigenvalues } from './symmetric-eigenvalues.js';

export interface Spectrum {
  readonly re: Float64Array;
  readonly im: Float64Array;
  /** False when the matrix had non-finite entries (then re/im are NaN). */
  readonly ok: boolean;
}

/**
 * Eigenvalues of a real square row-major matrix. n <= 2: closed form. Non-symmetric n >= 3:
 * eigenvalue-only Hessenberg reduction plus Francis double-shift QR (hessenberg-qr.ts; Golub &
 * Van Loan, 4th ed., Alg. 7.4.2 / 7.5.2), bit-identical to ml-matrix's EigenvalueDecomposition but
 * without eigenvectors; if its sweep cap is hit, ml-matrix's decomposition is used instead.
 * Exactly symmetric n >= 3: Householder tridiagonalisation and the implicit QL iteration
 * (symmetric-eigenvalues.ts, tred2/tql2), bit-identical to ml-matrix's EigenvalueDecomposition's
 * symmetric path but without eigenvectors and Matrix objects. Complex eigenvalues come in conjugate pairs with
 * exactly opposite imaginary parts.
 */
export function eigenvalues(a: Float64Array, n: number): Spectrum {
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(a[i])) {
      return { re: new Float64Array(n).fill(Number.NaN), im: new Float64Array(n).fill(Number.NaN), ok: false };
    }
  }
  if (n === 1) return { re: Float64Array.of(a[0]), im: Float64Array.of(0), ok: true };
  if (n === 2) {
    // Closed form of the 2x2 characteristic polynomial lambda^2 - tr lambda + det = 0.
    const tr = a[0] + a[3];
    const det = a[0] * a[3] - a[1] * a[2];
    const disc = 0.25 * tr * tr - det;
    if (disc >= 0) {
      const s = Math.sqrt(disc);
      // Stable form: the larger-magnitude root first, the other from det / root.
      const r1 = tr >= 0 ? 0.5 * tr + s : 0.5 * tr - s;
      const r2 = r1 !== 0 ? det / r1 : 0.5 * tr - s;
      return { re: Float64Array.of(r1, r2), im: Float64Array.of(0, 0), ok: true };
    }
    const w = Math.sqrt(-disc);
    return { re: Float64Array.of(0.5 * tr, 0.5 * tr), im: Float64Array.of(w, -w), ok: true };
  }
  if (isSymmetric(a, n)) return { re: symmetricEigenvalues(a, n), im: new Float64Array(n), ok: true };
  const r = hessenbergQrEigenvalues(a, n);
  if (r.converged) return { re: r.values.re, im: r.values.im, ok: true };
  const evd = new EigenvalueDecomposition(Matrix.from1DArray(n, n, a));
  return { re: Float64Array.from(evd.realEigenvalues), im: Float64Array.from(evd.imaginaryEigenvalues), ok: true };
}

/** Exact symmetry, the test ml-matrix uses to choose its symmetric path. */
function isSymmetric(a: Float64Array, n: number): boolean {
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) if (a[i * n + j] !== a[j * n + i]) return false;
  return true;
}

/** Spectral scale max(1, max |lambda|), used to make eigenvalue tolerances relative. */
export function spectralScale(s: Spectrum): number {
  let m = 1;
  for (let i = 0; i < s.re.length; i++) m = Math.max(m, Math.hypot(s.re[i], s.im[i]));
  return m;
}

/**
 * Number of eigenvalues with Re lambda > tol * scale (default tol 1e-9): the equilibrium's unstable
 * dimension. Eigenvalues within the tolerance of the imaginary axis count as neutral, not unstable.
 */
export function unstableCount(s: Spectrum, tol = 1e-9): number {
  const eps = tol * spectralScale(s);
  let c = 0;
  for (let i = 0; i < s.re.length; i++) if (s.re[i] > eps) c++;
  return c;
}

export interface PairSumTest {
  /** sign(psi) * min |factor|, where psi = prod_{i<j} (lambda_i + lambda_j). Continuous; zero at Hopf and neutral saddles. */
  readonly value: number;
  /** The factor of smallest magnitude: a complex pair (2 Re lambda) or two real eigenvalues. */
  readonly critical: { readonly kind: 'complex-pair'; readonly re: number; readonly im: number } | { readonly kind: 'real-pair'; readonly a: number; readonly b: number } | null;
}

/**
 * Hopf test function without bialternate products: psi = prod_{i<j} (lambda_i + lambda_j), which is
 * det of the bialternate product 2 J (.) I (Kuznetsov, Elements of Applied Bifurcation Theory,
 * 3rd ed., §10.2; Govaerts, Numerical Methods for Bifurcations of Dynamical Equilibria, §4.4).
 * Only real factors decide its sign: a conjugate pair contributes 2 Re lambda, two real eigenvalues
 * contribute their sum, every other factor comes with its complex conjugate (positive product).
 * The returned value keeps psi's sign with the magnitude of the smallest real factor, which is smooth
 * and has a simple zero where one factor crosses zero, convenient for secant location.
 * psi also vanishes at a neutral saddle (lambda, -lambda real): callers must inspect `critical`.
 */
export function pairSumTest(s: Spectrum): PairSumTest {
  const reals: number[] = [];
  const pairs: { re: number; im: number }[] = [];
  for (let i = 0; i < s.re.length; i++) {
    if (s.im[i] === 0) reals.push(s.re[i]);
    else if (s.im[i] > 0) pairs.push({ re: s.re[i], im: s.im[i] });
  }
  let sign = 1;
  let best = Number.POSITIVE_INFINITY;
  let critical: PairSumTest['critical'] = null;
  for (const c of pairs) {
    const f = 2 * c.re;
    if (f < 0) sign = -sign;
    if (Math.abs(f) < best) {
      best = Math.abs(f);
      critical = { kind: 'complex-pair', re: c.re, im: c.im };
    }
  }
  for (let i = 0; i < reals.length; i++) {
    for (let j = i + 1; j < reals.length; j++) {
      const f = reals[i] + reals[j];
      if (f < 0) sign = -sign;
      if (Math.abs(f) < best) {
        best = Math.abs(f);
        critical = { kind: 'real-pair', a: reals[i], b: reals[j] };
      }
    }
  }
  if (critical === null) return { value: Number.POSITIVE_INFINITY, critical: null };
  return { value: sign * best, critical };
}

/** Number of eigenvalues with |lambda| <= tol * scale (default 1e-6): zero eigenvalues at a special point. */
export function nearZeroCount(s: Spectrum, tol = 1e-6): number {
  const eps = tol * spectralScale(s);
  let c = 0;
  for (let i = 0; i < s.re.length; i++) if (Math.hypot(s.re[i], s.im[i]) <= eps) c++;
  return c;
}
