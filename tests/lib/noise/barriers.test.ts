import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas';
import { compileModelJson } from '../../../src/lib/model';
import { barriersAt, noiseGraphAt, saddleLabel, stateLabel } from '../../../src/lib/noise';
import { cubicNetwork, cubicRoots } from '../regimes/fixtures';

const r = 0.1;
const beta = 0.1; // below the fold at 1/3 - (r/2)^(2/3) = 0.197 (fixtures.ts): four stable states
const setup = (twoWay: boolean) => {
  const system = compileModelJson(cubicNetwork({ r, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
  const g = noiseGraphAt(system, traceDiagram(system), beta);
  if (!g.ok) throw new Error(g.reason);
  return { system, g };
};
/** Closed potential of the symmetric pair, F = -grad V (derived in tests/lib/noise/gradient.test.ts). */
const V = (x: readonly number[]) => x.reduce((s, v) => s - r * v - (v * v) / 2 + v ** 4 / 4, 0) + (beta / 2) * (x[0] - x[1]) ** 2;
/** Potential of one uncoupled element r + x - x^3. */
const V1 = (x: number) => -r * x - (x * x) / 2 + x ** 4 / 4;
const iso = new Float64Array([1, 1]);

describe('barriersAt(system, graph, weights) on a gradient pair', () => {
  const { system, g } = setup(true);
  const exact = (from: number, saddle: number) => 2 * (V(g.graph.saddles[saddle].x) - V(g.graph.states[from].x));

  it('detects the gradient and gives 2 (V(saddle) - V(state)) of the closed potential for both ends of every edge', () => {
    const res = barriersAt(system, g, iso);
    expect(res.gradient).toBe(true);
    expect(res.barriers).toHaveLength(2 * g.graph.saddles.length);
    for (const b of res.barriers) {
      expect(b.method).toBe('potential');
      expect(b.converged).toBe(true);
      const e = g.graph.saddles[b.saddle];
      expect([b.from, b.to].sort()).toEqual([e.from, e.to].sort());
      // 5-point Gauss–Legendre is exact for the quartic V along a segment: only rounding is left.
      expect(Math.abs(b.barrier - exact(b.from, b.saddle)) / exact(b.from, b.saddle)).toBeLessThan(1e-12);
    }
    expect(res.diagnostics).toEqual([]);
  });

  it('draws the reversed downhill flow: the path runs from the state to the saddle with V rising along it', () => {
    for (const b of barriersAt(system, g, iso).barriers) {
      expect(b.path[0]).toEqual(g.graph.states[b.from].x);
      expect(b.path[b.path.length - 1]).toEqual(g.graph.saddles[b.saddle].x);
      for (let k = 1; k < b.path.length; k++) expect(V(b.path[k])).toBeGreaterThanOrEqual(V(b.path[k - 1]) - 1e-12);
    }
  });

  it('finds the same barriers with the minimum action method to 1e-6 relative', () => {
    const res = barriersAt(system, g, iso, { method: 'minimum-action' });
    for (const b of res.barriers) {
      expect(b.method).toBe('minimum-action');
      expect(b.converged).toBe(true);
      expect(Math.abs(b.barrier - exact(b.from, b.saddle)) / exact(b.from, b.saddle)).toBeLessThan(1e-6);
      expect(b.detail.discretizationChange).toBeLessThan(1e-4);
    }
  });

  it('divides every barrier by w^2 when all noise weights are w', () => {
    // sigma_i = level * w: the action 1/2 int |phi' - F|^2 / w^2 is the isotropic one over w^2 (docs/noise.md).
    const one = barriersAt(system, g, iso).barriers;
    const two = barriersAt(system, g, new Float64Array([2, 2])).barriers;
    two.forEach((b, k) => expect(b.barrier).toBeCloseTo(one[k].barrier / 4, 12));
  });

  it('switches to the minimum action method when unequal weights break the gradient structure', () => {
    const res = barriersAt(system, g, new Float64Array([1, 2]), { pairs: (from) => g.graph.states[from].pattern.every((s) => s === 'base') });
    expect(res.gradient).toBe(false);
    expect(res.barriers).toHaveLength(2);
    for (const b of res.barriers) expect(b.method).toBe('minimum-action');
    // Uncoupled (beta = 0) the two exits cost 2 (V1(m) - V1(a)) / w_i^2 (derived: each path moves one
    // coordinate only), i.e. 4x cheaper over node b with w_b = 2; beta = 0.1 does not undo a factor 4.
    const [over] = [...res.barriers].sort((u, v) => u.barrier - v.barrier);
    expect(g.graph.states[over.to].pattern).toEqual(['base', 'tipped']);
  });

  it('names states and saddles by their tipped nodes', () => {
    const names = ['a', 'b'];
    expect(g.graph.states.map((s) => stateLabel(s.pattern, names)).sort()).toEqual(['a tipped', 'all-base', 'all-tipped', 'b tipped']);
    expect(g.graph.saddles.map((_, e) => saddleLabel(g, e, names)).sort()).toEqual(['a tipped -> all-tipped', 'all-base -> a tipped', 'all-base -> b tipped', 'b tipped -> all-tipped']);
  });
});

describe('barriersAt(system, graph, weights) on a one-way pair', () => {
  const { system, g } = setup(false);

  it('finds no gradient and uses the minimum action method, converged', () => {
    const res = barriersAt(system, g, iso);
    expect(res.gradient).toBe(false);
    expect(res.barriers).toHaveLength(2 * g.graph.saddles.length);
    for (const b of res.barriers) {
      expect(b.method).toBe('minimum-action');
      expect(b.converged).toBe(true);
    }
  });

  it('gives the upstream element its own barrier 2 (V1(m) - V1(a)) for the exit where it crosses its threshold', () => {
    // x1' = f(x1) does not see x2, so any path's action is at least that of its x1 component alone,
    // which is at least the element's quasi-potential 2 (V1(m) - V1(a)) (1-D gradient case). The bound
    // is reached: x1 follows the reversed downhill flow of f while x2 obeys its own equation at no
    // cost, and x2 relaxes to its stable value for x1 = m, the saddle's second coordinate (derived).
    const { a, m } = cubicRoots(r);
    const exact = 2 * (V1(m) - V1(a));
    const res = barriersAt(system, g, iso, { pairs: (from, e) => g.graph.states[from].pattern[0] === 'base' && g.graph.states[g.graph.saddles[e].to].pattern[0] === 'tipped' });
    expect(res.barriers.length).toBeGreaterThan(0);
    for (const b of res.barriers) expect(Math.abs(b.barrier - exact) / exact).toBeLessThan(1e-6);
  });
});
