export interface HessenbergQrOptions {
  /** Cap on QR sweeps over the whole matrix (default 30 n, as EISPACK hqr); then converged = false. */
  maxIterations?: number;
}

export interface HessenbergQrResult {
  /** False when the sweep cap was hit before every eigenvalue deflated (values then partly NaN). */
  readonly converged: boolean;
  /** QR sweeps done. */
  readonly iterations: number;
  /** Real and imaginary parts; a complex pair is stored as (re, +im), (re, -im) in consecutive slots. */
  readonly values: { readonly re: Float64Array; readonly im: Float64Array };
}

/**
 * Eigenvalues only (no eigenvectors) of a real square row-major matrix A (n x n), A not mutated.
 * Method: reduction to upper Hessenberg form by Householder reflections (Golub & Van Loan, Matrix
 * Computations, 4th ed., Alg. 7.4.2), then the Francis implicit double-shift QR iteration with
 * deflation on negligible subdiagonals |h_{l,l-1}| < eps (|h_{l-1,l-1}| + |h_{l,l}|) and exceptional
 * shifts after 10 and 30 sweeps without deflation (Alg. 7.5.2; Wilkinson & Reinsch, Handbook for
 * Automatic Computation II, contribution II/14 "hqr").
 * The floating-point operations are those of the eigenvalue part of the JAMA/EISPACK hqr2 port used
 * by ml-matrix's EigenvalueDecomposition (non-symmetric path), with columns of deflated eigenvalues left alone
 * and without the accumulation of the transformations; the eigenvalues are therefore the same to the
 * last bit (tests/lib/numerics/hessenberg-qr.test.ts checks this), at a fraction of the cost
 * (no eigenvector matrix, no back-substitution, no Matrix objects).
 * Returns { converged: false } instead of throwing when the cap is hit.
 */
export function hessenbergQrEigenvalues(a: ArrayLike<number>, n: number, options: HessenbergQrOptions = {}): HessenbergQrResult {
  const H = scratch(n);
  for (let i = 0; i < n * n; i++) H[i] = a[i];
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  reduceToHessenberg(H, n);
  const maxIterations = options.maxIterations ?? 30 * Math.max(1, n);
  const r = francisQr(H, n, d, e, maxIterations);
  return { converged: r.converged, iterations: r.iterations, values: { re: d, im: e } };
}

// One working copy and one Householder vector per size, reused: the engine calls this at every point.
const squares = new Map<number, Float64Array>();
const vectors = new Map<number, Float64Array>();
function scratch(n: number): Float64Array {
  let h = squares.get(n);
  if (!h) squares.set(n, (h = new Float64Array(n * n)));
  return h;
}

/** Householder reduction of H (row-major, in place) to upper Hessenberg form (orthes without V). */
function reduceToHessenberg(H: Float64Array, n: number): void {
  const low = 0;
  const high = n - 1;
  let ort = vectors.get(n);
  if (!ort) vectors.set(n, (ort = new Float64Array(n)));
  for (let m = low + 1; m <= high - 1; m++) {
    let scale = 0;
    for (let i = m; i <= high; i++) scale = scale + Math.abs(H[i * n + m - 1]);
    if (scale === 0) continue;
    let h = 0;
    for (let i = high; i >= m; i--) {
      ort[i] = H[i * n + m - 1] / scale;
      h += ort[i] * ort[i];
    }
    let g = Math.sqrt(h);
    if (ort[m] > 0) g = -g;
    h = h - ort[m] * g;
    ort[m] = ort[m] - g;
    // H = (I - u u^T / h) H
    for (let j = m; j < n; j++) {
      let f = 0;
      for (let i = high; i >= m; i--) f += ort[i] * H[i * n + j];
      f = f / h;
      for (let i = m; i <= high; i++) H[i * n + j] = H[i * n + j] - f * ort[i];
    }
    // H = H (I - u u^T / h)
    for (let i = 0; i <= high; i++) {
      let f = 0;
      for (let j = high; j >= m; j--) f += ort[j] * H[i * n + j];
      f = f / h;
      for (let j = m; j <= high; j++) H[i * n + j] = H[i * n + j] - f * ort[j];
    }
    ort[m] = scale * ort[m];
    H[m * n + m - 1] = scale * g;
  }
}

/** Francis double-shift QR on the Hessenberg matrix H (in place); eigenvalues into d (re), e (im). */
function francisQr(H: Float64Array, nn: number, d: Float64Array, e: Float64Array, maxIterations: number): { converged: boolean; iterations: number } {
  let n = nn - 1;
  const low = 0;
  const eps = Number.EPSILON;
  let exshift = 0;
  let norm = 0;
  let p = 0;
  let q = 0;
  let r = 0;
  let s = 0;
  let z = 0;
  let w = 0;
  let x = 0;
  let y = 0;
  let iter = 0;
  let total = 0;
  for (let i = 0; i < nn; i++) for (let j = Math.max(i - 1, 0); j < nn; j++) norm = norm + Math.abs(H[i * nn + j]);

  while (n >= low) {
    let l = n;
    while (l > low) {
      s = Math.abs(H[(l - 1) * nn + l - 1]) + Math.abs(H[l * nn + l]);
      if (s === 0) s = norm;
      if (Math.abs(H[l * nn + l - 1]) < eps * s) break;
      l--;
    }
    if (l === n) {
      // One root.
      H[n * nn + n] = H[n * nn + n] + exshift;
      d[n] = H[n * nn + n];
      e[n] = 0;
      n--;
      iter = 0;
    } else if (l === n - 1) {
      // Two roots from the trailing 2x2 block.
      w = H[n * nn + n - 1] * H[(n - 1) * nn + n];
      p = (H[(n - 1) * nn + n - 1] - H[n * nn + n]) / 2;
      q = p * p + w;
      z = Math.sqrt(Math.abs(q));
      H[n * nn + n] = H[n * nn + n] + exshift;
      H[(n - 1) * nn + n - 1] = H[(n - 1) * nn + n - 1] + exshift;
      x = H[n * nn + n];
      if (q >= 0) {
        z = p >= 0 ? p + z : p - z;
        d[n - 1] = x + z;
        d[n] = d[n - 1];
        if (z !== 0) d[n] = x - w / z;
        e[n - 1] = 0;
        e[n] = 0;
      } else {
        d[n - 1] = x + p;
        d[n] = x + p;
        e[n - 1] = z;
        e[n] = -z;
      }
      n = n - 2;
      iter = 0;
    } else {
      if (total >= maxIterations) {
        for (let i = 0; i <= n; i++) {
          d[i] = Number.NaN;
          e[i] = Number.NaN;
        }
        return { converged: false, iterations: total };
      }
      x = H[n * nn + n];
      y = 0;
      w = 0;
      if (l < n) {
        y = H[(n - 1) * nn + n - 1];
        w = H[n * nn + n - 1] * H[(n - 1) * nn + n];
      }
      // Exceptional shifts (Wilkinson & Reinsch II/14).
      if (iter === 10) {
        exshift += x;
        for (let i = low; i <= n; i++) H[i * nn + i] = H[i * nn + i] - x;
        s = Math.abs(H[n * nn + n - 1]) + Math.abs(H[(n - 1) * nn + n - 2]);
        x = y = 0.75 * s;
        w = -0.4375 * s * s;
      }
      if (iter === 30) {
        s = (y - x) / 2;
        s = s * s + w;
        if (s > 0) {
          s = Math.sqrt(s);
          if (y < x) s = -s;
          s = x - w / ((y - x) / 2 + s);
          for (let i = low; i <= n; i++) H[i * nn + i] = H[i * nn + i] - s;
          exshift += s;
          x = y = w = 0.964;
        }
      }
      iter = iter + 1;
      total++;
      // Look for two consecutive small subdiagonal elements.
      let m = n - 2;
      while (m >= l) {
        z = H[m * nn + m];
        r = x - z;
        s = y - z;
        p = (r * s - w) / H[(m + 1) * nn + m] + H[m * nn + m + 1];
        q = H[(m + 1) * nn + m + 1] - z - r - s;
        r = H[(m + 2) * nn + m + 1];
        s = Math.abs(p) + Math.abs(q) + Math.abs(r);
        p = p / s;
        q = q / s;
        r = r / s;
        if (m === l) break;
        if (Math.abs(H[m * nn + m - 1]) * (Math.abs(q) + Math.abs(r)) < eps * (Math.abs(p) * (Math.abs(H[(m - 1) * nn + m - 1]) + Math.abs(z) + Math.abs(H[(m + 1) * nn + m + 1])))) break;
        m--;
      }
      for (let i = m + 2; i <= n; i++) {
        H[i * nn + i - 2] = 0;
        if (i > m + 2) H[i * nn + i - 3] = 0;
      }
      // Double QR step. Columns right of n belong to deflated eigenvalues and are left alone
      // (no Schur vectors needed). Rows above l are still updated: the deflation test is relative
      // to the diagonal, so a negligible subdiagonal can become non-negligible again later.
      for (let k = m; k <= n - 1; k++) {
        const notlast = k !== n - 1;
        if (k !== m) {
          p = H[k * nn + k - 1];
          q = H[(k + 1) * nn + k - 1];
          r = notlast ? H[(k + 2) * nn + k - 1] : 0;
          x = Math.abs(p) + Math.abs(q) + Math.abs(r);
          if (x !== 0) {
            p = p / x;
            q = q / x;
            r = r / x;
          }
        }
        if (x === 0) break;
        s = Math.sqrt(p * p + q * q + r * r);
        if (p < 0) s = -s;
        if (s !== 0) {
          if (k !== m) H[k * nn + k - 1] = -s * x;
          else if (l !== m) H[k * nn + k - 1] = -H[k * nn + k - 1];
          p = p + s;
          x = p / s;
          y = q / s;
          z = r / s;
          q = q / p;
          r = r / p;
          // Row modification.
          for (let j = k; j <= n; j++) {
            p = H[k * nn + j] + q * H[(k + 1) * nn + j];
            if (notlast) {
              p = p + r * H[(k + 2) * nn + j];
              H[(k + 2) * nn + j] = H[(k + 2) * nn + j] - p * z;
            }
            H[k * nn + j] = H[k * nn + j] - p * x;
            H[(k + 1) * nn + j] = H[(k + 1) * nn + j] - p * y;
          }
          // Column modification.
          const iEnd = Math.min(n, k + 3);
          for (let i = 0; i <= iEnd; i++) {
            p = x * H[i * nn + k] + y * H[i * nn + k + 1];
            if (notlast) {
              p = p + z * H[i * nn + k + 2];
              H[i * nn + k + 2] = H[i * nn + k + 2] - p * r;
            }
            H[i * nn + k] = H[i * nn + k] - p;
            H[i * nn + k + 1] = H[i * nn + k + 1] - p * q;
          }
        }
      }
    }
  }
  return { converged: true, iterations: total };
}
