import { LuDecomposition, Matrix } from 'ml-matrix';

/**
 * LU factorization with partial pivoting of a square row-major matrix (ml-matrix LuDecomposition),
 * wrapped so that a singular or non-finite factorization is reported, not thrown.
 * Method: Gaussian elimination with partial pivoting (Golub & Van Loan, Matrix Computations, §3.4).
 */
export class DenseLu {
  readonly size: number;
  /** det(A); 0 when exactly singular, NaN when A had non-finite entries. */
  readonly determinant: number;
  /** True when A had non-finite entries or a zero pivot. */
  readonly singular: boolean;
  private readonly lu: LuDecomposition | null;

  constructor(a: Float64Array, size: number) {
    this.size = size;
    let finite = true;
    for (let i = 0; i < size * size; i++) {
      if (!Number.isFinite(a[i])) {
        finite = false;
        break;
      }
    }
    if (!finite) {
      this.lu = null;
      this.determinant = Number.NaN;
      this.singular = true;
      return;
    }
    // LuDecomposition copies its input, so one scratch matrix per size is filled and reused.
    this.lu = new LuDecomposition(fillScratch(a, size));
    this.singular = this.lu.isSingular();
    this.determinant = this.singular ? 0 : this.lu.determinant;
  }

  /** Solves A z = b. Returns null when A is singular or the solution is not finite. */
  solve(b: ArrayLike<number>): Float64Array | null {
    if (this.lu === null || this.singular) return null;
    const col = columnScratch(this.size);
    for (let i = 0; i < this.size; i++) col.set(i, 0, b[i]);
    const z = this.lu.solve(col);
    const out = new Float64Array(this.size);
    for (let i = 0; i < this.size; i++) {
      const v = z.get(i, 0);
      if (!Number.isFinite(v)) return null;
      out[i] = v;
    }
    return out;
  }
}

const squares = new Map<number, Matrix>();
const columns = new Map<number, Matrix>();

function fillScratch(a: Float64Array, size: number): Matrix {
  let m = squares.get(size);
  if (!m) squares.set(size, (m = new Matrix(size, size)));
  for (let i = 0; i < size; i++) for (let j = 0; j < size; j++) m.set(i, j, a[i * size + j]);
  return m;
}

/** LuDecomposition.solve copies the right-hand side before working on it, so it can be reused too. */
function columnScratch(size: number): Matrix {
  let m = columns.get(size);
  if (!m) columns.set(size, (m = new Matrix(size, 1)));
  return m;
}
