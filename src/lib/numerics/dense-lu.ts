/**
 * LU factorization with partial pivoting of a square row-major matrix, reporting a singular or
 * non-finite factorization instead of throwing.
 * Method: Gaussian elimination with partial pivoting in the left-looking (Crout/Doolittle, "jki")
 * order of JAMA's LUDecomposition (Golub & Van Loan, Matrix Computations, §3.4). The floating-point
 * operations, their order, the pivot choice (first largest |entry|), the exact-zero singularity test
 * and the determinant are exactly those of ml-matrix's LuDecomposition, which this class wrapped
 * until issue 12: it now runs the same algorithm on one flat Float64Array, without the Matrix
 * objects, clones and per-entry get/set calls, so factors, solutions and determinants are the same to
 * the last bit (tests/lib/atlas/engine-speed.test.ts compares both on random and nearly singular
 * matrices) at a fraction of the cost (docs/numerics.md §11). Unlike FlatLu it keeps ml-matrix's
 * rule that only an exactly zero pivot is singular, which the pitchfork locations rely on.
 */
export class DenseLu {
  readonly size: number;
  /** det(A); 0 when exactly singular, NaN when A had non-finite entries. */
  readonly determinant: number;
  /** True when A had non-finite entries or a zero pivot. */
  readonly singular: boolean;
  // Plain arrays, not typed arrays: V8 keeps typed arrays above 64 bytes off the heap, and allocating
  // one costs ~0.7 us plus external-memory pressure on the garbage collector (measured, §11).
  private readonly lu: number[] | null;
  private readonly piv: number[] | null;

  constructor(a: Float64Array, size: number) {
    this.size = size;
    const nn = size * size;
    for (let i = 0; i < nn; i++) {
      if (!Number.isFinite(a[i])) {
        this.lu = null;
        this.piv = null;
        this.determinant = Number.NaN;
        this.singular = true;
        return;
      }
    }
    const n = size;
    const lu = new Array<number>(nn);
    for (let i = 0; i < nn; i++) lu[i] = a[i];
    const piv = new Array<number>(n);
    for (let i = 0; i < n; i++) piv[i] = i;
    let pivotSign = 1;
    const col = colScratch(n);
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) col[i] = lu[i * n + j];
      for (let i = 0; i < n; i++) {
        const kmax = i < j ? i : j;
        let s = 0;
        const ri = i * n;
        for (let k = 0; k < kmax; k++) s += lu[ri + k] * col[k];
        col[i] -= s;
        lu[ri + j] = col[i];
      }
      let p = j;
      for (let i = j + 1; i < n; i++) if (Math.abs(col[i]) > Math.abs(col[p])) p = i;
      if (p !== j) {
        const rp = p * n;
        const rj = j * n;
        for (let k = 0; k < n; k++) {
          const t = lu[rp + k];
          lu[rp + k] = lu[rj + k];
          lu[rj + k] = t;
        }
        const v = piv[p];
        piv[p] = piv[j];
        piv[j] = v;
        pivotSign = -pivotSign;
      }
      const djj = lu[j * n + j];
      if (djj !== 0) for (let i = j + 1; i < n; i++) lu[i * n + j] = lu[i * n + j] / djj;
    }
    let singular = false;
    let det = pivotSign;
    for (let j = 0; j < n; j++) {
      const d = lu[j * n + j];
      if (d === 0) singular = true;
      det *= d;
    }
    this.lu = lu;
    this.piv = piv;
    this.singular = singular;
    this.determinant = singular ? 0 : det;
  }

  /** Solves A z = b. Returns null when A is singular or the solution is not finite. */
  solve(b: ArrayLike<number>): Float64Array | null {
    const x = new Float64Array(this.size);
    return this.solveInto(b, x) ? x : null;
  }

  /**
   * Solves A z = b into `out` (length >= size, may not alias b); false when A is singular or the
   * solution is not finite. The same operations as solve, for callers that keep a scratch vector.
   */
  solveInto(b: ArrayLike<number>, out: Float64Array): boolean {
    const lu = this.lu;
    const piv = this.piv;
    if (lu === null || piv === null || this.singular) return false;
    const n = this.size;
    const x = out;
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
    for (let i = 0; i < n; i++) if (!Number.isFinite(x[i])) return false;
    return true;
  }
}

const cols = new Map<number, Float64Array>();
function colScratch(n: number): Float64Array {
  let c = cols.get(n);
  if (!c) cols.set(n, (c = new Float64Array(n)));
  return c;
}
