import { describe, expect, it } from 'vitest';
import { compileTwoParameter, traceMap } from '../../../src/lib/maps/index';

/**
 * Hopf curves of the Lorenz system x' = σ(y - x), y' = x(ρ - z) - y, z' = xy - bz (Lorenz 1963;
 * Sparrow, The Lorenz Equations, 1982) in (ρ, σ), b = 8/3. Derivation: at the equilibria
 * C± = (±sqrt(b(ρ-1)), ±sqrt(b(ρ-1)), ρ-1) the characteristic polynomial is
 * λ³ + (σ+b+1)λ² + b(σ+ρ)λ + 2σb(ρ-1). A pair ±iω needs ω² = b(σ+ρ) and
 * (σ+b+1) b(σ+ρ) = 2σb(ρ-1), i.e. ρ_H(σ) = σ(σ+b+3)/(σ-b-1) (470/19 at σ = 10, as in
 * docs/numerics.md §9). One Hopf curve per mirror-image equilibrium C+ and C-.
 */
const lorenz = {
  format: 'brinkmap/ode-1', name: 'Lorenz system', variables: ['x', 'y', 'z'],
  rates: { x: 'sigma * (y - x)', y: 'x * (rho - z) - y', z: 'x * y - b * z' },
  parameters: { sigma: 10, rho: 1, b: 8 / 3 }, sweep: { parameter: 'rho', from: 0, to: 30 },
};
const b = 8 / 3;

describe('Hopf curves of the Lorenz system in (rho, sigma)', () => {
  const sys = compileTwoParameter(lorenz, { second: 'sigma' });
  const map = traceMap(sys, { secondFrom: 8, secondTo: 12, regionColumns: 0, regionRows: 0 });
  const hopf = map.curves.filter((c) => c.type === 'hopf');

  it('finds the two mirror-image Hopf curves across the whole sigma range', () => {
    expect(hopf).toHaveLength(2);
    for (const c of hopf) expect(c.ends).toEqual(['parameter-bound', 'parameter-bound']);
    expect(Math.sign(hopf[0].points[0].x[0])).toBe(-Math.sign(hopf[1].points[0].x[0]));
    expect(map.points).toEqual([]);
  });

  it('every point satisfies rho = sigma (sigma + b + 3)/(sigma - b - 1) and omega² = b (sigma + rho) to 1e-8', () => {
    for (const c of hopf) {
      for (const q of c.points) {
        const [rho, s] = q.p;
        expect(Math.abs(rho - (s * (s + b + 3)) / (s - b - 1))).toBeLessThan(1e-8);
        expect(Math.abs(q.frequency! ** 2 - b * (s + rho))).toBeLessThan(1e-8);
        expect(Math.abs(Math.abs(q.x[0]) - Math.sqrt(b * (rho - 1)))).toBeLessThan(1e-8);
      }
    }
  });
});
