import { describe, expect, it } from 'vitest';
import { DenseLu } from '../../../src/lib/numerics/dense-lu.js';

describe('DenseLu (the engine\'s wrapper around ml-matrix LuDecomposition)', () => {
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
