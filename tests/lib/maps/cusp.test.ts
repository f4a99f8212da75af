import { describe, expect, it } from 'vitest';
import { compileTwoParameter, traceMap } from '../../../src/lib/maps/index';

/**
 * Cusp normal form x' = a + b x - x^3 (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
 * §8.2: the saddle-node curve of the cusp is 4 b^3 = 27 a^2 with the cusp at the origin).
 * Derivation (for the per-point checks): F = a + b x - x^3 = 0 and F_x = b - 3 x^2 = 0 give
 * b = 3 x^2, a = x^3 - b x = -2 x^3, so 4 b^3 = 108 x^6 = 27 a^2; the quadratic coefficient
 * F_xx / 2 = -3 x changes sign at x = 0, the cusp.
 */
const cusp = {
  format: 'brinkmap/ode-1', name: 'cusp normal form', variables: ['x'], rates: { x: 'a + b * x - x^3' },
  parameters: { a: 0, b: 1 }, sweep: { parameter: 'a', from: -1, to: 1 },
};

describe('map of the cusp normal form (Kuznetsov §8.2)', () => {
  const sys = compileTwoParameter(cusp, { second: 'b' });
  const map = traceMap(sys, { secondFrom: -0.5, secondTo: 1, regionColumns: 0, regionRows: 0 });

  it('finds one saddle-node curve (both folds of every slice lie on it) ending on the parameter bounds', () => {
    // Only info: the cross seed at a = 0 is the pitchfork x' = b x - x^3 of the symmetry x -> -x, not a permutation.
    expect(map.diagnostics.filter((d) => d.level !== 'info')).toEqual([]);
    expect(map.curves).toHaveLength(1);
    expect(map.curves[0].type).toBe('saddle-node');
    expect(map.curves[0].ends).toEqual(['parameter-bound', 'parameter-bound']);
    expect(map.curves[0].points.length).toBeGreaterThan(50);
  });

  it('every curve point satisfies 4 b^3 = 27 a^2 to 1e-9 and b = 3 x^2, a = -2 x^3 to 1e-9', () => {
    for (const q of map.curves[0].points) {
      const [a, b] = q.p;
      const x = q.x[0];
      expect(Math.abs(4 * b ** 3 - 27 * a * a)).toBeLessThan(1e-9);
      expect(Math.abs(b - 3 * x * x)).toBeLessThan(1e-9);
      expect(Math.abs(a + 2 * x ** 3)).toBeLessThan(1e-9);
    }
    // The curve spans both folds at the top of the range: x = ±sqrt(1/3) at b = 1.
    const ends = [map.curves[0].points[0], map.curves[0].points.at(-1)!];
    for (const e of ends) expect(e.p[1]).toBeCloseTo(1, 12);
    expect(Math.abs(ends[0].x[0] + ends[1].x[0])).toBeLessThan(1e-9);
  });

  it('locates one cusp at the origin to 1e-9, its test function of opposite signs on both sides', () => {
    expect(map.points).toHaveLength(1);
    const c = map.points[0];
    expect(c.type).toBe('cusp');
    expect(Math.abs(c.p[0])).toBeLessThan(1e-9);
    expect(Math.abs(c.p[1])).toBeLessThan(1e-9);
    expect(Math.abs(c.x[0])).toBeLessThan(1e-9);
    const before = c.evidence.before as number;
    const after = c.evidence.after as number;
    expect(Math.sign(before)).toBe(-Math.sign(after));
    expect(c.evidence.reason).toMatch(/quadratic coefficient/);
    expect(c.evidence.converged).toBe(true);
  });

  it('a second range with no fold (b < 0: F_x < 0 everywhere) gives no curve and no point', () => {
    const none = traceMap(sys, { secondFrom: -1, secondTo: -0.2, regionColumns: 0, regionRows: 0 });
    expect(none.curves).toEqual([]);
    expect(none.points).toEqual([]);
  });
});
