/**
 * LU factorization with partial pivoting of a square row-major matrix, reported (not thrown) when
 * singular or non-finite. Method: Gaussian elimination with partial pivoting in the left-looking
 * (Crout, dot-product) ordering of JAMA (Golub & Van Loan, Matrix Computations, §3.4). The operations
 * and their order are those of ml-matrix's LuDecomposition, so factors, determinant and solutions are
 * the same to the last bit (checked in tests/lib/numerics/dense-lu.test.ts), but on a flat
 * Float64Array without Matrix objects or copies: it runs at every corrector iterate.
 */
export class DenseLu {
  readonly size: number;
  /** det(A); 0 when exactly singular, NaN when A had non-finite entries. */
  readonly determinant: number;
  /** True when A had non-finite entries or a zero pivot. */
  readonly singular: boolean;
  /** L (unit lower, below the diagonal) and U, row-major, rows permuted. */
  private readonly lu: Float64Array | null;
  private readonly pivot: Int32Array | null;

  constructor(a: Float64Array, size: number) {
    this.size = size;
    const nn = size * size;
    for (let i = 0; i < nn; i++) {
      if (!Number.isFinite(a[i])) {
        this.lu = null;
        this.pivot = null;
        this.determinant = Number.NaN;
        this.singular = true;
        return;
      }
    }
    const lu = new Float64Array(nn);
    for (let i = 0; i < nn; i++) lu[i] = a[i];
    const piv = new Int32Array(size);
    for (let i = 0; i < size; i++) piv[i] = i;
    let pivotSign = 1;
    let col = columns.get(size);
    if (!col) columns.set(size, (col = new Float64Array(size)));
    for (let j = 0; j < size; j++) {
      for (let i = 0; i < size; i++) col[i] = lu[i * size + j];
      for (let i = 0; i < size; i++) {
        const kmax = Math.min(i, j);
        let s = 0;
        for (let k = 0; k < kmax; k++) s += lu[i * size + k] * col[k];
        col[i] -= s;
        lu[i * size + j] = col[i];
      }
      let p = j;
      for (let i = j + 1; i < size; i++) if (Math.abs(col[i]) > Math.abs(col[p])) p = i;
      if (p !== j) {
        for (let k = 0; k < size; k++) {
          const t = lu[p * size + k];
          lu[p * size + k] = lu[j * size + k];
          lu[j * size + k] = t;
        }
        const v = piv[p];
        piv[p] = piv[j];
        piv[j] = v;
        pivotSign = -pivotSign;
      }
      const d = lu[j * size + j];
      if (d !== 0) for (let i = j + 1; i < size; i++) lu[i * size + j] = lu[i * size + j] / d;
    }
    let singular = false;
    let det = pivotSign;
    for (let j = 0; j < size; j++) {
      if (lu[j * size + j] === 0) singular = true;
      det *= lu[j * size + j];
    }
    this.lu = lu;
    this.pivot = piv;
    this.singular = singular;
    this.determinant = singular ? 0 : det;
  }

  /** Solves A z = b (forward then back substitution). Returns null when A is singular or z is not finite. */
  solve(b: ArrayLike<number>): Float64Array | null {
    const lu = this.lu;
    const piv = this.pivot;
    if (lu === null || piv === null || this.singular) return null;
    const n = this.size;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = b[piv[i]];
    for (let k = 0; k < n; k++) {
      const xk = x[k];
      for (let i = k + 1; i < n; i++) x[i] = x[i] - xk * lu[i * n + k];
    }
    for (let k = n - 1; k >= 0; k--) {
      x[k] = x[k] / lu[k * n + k];
      const xk = x[k];
      for (let i = 0; i < k; i++) x[i] = x[i] - xk * lu[i * n + k];
    }
    for (let i = 0; i < n; i++) if (!Number.isFinite(x[i])) return null;
    return x;
  }
}

/** Column scratch per size (the factorization itself is kept by the object, so it is not shared). */
const columns = new Map<number, Float64Array>();
