import { describe, expect, it } from 'vitest';
import { compileTwoParameter, traceMap } from '../../../src/lib/maps/index';
import { cubicNetwork, cubicRoots } from '../regimes/fixtures';

/**
 * Degenerate pitchfork of the symmetric cubic pair with a cubic coupling term,
 *   x_i' = r + x_i - x_i^3 + beta [(x_j - x_i) + g (x_j - x_i)^3],   r = 0.1, in (beta, g).
 * Derivation (centre-manifold reduction by hand): with s = x1 + x2, d = x1 - x2,
 *   s' = 2r + s - s (s^2 + 3 d^2)/4,   d' = d [1 - 2 beta - (3 s^2 + d^2)/4] - 2 beta g d^3.
 * At d = 0, s = 2m (m the middle root). On the slow manifold s = 2m + sigma with
 * sigma = (3m/2) d^2 / (1 - 3m^2) + O(d^4), so d' = d [1 - 2 beta - 3m^2] + c3 d^3 with
 *   c3 = -(9m^2/2)/(1 - 3m^2) - 1/4 - 2 beta g.
 * The pitchfork line is beta = (1 - 3m^2)/2 for every g (the cubic term does not change J at d = 0),
 * and c3 vanishes on it at g* = -[(9m^2/2)/(1 - 3m^2) + 1/4] / (1 - 3m^2).
 */
const r = 0.1;
const base = cubicNetwork({ r, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }], term: 'source - target + g * (source - target)^3' });
const doc = { ...base, element: { ...base.element, parameters: { r, g: 0 } } };
const { m } = cubicRoots(r);
const q = 1 - 3 * m * m;
const gStar = -((9 * m * m) / 2 / q + 0.25) / q;

describe('degenerate pitchfork of the pair with a cubic coupling term (derived closed form)', () => {
  const sys = compileTwoParameter(doc, { second: 'g' });
  const map = traceMap(sys, { secondFrom: -0.6, secondTo: 0.2, regionColumns: 0, regionRows: 0 });

  it('the pitchfork curve is the line beta = (1 - 3m^2)/2 with x = (m, m) to 1e-9', () => {
    const pf = map.curves.filter((c) => c.type === 'pitchfork');
    expect(pf).toHaveLength(1);
    for (const p of pf[0].points) {
      expect(Math.abs(p.p[0] - q / 2)).toBeLessThan(1e-9);
      for (const v of p.x) expect(Math.abs(v - m)).toBeLessThan(1e-9);
    }
  });

  it('locates the degenerate pitchfork at g* to 1e-8 with the cubic coefficient of opposite signs on both sides, and no cusp beside it', () => {
    const d = map.points.filter((p) => p.type === 'degenerate-pitchfork');
    expect(d).toHaveLength(1);
    expect(Math.abs(d[0].p[1] - gStar)).toBeLessThan(1e-8);
    expect(Math.abs(d[0].p[0] - q / 2)).toBeLessThan(1e-9);
    expect(Math.sign(d[0].evidence.before as number)).toBe(-Math.sign(d[0].evidence.after as number));
    // The asymmetric saddle-node curve that ends there is listed with it.
    expect(d[0].curves.some((id) => map.curves.find((c) => c.id === id)?.type === 'saddle-node')).toBe(true);
    expect(map.points.filter((p) => p.type === 'cusp' && Math.abs(p.p[1] - gStar) < 1e-3)).toEqual([]);
  });
});
