import type { CompiledSystem } from '../../../src/lib/model';

/**
 * Central finite differences (common practice, no source): dF/dx_j ~ (F(x + h e_j) - F(x - h e_j)) / 2h
 * with h = 1e-6 * max(1, |x_j|); truncation error O(h^2 F''') plus rounding O(eps F / h) ~ 1e-10 here.
 */
export function fdJacobian(sys: CompiledSystem, x: Float64Array, p: number): Float64Array {
  const n = sys.dimension;
  const out = new Float64Array(n * n);
  const plus = new Float64Array(n);
  const minus = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const h = 1e-6 * Math.max(1, Math.abs(x[j]));
    const xp = Float64Array.from(x); xp[j] += h;
    const xm = Float64Array.from(x); xm[j] -= h;
    sys.rates(xp, p, plus);
    sys.rates(xm, p, minus);
    for (let i = 0; i < n; i++) out[i * n + j] = (plus[i] - minus[i]) / (xp[j] - xm[j]);
  }
  return out;
}

export function fdParameter(sys: CompiledSystem, x: Float64Array, p: number): Float64Array {
  const n = sys.dimension;
  const h = 1e-6 * Math.max(1, Math.abs(p));
  const plus = sys.rates(x, p + h, new Float64Array(n));
  const minus = sys.rates(x, p - h, new Float64Array(n));
  return plus.map((v, i) => (v - minus[i]) / (2 * h));
}

export function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) return Infinity;
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}
