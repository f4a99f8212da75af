import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { handSystem, scalarSystem } from './helpers.js';

describe('traceDiagram on close branch points and a Hopf normal form', () => {
  it('finds two pitchforks only 0.002 apart in p on x\' = x ((p - 0.5)(p - 0.502) - x^2)', () => {
    // Equilibria: x = 0, and x^2 = (p - 0.5)(p - 0.502) (two arcs, for p <= 0.5 and p >= 0.502).
    // On x = 0, f_x = (p - 0.5)(p - 0.502): zero at p = 0.5 and p = 0.502, where the arcs meet x = 0
    // with dp/ds = 0 (x -> -x symmetry): two pitchforks 0.002 apart (derived).
    const g = (p: number) => (p - 0.5) * (p - 0.502);
    const sys = scalarSystem((x, p) => x * (g(p) - x * x), (x, p) => g(p) - 3 * x * x, (x, p) => x * (2 * p - 1.002), { from: 0, to: 1 }, [[0]]);
    const d = traceDiagram(sys);
    const pf = d.bifurcations.filter((s) => s.type === 'pitchfork');
    expect(pf).toHaveLength(2);
    expect(Math.abs(pf[0].p - 0.5)).toBeLessThan(1e-9);
    expect(Math.abs(pf[1].p - 0.502)).toBeLessThan(1e-9);
    expect(d.bifurcations).toHaveLength(2);
    // x = 0 plus one branch per arc (each arc holds both signs of x).
    expect(d.branches).toHaveLength(3);
  });

  it('finds the Hopf point of the planar normal form at mu = 0 with frequency 1 (Kuznetsov §3.4)', () => {
    // x' = mu x - y - x (x^2 + y^2), y' = x + mu y - y (x^2 + y^2): J(0) = [[mu, -1], [1, mu]],
    // eigenvalues mu +- i, crossing the imaginary axis at mu = 0 with omega = 1 (derived).
    const sys = handSystem({
      variables: ['x', 'y'],
      parameter: 'mu',
      sweep: { from: -1, to: 1 },
      start: [[0, 0]],
      rates: (v, mu) => {
        const r2 = v[0] ** 2 + v[1] ** 2;
        return [mu * v[0] - v[1] - v[0] * r2, v[0] + mu * v[1] - v[1] * r2];
      },
      jacobian: (v, mu) => [
        [mu - 3 * v[0] ** 2 - v[1] ** 2, -1 - 2 * v[0] * v[1]],
        [1 - 2 * v[0] * v[1], mu - v[0] ** 2 - 3 * v[1] ** 2],
      ],
      dp: (v) => [v[0], v[1]],
    });
    const d = traceDiagram(sys);
    expect(d.bifurcations.map((s) => s.type)).toEqual(['hopf']);
    const h = d.bifurcations[0];
    expect(Math.abs(h.p)).toBeLessThan(1e-10);
    expect(Math.abs(h.frequency! - 1)).toBeLessThan(1e-10);
    // Two unstable eigenvalues past the Hopf point, none before it.
    for (const q of d.branches[0].points) if (Math.abs(q.p) > 1e-6) expect(q.unstable).toBe(q.p > 0 ? 2 : 0);
  });
});
