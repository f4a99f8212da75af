import { describe, expect, it } from 'vitest';
import { meanFirstPassage1d } from '../../../src/lib/noise/first-passage-1d';
import reference from './reference/first-passage-1d.json';

const well = (x: number) => x - x ** 3;

describe('meanFirstPassage1d(drift, x0, b, sigma)', () => {
  it('matches nested adaptive quadrature (SciPy quad, reference/first-passage-1d.py) for the double well', () => {
    for (const c of reference.cases) {
      const r = meanFirstPassage1d(well, reference.x0, c.b, c.sigma, { left: reference.left });
      expect(r.converged).toBe(true);
      expect(r.value / c.T - 1).toBeCloseTo(0, 8);
    }
  });

  it("approaches Kramers' pi sqrt 2 exp(1 / (2 sigma^2)) with the correction 1 + (3/4) sigma^2", () => {
    // Laplace's method, next order (derived here): int e^{-f/eps} ~ sqrt(2 pi eps / f'') e^{-f0/eps}
    // (1 + eps (5 f'''^2 / (24 f''^3) - f'''' / (8 f''^2))) (standard expansion, from memory). V = x^4/4 - x^2/2:
    // at the well x = -1, V'' = 2, V''' = -6, V'''' = 6 -> 180/192 - 6/32 = 3/4; at the saddle (f = -V) f'' = 1,
    // f''' = 0, f'''' = -6 -> 3/4. With eps = sigma^2 / 2: E tau = pi sqrt 2 e^{1/(2 sigma^2)} (1 + (3/4) sigma^2 + O(sigma^4)).
    const slope = (s: number) => {
      const t = meanFirstPassage1d(well, -1, 0.5, s).value;
      return (t / (Math.PI * Math.SQRT2 * Math.exp(1 / (2 * s * s))) - 1) / (s * s);
    };
    expect(slope(0.05)).toBeCloseTo(0.75, 2);
    expect(Math.abs(slope(0.05) - 0.75)).toBeLessThan(Math.abs(slope(0.1) - 0.75));
  });

  it('gives the pure-diffusion time (b - x0)(b + x0 - 2L) / sigma^2 for zero drift', () => {
    // F = 0, reflecting at L: T(x0) = (2/sigma^2) int_{x0}^{b} (y - L) dy = ((b - L)^2 - (x0 - L)^2) / sigma^2 (derived).
    const r = meanFirstPassage1d(() => 0, 0.3, 1.2, 0.5, { left: -1 });
    expect(r.value).toBeCloseTo(((1.2 + 1) ** 2 - (0.3 + 1) ** 2) / 0.25, 9);
  });

  it('rejects a bad sigma, b or left end naming it', () => {
    expect(() => meanFirstPassage1d(well, -1, 0.5, 0)).toThrow(/sigma/);
    expect(() => meanFirstPassage1d(well, -1, -2, 0.2)).toThrow(/^b/);
    expect(() => meanFirstPassage1d(well, -1, 0.5, 0.2, { left: 0 })).toThrow(/left/);
  });
});
