import { LuDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { DenseLu } from '../../../src/lib/numerics/dense-lu.js';

describe('DenseLu', () => {
  it('is bit-identical to ml-matrix LuDecomposition (determinant, singularity, solution) on 2000 random matrices', () => {
    // Same operations in the same order on a flat array; the engine relies on this to keep results unchanged.
    let s = 3;
    const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647) * 2 - 1;
    for (let t = 0; t < 2000; t++) {
      const n = 1 + (t % 21);
      const a = new Float64Array(n * n);
      for (let i = 0; i < n * n; i++) a[i] = t % 3 === 0 && rnd() < 0 ? 0 : rnd();
      if (t % 5 === 0 && n > 1) for (let j = 0; j < n; j++) a[n + j] = 2 * a[j]; // rank-deficient
      const b = Array.from({ length: n }, rnd);
      const ref = new LuDecomposition(Matrix.from1DArray(n, n, a));
      const lu = new DenseLu(a, n);
      expect(lu.singular).toBe(ref.isSingular());
      expect(lu.determinant).toBe(ref.isSingular() ? 0 : ref.determinant);
      if (!ref.isSingular()) {
        const z = ref.solve(Matrix.columnVector(b)).getColumn(0);
        const w = lu.solve(b);
        if (z.every(Number.isFinite)) expect(Array.from(w!)).toEqual(z);
        else expect(w).toBeNull();
      }
    }
  });

  it('solves a 3x3 system needing a pivot and reports singular and non-finite input (analytic)', () => {
    // [[0, 1, 2], [1, 0, 3], [4, -3, 8]] z = (8, 10, 22) has z = (1, 2, 3): 0+2+6, 1+0+9, 4-6+24.
    const lu = new DenseLu(Float64Array.of(0, 1, 2, 1, 0, 3, 4, -3, 8), 3);
    const z = lu.solve([8, 10, 22])!;
    expect(z[0]).toBeCloseTo(1, 13);
    expect(z[1]).toBeCloseTo(2, 13);
    expect(z[2]).toBeCloseTo(3, 13);
    // det by cofactors along the first row: 0 - 1 (8 - 12) + 2 (-3 - 0) = -2.
    expect(lu.determinant).toBeCloseTo(-2, 13);
    const sing = new DenseLu(Float64Array.of(1, 2, 2, 4), 2);
    expect(sing.singular).toBe(true);
    expect(sing.solve([1, 1])).toBeNull();
    const bad = new DenseLu(Float64Array.of(1, Number.NaN, 0, 1), 2);
    expect(bad.singular).toBe(true);
    expect(Number.isNaN(bad.determinant)).toBe(true);
  });
});
