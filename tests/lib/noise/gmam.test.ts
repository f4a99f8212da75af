import { describe, expect, it } from 'vitest';
import { geometricAction, gmam, resample, type DriftField } from '../../../src/lib/noise/gmam';
import reference from './reference/lyapunov.json';

/** 1-D double well b(y) = y - y^3 (Kramers 1940; Berglund 2013, §2). */
const doubleWell: DriftField = {
  dimension: 1,
  drift: (y, o) => { o[0] = y[0] - y[0] ** 3; return o; },
  jacobian: (y, o) => { o[0] = 1 - 3 * y[0] ** 2; return o; },
};

function linear(A: number[][]): DriftField {
  const n = A.length;
  return {
    dimension: n,
    drift: (y, o) => { for (let i = 0; i < n; i++) { let s = 0; for (let j = 0; j < n; j++) s += A[i][j] * y[j]; o[i] = s; } return o; },
    jacobian: (_y, o) => { for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) o[i * n + j] = A[i][j]; return o; },
  };
}

describe('gmam(field, start, end, options)', () => {
  it('gives the double-well barrier 1/2 = 2 (V(0) - V(-1)) with V = x^4/4 - x^2/2', () => {
    // b = -V', V(0) - V(-1) = 0 - (1/4 - 1/2) = 1/4, so the quasi-potential barrier is 2 * 1/4 = 1/2
    // (gradient case of Freidlin–Wentzell; Kramers' time pi sqrt 2 exp(1/(2 sigma^2)), Berglund 2013).
    const r = gmam(doubleWell, [-1], [0]);
    expect(r.converged).toBe(true);
    expect(r.action).toBeCloseTo(0.5, 9);
  });

  it('gives the quasi-potential 1/2 z^T S^-1 z of a non-normal linear drift to 1e-3 relative at three points', () => {
    // dx = A x dt + sigma dW, action 1/2 int |phi' - A phi|^2. Try V(x) = 1/2 x^T P x in the
    // Hamilton–Jacobi equation of the quasi-potential, grad V . A x + 1/2 |grad V|^2 = 0
    // (Freidlin & Wentzell, ch. 4, §3): x^T P A x + 1/2 x^T P^2 x = 0 for all x, i.e.
    // P A + A^T P + P^2 = 0; with P = S^-1, multiplying by S on both sides gives A S + S A^T + I = 0.
    // (Consistent with the stationary covariance sigma^2 S: density ~ exp(-V / sigma^2).)
    // S and V(z) come from ml-matrix, tests/lib/noise/reference/lyapunov.ts.
    const field = linear(reference.A);
    reference.points.forEach((z, k) => {
      const r = gmam(field, [0, 0], z);
      expect(r.converged).toBe(true);
      expect(Math.abs(r.action - reference.potentials[k]) / reference.potentials[k]).toBeLessThan(1e-3);
    });
  });

  it('measures the change when the path points double, and the change is second order', () => {
    // Simpson's rule on a polyline whose points sit O(h^2) off the smooth minimizer: error ~ C h^2,
    // so S_N - S_inf is about 4 (S_2N - S_inf) (common practice, no source; checked against the
    // ml-matrix value of the reference script).
    const field = linear(reference.A);
    const exact = reference.potentials[0];
    const r = gmam(field, [0, 0], reference.points[0], { points: 41 });
    const ratio = (r.actionCoarse - exact) / (r.actionFine - exact);
    expect(ratio).toBeGreaterThan(3);
    expect(ratio).toBeLessThan(5);
    expect(r.discretizationChange).toBeGreaterThan(0);
    expect(r.segments).toBe(80);
  });

  it('keeps both ends fixed, spaces the points equally in arclength and leaves its inputs alone', () => {
    const start = new Float64Array([0, 0]);
    const end = new Float64Array([0, 1]);
    const r = gmam(linear(reference.A), start, end, { points: 21, refine: false });
    expect(Array.from(start)).toEqual([0, 0]);
    expect(Array.from(end)).toEqual([0, 1]);
    expect(Array.from(r.path[0])).toEqual([0, 0]);
    expect(Array.from(r.path[r.path.length - 1])).toEqual([0, 1]);
    const lengths = r.path.slice(1).map((q, k) => Math.hypot(q[0] - r.path[k][0], q[1] - r.path[k][1]));
    const mean = lengths.reduce((s, v) => s + v, 0) / lengths.length;
    for (const l of lengths) expect(Math.abs(l - mean) / mean).toBeLessThan(1e-9);
  });

  it('stops at the iteration cap and says it did not converge', () => {
    const r = gmam(linear(reference.A), [0, 0], [0, 1], { maxIterations: 10, refine: false });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(10);
    expect(Number.isFinite(r.action)).toBe(true);
  });

  it('returns converged false instead of throwing when the drift turns non-finite', () => {
    const bad: DriftField = { dimension: 1, drift: (y, o) => { o[0] = y[0] > -0.5 ? Number.NaN : y[0]; return o; }, jacobian: (_y, o) => { o[0] = 1; return o; } };
    const r = gmam(bad, [-1], [0]);
    expect(r.converged).toBe(false);
  });

  it('is cancelled through its signal', () => {
    const r = gmam(linear(reference.A), [0, 0], [0, 1], { signal: { aborted: true } });
    expect(r.cancelled).toBe(true);
    expect(r.converged).toBe(false);
  });
});

describe('geometricAction(field, path)', () => {
  it('is 2 (V(end) - V(start)) on a downhill-reversed path of a gradient field and larger on a detour', () => {
    // Along phi from -1 to 0, |b||phi'| - b.phi' = 2 |x - x^3| dx, integral 2 (1/2 - 1/4) = 1/2 (derived).
    const path = resample([new Float64Array([-1]), new Float64Array([0])], 50);
    expect(geometricAction(doubleWell, path)).toBeCloseTo(0.5, 12);
    // Moving against b costs 2 |b| per length, moving with it costs nothing: left of -1, b > 0, so the
    // excursion to -1.5 adds 2 int_{-1.5}^{-1} (x - x^3) dx = 2 * 0.390625 (derived) on the way out.
    const detour = [...resample([new Float64Array([-1]), new Float64Array([-1.5])], 20), ...resample([new Float64Array([-1.5]), new Float64Array([0])], 60).slice(1)];
    expect(geometricAction(doubleWell, detour)).toBeCloseTo(0.5 + 2 * 0.390625, 9);
  });
});
