import { polynomialRoot } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { findScalarRoots, newton, switchAtBranchPoint } from '../../../src/lib/numerics/index.js';
import { handSystem, scalarSystem } from './helpers.js';

describe('findScalarRoots', () => {
  it('finds all three roots of 0.1 + x - x^3 as mathjs polynomialRoot does', () => {
    const ref = (polynomialRoot(0.1, 1, 0, -1) as unknown as (number | { re: number; im: number })[])
      .map((z) => (typeof z === 'number' ? z : z.re))
      .sort((a, b) => a - b);
    const r = findScalarRoots((x) => 0.1 + x - x ** 3, (x) => 1 - 3 * x * x, -10, 10);
    expect(r.roots).toHaveLength(3);
    r.roots.forEach((x, i) => expect(Math.abs(x - ref[i])).toBeLessThan(1e-13));
    expect(r.doubtful).toBe(0);
  });

  it('returns no roots (and does not throw) for a function without real zeros or with NaN parts', () => {
    expect(findScalarRoots((x) => x * x + 1, (x) => 2 * x, -10, 10).roots).toEqual([]);
    expect(findScalarRoots((x) => Math.log(x), (x) => 1 / x, -10, 10).roots.map((x) => +x.toFixed(12))).toEqual([1]);
  });
});

describe('newton', () => {
  it('converges to the Lorenz equilibrium C+ = (sqrt(b (rho - 1)), same, rho - 1) at rho = 28 (Lorenz 1963)', () => {
    const s = 10;
    const b = 8 / 3;
    const sys = handSystem({
      variables: ['x', 'y', 'z'],
      sweep: { from: 0, to: 30 },
      rates: (v, rho) => [s * (v[1] - v[0]), v[0] * (rho - v[2]) - v[1], v[0] * v[1] - b * v[2]],
      jacobian: (v, rho) => [[-s, s, 0], [rho - v[2], -1, -v[0]], [v[1], v[0], -b]],
      dp: (v) => [0, v[0], 0],
    });
    const r = newton(sys, [8, 8, 26], 28);
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBeCloseTo(Math.sqrt(b * 27), 12);
    expect(r.x[2]).toBeCloseTo(27, 12);
  });

  it('reports a singular Jacobian or non-finite rates instead of throwing', () => {
    const flat = scalarSystem((x, p) => p + 0 * x, () => 0, () => 1, { from: 0, to: 1 });
    expect(newton(flat, [0], 1)).toMatchObject({ converged: false, reason: 'singular-jacobian' });
    const nan = scalarSystem((x) => Math.log(x), (x) => 1 / x, () => 0, { from: 0, to: 1 });
    expect(newton(nan, [-1], 0)).toMatchObject({ converged: false, reason: 'non-finite' });
  });
});

describe('switchAtBranchPoint', () => {
  const y0 = Float64Array.of(0, 0);
  it('classifies r x - x^3 at the origin as a pitchfork: the crossing branch r = x^2 has zero dr/ds', () => {
    const sys = scalarSystem((x, r) => r * x - x ** 3, (x, r) => r - 3 * x * x, (x) => x, { from: -1, to: 1 });
    const sw = switchAtBranchPoint(sys, y0, Float64Array.of(0, 1));
    expect(sw.classification).toBe('pitchfork');
    // across is the x direction; the crossing points are (+-h, h^2).
    expect(Math.abs(sw.across[0])).toBeCloseTo(1, 12);
    expect(sw.crossing.plus![1]).toBeCloseTo(sw.crossing.plus![0] ** 2, 12);
  });

  it('classifies r x - x^2 at the origin as transcritical: x = r crosses with dr/ds = 1/sqrt 2', () => {
    const sys = scalarSystem((x, r) => r * x - x * x, (x, r) => r - 2 * x, (x) => x, { from: -1, to: 1 });
    const sw = switchAtBranchPoint(sys, y0, Float64Array.of(0, 1));
    expect(sw.classification).toBe('transcritical');
    expect(Math.abs(sw.crossing.velocity)).toBeCloseTo(Math.SQRT1_2, 6);
  });

  it('reports three branches through one point (x (r^2 - x^2) at the origin) as degenerate without throwing', () => {
    const sys = scalarSystem((x, r) => x * (r * r - x * x), (x, r) => r * r - 3 * x * x, (x, r) => 2 * r * x, { from: -1, to: 1 });
    // DH = [r^2 - 3x^2, 2 r x] vanishes to second order at the origin. The switch guess (+-h, 0) lies
    // midway between the two crossing branches r = +-x, and there the bordered matrix
    // [[r^2 - 3h^2, 2 r h], [1, 0]] = [[-3h^2, 0], [1, 0]] is singular: the probe fails, degenerate.
    const sw = switchAtBranchPoint(sys, y0, Float64Array.of(0, 1));
    expect(sw.classification).toBe('degenerate');
    expect(sw.reason).toMatch(/did not converge/);
  });
});
