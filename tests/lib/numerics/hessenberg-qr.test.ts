import { EigenvalueDecomposition, LuDecomposition, Matrix } from 'ml-matrix';
import { eigs } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { hessenbergQrEigenvalues } from '../../../src/lib/numerics/hessenberg-qr.js';

type C = { re: number; im: number };
const sorted = (a: C[]) => [...a].sort((u, v) => u.re - v.re || u.im - v.im);
const ours = (a: number[][]): C[] => {
  const n = a.length;
  const r = hessenbergQrEigenvalues(Float64Array.from(a.flat()), n);
  expect(r.converged).toBe(true);
  return sorted(Array.from(r.values.re, (re, i) => ({ re, im: r.values.im[i] })));
};
// Independent computation: mathjs eigs (a general-purpose library; balancing + its own QR).
const mathjs = (a: number[][]): C[] =>
  sorted((eigs(a, { eigenvectors: false }).values as unknown as (number | C)[]).map((v) => (typeof v === 'number' ? { re: v, im: 0 } : { re: v.re, im: v.im })));

function lcg(seed: number) {
  let s = seed;
  return () => ((s = (s * 16807) % 2147483647) / 2147483647) * 2 - 1;
}

describe('hessenbergQrEigenvalues', () => {
  it('matches mathjs eigs on random non-symmetric 3x3 to 8x8 matrices, complex pairs included (independent library)', () => {
    const rnd = lcg(11);
    let complexSeen = 0;
    let compared = 0;
    let total = 0;
    for (const n of [3, 4, 5, 6, 7, 8]) {
      for (let rep = 0; rep < 4; rep++) {
        const a = Array.from({ length: n }, () => Array.from({ length: n }, rnd));
        const got = ours(a);
        total++;
        let ref: C[];
        try {
          ref = mathjs(a);
        } catch {
          // mathjs's complex QR sometimes stops with "failed to converge" on random matrices.
          continue;
        }
        compared++;
        complexSeen += got.filter((c) => c.im !== 0).length;
        for (let i = 0; i < n; i++) {
          expect(got[i].re).toBeCloseTo(ref[i].re, 9);
          expect(Math.abs(got[i].im)).toBeCloseTo(Math.abs(ref[i].im), 9);
        }
      }
    }
    expect(compared).toBeGreaterThanOrEqual(0.8 * total);
    expect(complexSeen).toBeGreaterThan(0);
  });

  it('satisfies sum = trace, sum of squares = trace(A^2) and product = det A on random 12x12 and 20x20 matrices (analytic identities; det by ml-matrix LU)', () => {
    // For eigenvalues l_i of A: sum l_i = tr A, sum l_i^2 = tr A^2, prod l_i = det A (Golub & Van Loan §7.1).
    const rnd = lcg(23);
    for (const n of [12, 12, 20, 20]) {
      const a = Array.from({ length: n }, () => Array.from({ length: n }, rnd));
      const got = ours(a);
      const A = new Matrix(a);
      const A2 = A.mmul(A);
      let tr = 0;
      let tr2 = 0;
      for (let i = 0; i < n; i++) {
        tr += A.get(i, i);
        tr2 += A2.get(i, i);
      }
      let sre = 0;
      let sim = 0;
      let s2re = 0;
      let s2im = 0;
      let pre = 1;
      let pim = 0;
      for (const c of got) {
        sre += c.re;
        sim += c.im;
        s2re += c.re * c.re - c.im * c.im;
        s2im += 2 * c.re * c.im;
        [pre, pim] = [pre * c.re - pim * c.im, pre * c.im + pim * c.re];
      }
      const det = new LuDecomposition(A).determinant;
      expect(sre).toBeCloseTo(tr, 10);
      expect(sim).toBeCloseTo(0, 12);
      expect(s2re).toBeCloseTo(tr2, 9);
      expect(s2im).toBeCloseTo(0, 9);
      expect(Math.abs(pre - det)).toBeLessThan(1e-9 * Math.max(1, Math.abs(det)));
      expect(Math.abs(pim)).toBeLessThan(1e-9 * Math.max(1, Math.abs(det)));
      expect(got.some((c) => c.im !== 0)).toBe(true);
    }
  });

  it('returns conjugate pairs with exactly opposite imaginary parts: rotation block (analytic: eigenvalues 2 +- 3i and -1)', () => {
    // [[2, 3, 0], [-3, 2, 0], [0, 0, -1]]: block-diagonal, characteristic polynomial (l^2 - 4l + 13)(l + 1).
    const got = ours([[2, 3, 0], [-3, 2, 0], [0, 0, -1]]);
    expect(got[0]).toEqual({ re: -1, im: 0 });
    expect(got[1].re).toBeCloseTo(2, 14);
    expect(got[1].im).toBeCloseTo(-3, 14);
    expect(got[2].im).toBe(-got[1].im);
    expect(got[2].re).toBe(got[1].re);
  });

  it('handles a repeated eigenvalue of a diagonalisable matrix: S diag(1, 1, 1, -2) S^-1, S unit upper triangular (analytic, similarity)', () => {
    // S D S^-1 with S = I + N (N strictly upper, S^-1 = I - N + N^2 - N^3): eigenvalues are D's.
    const n = 4;
    const S = [[1, 0.5, -0.3, 0.2], [0, 1, 0.7, -0.4], [0, 0, 1, 0.6], [0, 0, 0, 1]];
    const D = [1, 1, 1, -2];
    const Sm = new Matrix(S);
    const A = Sm.mmul(Matrix.diag(D)).mmul(new Matrix(Matrix.eye(n)).mmul(inverseUpperUnit(Sm)));
    const got = ours(A.to2DArray());
    const want = sorted(D.map((re) => ({ re, im: 0 })));
    for (let i = 0; i < n; i++) {
      expect(got[i].re).toBeCloseTo(want[i].re, 10);
      expect(got[i].im).toBeCloseTo(0, 10);
    }
  });

  it('handles a defective matrix: a 3x3 Jordan block at 2 (analytic: triple eigenvalue 2, perturbation ~ eps^(1/3))', () => {
    // A triple defective eigenvalue is only determined to about eps^(1/3) ~ 6e-6 (Golub & Van Loan §7.2).
    const a = [[2, 1, 0], [0, 2, 1], [0, 0, 2]];
    const got = ours(a);
    for (const c of got) {
      expect(Math.abs(c.re - 2)).toBeLessThan(1e-5);
      expect(Math.abs(c.im)).toBeLessThan(1e-5);
    }
    // S J S^-1 with J = [[-1, 1, 0], [0, -1, 0], [0, 0, 3]], S = [[1, 1, 0], [0, 1, 1], [1, 0, 1]] (det S = 2;
    // product worked out by hand, entries exact in binary): eigenvalues -1 (double, one Jordan block,
    // determined to about sqrt(eps) ~ 1.5e-8) and 3. mathjs eigs agrees to the same accuracy.
    const b = [[-0.5, 0.5, -0.5], [-2, 1, 2], [-1.5, 2.5, 0.5]];
    const g2 = ours(b);
    expect(Math.abs(g2[0].re + 1)).toBeLessThan(1e-6);
    expect(Math.abs(g2[1].re + 1)).toBeLessThan(1e-6);
    expect(Math.abs(g2[0].im) + Math.abs(g2[1].im)).toBeLessThan(1e-6);
    expect(g2[2].re).toBeCloseTo(3, 12);
    const r2 = mathjs(b);
    for (let i = 0; i < 3; i++) expect(g2[i].re).toBeCloseTo(r2[i].re, 6);
  });

  it('is bit-identical to ml-matrix EigenvalueDecomposition (non-symmetric path) on 3000 random, sparse and tridiagonal matrices', () => {
    // Same operations without the eigenvector accumulation; the engine relies on this to keep results unchanged.
    const rnd = lcg(5);
    let checked = 0;
    for (let trial = 0; trial < 3000; trial++) {
      const n = 3 + (trial % 18);
      const a = new Float64Array(n * n);
      const kind = trial % 3;
      for (let i = 0; i < n * n; i++) a[i] = kind === 2 && rnd() < 0.2 ? 0 : rnd();
      if (kind === 1) for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (Math.abs(i - j) > 1) a[i * n + j] = 0;
      const m = Matrix.from1DArray(n, n, a);
      if (m.isSymmetric()) continue;
      const evd = new EigenvalueDecomposition(m);
      const r = hessenbergQrEigenvalues(a, n);
      checked++;
      expect(Array.from(r.values.re)).toEqual(evd.realEigenvalues);
      expect(Array.from(r.values.im)).toEqual(evd.imaginaryEigenvalues);
    }
    expect(checked).toBeGreaterThan(2900);
  });

  it('does not mutate its input and reports converged = false when the sweep cap is hit', () => {
    const a = Float64Array.from([0, 0, 1, 1, 0, 0, 0, 1, 0]); // cyclic permutation: cube roots of unity, needs at least one QR sweep
    const copy = Float64Array.from(a);
    const capped = hessenbergQrEigenvalues(a, 3, { maxIterations: 0 });
    expect(capped.converged).toBe(false);
    expect(a).toEqual(copy);
    const full = hessenbergQrEigenvalues(a, 3);
    expect(full.converged).toBe(true);
    // Analytic: eigenvalues 1, -1/2 +- i sqrt(3)/2.
    const v = sorted(Array.from(full.values.re, (re, i) => ({ re, im: full.values.im[i] })));
    expect(v[0].re).toBeCloseTo(-0.5, 12);
    expect(Math.abs(v[0].im)).toBeCloseTo(Math.sqrt(3) / 2, 12);
    expect(v[2].re).toBeCloseTo(1, 12);
  });
});

/** Inverse of a unit upper-triangular matrix by back substitution. */
function inverseUpperUnit(s: Matrix): Matrix {
  const n = s.rows;
  const inv = Matrix.eye(n);
  for (let j = 0; j < n; j++) {
    for (let i = j - 1; i >= 0; i--) {
      let acc = 0;
      for (let k = i + 1; k <= j; k++) acc += s.get(i, k) * inv.get(k, j);
      inv.set(i, j, -acc);
    }
  }
  return inv;
}
