/**
 * LU factorization with partial pivoting of a square row-major matrix held in one Float64Array,
 * P A = L U (Golub & Van Loan, Matrix Computations, 4th ed., Alg. 3.4.1), with a reusable workspace.
 * Why not numerics/dense-lu.ts: that wraps ml-matrix's LuDecomposition (arrays of rows, a copy per
 * factorization) and costs about 1.2 ms per 65 × 65 factorization on the bench machine against
 * 0.07 ms here (docs/onset.md, "Speed"); the critical-coupling analysis factorizes ~10^4 of them.
 * Zero multipliers are skipped, so sparse rows (a sparse network's Jacobian) cost little.
 * A pivot with |u_kk| <= size · 2^-52 · |A|_inf counts as singular (tolerance scaled to the matrix
 * norm, not exact zero); the determinant is then still the product of the pivots.
 */
export class FlatLu {
  readonly size: number;
  private readonly lu: Float64Array;
  private readonly piv: Int32Array;
  /** det(A) (product of the pivots with the permutation's sign); NaN for non-finite input. */
  determinant = Number.NaN;
  /** True when a pivot fell below the tolerance or the input was not finite. */
  singular = true;

  constructor(size: number) {
    this.size = size;
    this.lu = new Float64Array(size * size);
    this.piv = new Int32Array(size);
  }

  /** Factorizes a (not modified). Returns this. */
  factor(a: Float64Array): this {
    const m = this.size;
    const lu = this.lu;
    let norm = 0;
    for (let i = 0; i < m; i++) {
      let row = 0;
      for (let j = 0; j < m; j++) row += Math.abs(a[i * m + j]);
      norm = Math.max(norm, row);
    }
    if (!Number.isFinite(norm)) {
      this.determinant = Number.NaN;
      this.singular = true;
      return this;
    }
    lu.set(a);
    const tol = m * 2 ** -52 * norm;
    let det = 1;
    let singular = false;
    for (let k = 0; k < m; k++) {
      let p = k;
      let big = Math.abs(lu[k * m + k]);
      for (let i = k + 1; i < m; i++) {
        const v = Math.abs(lu[i * m + k]);
        if (v > big) {
          big = v;
          p = i;
        }
      }
      this.piv[k] = p;
      if (p !== k) {
        for (let j = 0; j < m; j++) {
          const t = lu[k * m + j];
          lu[k * m + j] = lu[p * m + j];
          lu[p * m + j] = t;
        }
        det = -det;
      }
      const d = lu[k * m + k];
      det *= d;
      if (!(Math.abs(d) > tol)) {
        singular = true;
        continue;
      }
      const rk = k * m;
      for (let i = k + 1; i < m; i++) {
        const ri = i * m;
        const f = (lu[ri + k] /= d);
        if (f === 0) continue;
        for (let j = k + 1; j < m; j++) lu[ri + j] -= f * lu[rk + j];
      }
    }
    this.determinant = det;
    this.singular = singular;
    return this;
  }

  /** Solves A z = b (b not modified). Null when singular or the solution is not finite. */
  solve(b: ArrayLike<number>): Float64Array | null {
    if (this.singular) return null;
    const m = this.size;
    const lu = this.lu;
    const z = Float64Array.from(b);
    for (let k = 0; k < m; k++) {
      const p = this.piv[k];
      if (p !== k) {
        const t = z[k];
        z[k] = z[p];
        z[p] = t;
      }
    }
    for (let i = 1; i < m; i++) {
      let s = z[i];
      for (let j = 0; j < i; j++) s -= lu[i * m + j] * z[j];
      z[i] = s;
    }
    for (let i = m - 1; i >= 0; i--) {
      let s = z[i];
      for (let j = i + 1; j < m; j++) s -= lu[i * m + j] * z[j];
      z[i] = s / lu[i * m + i];
      if (!Number.isFinite(z[i])) return null;
    }
    return z;
  }
}
