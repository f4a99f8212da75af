import { eigs } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { eigenvalues, nearZeroCount, pairSumTest, unstableCount } from '../../../src/lib/numerics/index.js';

const sortRe = (a: { re: number; im: number }[]) => [...a].sort((u, v) => u.re - v.re || u.im - v.im);

describe('eigenvalues', () => {
  it('matches mathjs eigs on random 2x2, 3x3 and 6x6 matrices (independent general-purpose library)', () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) * 2 - 1;
    for (const n of [2, 2, 3, 3, 6]) {
      const rows = Array.from({ length: n }, () => Array.from({ length: n }, rnd));
      const s = eigenvalues(Float64Array.from(rows.flat()), n);
      const ours = sortRe(Array.from(s.re, (re, i) => ({ re, im: s.im[i] })));
      const ref = sortRe((eigs(rows).values as unknown as (number | { re: number; im: number })[]).map((v) => (typeof v === 'number' ? { re: v, im: 0 } : { re: v.re, im: v.im })));
      for (let i = 0; i < n; i++) {
        expect(ours[i].re).toBeCloseTo(ref[i].re, 10);
        expect(Math.abs(ours[i].im)).toBeCloseTo(Math.abs(ref[i].im), 10);
      }
    }
  });

  it('counts unstable eigenvalues and treats the imaginary axis as neutral', () => {
    // diag(2, -1, 0): one unstable, one near zero (analytic).
    const s = eigenvalues(Float64Array.of(2, 0, 0, 0, -1, 0, 0, 0, 0), 3);
    expect(unstableCount(s)).toBe(1);
    expect(nearZeroCount(s)).toBe(1);
  });
});

describe('pairSumTest', () => {
  it('is zero at a complex pair on the imaginary axis and names it a complex pair (Hopf)', () => {
    // [[0, -w], [w, 0]] (+) [-1]: eigenvalues +-i w and -1 (analytic), w = 3.
    const s = eigenvalues(Float64Array.of(0, -3, 0, 3, 0, 0, 0, 0, -1), 3);
    const t = pairSumTest(s);
    expect(Math.abs(t.value)).toBeLessThan(1e-12);
    expect(t.critical).toMatchObject({ kind: 'complex-pair' });
    expect(t.critical?.kind === 'complex-pair' && t.critical.im).toBeCloseTo(3, 12);
  });

  it('is also zero at a neutral saddle (+l, -l real) but names it a real pair, so it is not taken for Hopf', () => {
    const s = eigenvalues(Float64Array.of(2, 0, 0, 0, -2, 0, 0, 0, -5), 3);
    const t = pairSumTest(s);
    expect(Math.abs(t.value)).toBeLessThan(1e-12);
    expect(t.critical).toMatchObject({ kind: 'real-pair' });
  });

  it('changes sign when a complex pair crosses the axis: psi = prod (l_i + l_j) (Kuznetsov §10.2)', () => {
    // [[m, -1], [1, m]]: eigenvalues m +- i; the only pair factor is 2m (analytic).
    const at = (m: number) => pairSumTest(eigenvalues(Float64Array.of(m, -1, 1, m), 2)).value;
    expect(at(-0.1)).toBeCloseTo(-0.2, 12);
    expect(at(0.1)).toBeCloseTo(0.2, 12);
  });
});
