import { describe, expect, it } from 'vitest';
import { compileTwoParameter, traceMap } from '../../../src/lib/maps/index';
import { cubicNetwork } from '../regimes/fixtures';

/**
 * Symmetric cubic pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i), swept in r, second parameter beta.
 * Derivation: on the symmetric states x1 = x2 = s, F = 0 gives r = s^3 - s; J = (1 - 3s^2) I +
 * beta [[-1, 1], [1, -1]] has the symmetric eigenvalue 1 - 3s^2 (vector (1, 1)) and the antisymmetric
 * one 1 - 3s^2 - 2 beta (vector (1, -1)). Pitchfork curve: beta = (1 - 3s^2)/2, r = s^3 - s.
 * Saddle-node curve of the symmetric branch: s = -1/sqrt 3, r = 2/(3 sqrt 3) for every beta (a vertical
 * line). They meet where both eigenvalues vanish: r = 2/(3 sqrt 3), beta = 0, x = (-1/sqrt 3, -1/sqrt 3).
 */
const pair = cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }], sweep: { parameter: 'r', from: 0, to: 0.5 }, couplingValue: 0.1 });
const rc = 2 / (3 * Math.sqrt(3));
const u = 1 / Math.sqrt(3);

describe('a pitchfork curve meeting a saddle-node curve (symmetric pair in (r, beta))', () => {
  const sys = compileTwoParameter(pair, { second: 'beta' });
  const map = traceMap(sys, { secondFrom: -0.1, secondTo: 0.3, regionColumns: 0, regionRows: 0 });
  const pf = map.curves.filter((c) => c.type === 'pitchfork');
  const vertical = map.curves.filter((c) => c.type === 'saddle-node' && c.points.every((q) => q.x[0] === q.x[1]));

  it('the pitchfork curve follows beta = (1 - 3s^2)/2, r = s^3 - s with x1 = x2 = s to 1e-9, through beta = 0', () => {
    expect(pf).toHaveLength(1);
    expect(pf[0].ends).toEqual(['parameter-bound', 'parameter-bound']);
    for (const q of pf[0].points) {
      const s = q.x[0];
      expect(q.x[1]).toBe(s);
      expect(Math.abs(q.p[0] - (s ** 3 - s))).toBeLessThan(1e-9);
      expect(Math.abs(q.p[1] - (1 - 3 * s * s) / 2)).toBeLessThan(1e-9);
    }
    const betas = pf[0].points.map((q) => q.p[1]);
    expect(Math.min(...betas)).toBeCloseTo(-0.1, 12);
    expect(Math.max(...betas)).toBeCloseTo(0.3, 12);
  });

  it('the symmetric saddle-node curve is the line r = 2/(3 sqrt 3), x = -1/sqrt 3, to 1e-9', () => {
    expect(vertical).toHaveLength(1);
    for (const q of vertical[0].points) {
      expect(Math.abs(q.p[0] - rc)).toBeLessThan(1e-9);
      expect(Math.abs(q.x[0] + u)).toBeLessThan(1e-9);
    }
  });

  it('locates the meeting point at r = 2/(3 sqrt 3), beta = 0 to 1e-9, listed with both curves, the test of opposite signs on both sides', () => {
    const hits = map.points.filter((q) => q.type === 'saddle-node-meets-pitchfork');
    expect(hits).toHaveLength(1);
    const h = hits[0];
    expect(Math.abs(h.p[0] - rc)).toBeLessThan(1e-9);
    expect(Math.abs(h.p[1])).toBeLessThan(1e-9);
    for (const v of h.x) expect(Math.abs(v + u)).toBeLessThan(1e-9);
    expect(h.curves.sort()).toEqual([pf[0].id, vertical[0].id].sort());
    expect(Math.sign(h.evidence.before as number)).toBe(-Math.sign(h.evidence.after as number));
  });
});
