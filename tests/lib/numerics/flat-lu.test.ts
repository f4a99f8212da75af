import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix } from 'ml-matrix';
import { FlatLu } from '../../../src/lib/numerics/flat-lu';

/** Deterministic pseudo-random matrix (LCG, common practice, no source), diagonal entries `diag` added. */
function matrix(m: number, seed: number, diag = 0, density = 1): Float64Array {
  let s = seed >>> 0;
  const next = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const a = new Float64Array(m * m);
  for (let i = 0; i < m * m; i++) a[i] = next() < density ? 2 * next() - 1 : 0;
  for (let i = 0; i < m; i++) a[i * m + i] += diag;
  return a;
}

describe('FlatLu', () => {
  it.each([[3, 1], [10, 2], [65, 3]])('factor(A).solve(b) solves A z = b to rounding level (n = %i, dense)', (m, seed) => {
    const a = matrix(m, seed);
    const b = Float64Array.from({ length: m }, (_, i) => Math.sin(i + 1));
    const z = new FlatLu(m).factor(a).solve(b)!;
    let res = 0;
    let scale = 0;
    for (let i = 0; i < m; i++) {
      let s = -b[i];
      for (let j = 0; j < m; j++) s += a[i * m + j] * z[j];
      res = Math.max(res, Math.abs(s));
      for (let j = 0; j < m; j++) scale = Math.max(scale, Math.abs(a[i * m + j] * z[j]));
    }
    // Backward-stable elimination: residual of order n eps |A| |z| (Golub & Van Loan, §3.3).
    expect(res).toBeLessThan(m * 2 ** -52 * scale * 100);
  });

  it('determinant agrees with ml-matrix LuDecomposition (independent library) on dense and sparse matrices', () => {
    for (const [m, seed, density] of [[4, 7, 1], [20, 8, 1], [65, 9, 0.08]] as const) {
      const a = matrix(m, seed, 2, density);
      const ours = new FlatLu(m).factor(a).determinant;
      const ref = new LuDecomposition(Matrix.from1DArray(m, m, a)).determinant;
      expect(Math.abs(ours - ref)).toBeLessThan(1e-10 * Math.abs(ref));
    }
  });

  it('reports a rank-deficient matrix as singular (pivot below n eps |A|) and solve returns null', () => {
    const m = 5;
    const a = matrix(m, 11);
    for (let j = 0; j < m; j++) a[4 * m + j] = a[0 * m + j] + 2 * a[1 * m + j]; // row 4 = row 0 + 2 row 1
    const lu = new FlatLu(m).factor(a);
    expect(lu.singular).toBe(true);
    expect(lu.solve(new Float64Array(m).fill(1))).toBeNull();
  });

  it('reports non-finite input as singular with NaN determinant and leaves the input unchanged', () => {
    const a = matrix(3, 12);
    a[4] = Number.NaN;
    const copy = Float64Array.from(a);
    const lu = new FlatLu(3).factor(a);
    expect(lu.singular).toBe(true);
    expect(Number.isNaN(lu.determinant)).toBe(true);
    expect(Array.from(a)).toEqual(Array.from(copy));
  });
});
