import { describe, expect, it } from 'vitest';
import { eigs, complex, type Complex } from 'mathjs';
import { compileModelJson } from '../../../src/lib/model/index';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { labelRegimes } from '../../../src/lib/regimes/index';
import type { CompiledSystem } from '../../../src/lib/model/compiled-system';
import { cubicNetwork, cubicRoots, symmetricPairValues } from './fixtures';

/** Real parts of the eigenvalues of J_x by mathjs (a different library from the one used inside). */
function realParts(system: CompiledSystem, x: number[], p: number): number[] {
  const n = system.dimension;
  const j = system.jacobian(Float64Array.from(x), p, new Float64Array(n * n));
  const rows = Array.from({ length: n }, (_, i) => Array.from(j.slice(i * n, (i + 1) * n)));
  const values = eigs(rows).values as unknown as (number | Complex)[] | { toArray(): (number | Complex)[] };
  const list = Array.isArray(values) ? values : values.toArray();
  return list.map((v) => (typeof v === 'number' ? v : complex(v).re));
}

function residual(system: CompiledSystem, x: number[], p: number): number {
  const f = system.rates(Float64Array.from(x), p, new Float64Array(system.dimension));
  return Math.max(...Array.from(f, Math.abs));
}

const R = 0.1;

describe('labelRegimes on diagrams traced by the continuation engine', () => {
  it('symmetric cubic pair: weak ends at beta_sn and strong starts at beta_pf (closed forms in fixtures.ts)', () => {
    const system = compileModelJson(cubicNetwork({ r: R, nodes: ['left', 'right'], links: [{ from: 'left', to: 'right', twoWay: true }] }));
    const result = labelRegimes(system, traceDiagram(system));
    const { betaSaddleNode, betaPitchfork } = symmetricPairValues(R);
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    expect(Math.abs(result.regimes[0].to - betaSaddleNode)).toBeLessThan(1e-8);
    expect(Math.abs(result.regimes[2].from - betaPitchfork)).toBeLessThan(1e-8);
    expect(result.regimes[0].bounds[1]).toBe('saddle-node');
    expect(result.regimes[2].bounds[0]).toBe('pitchfork');
  });

  it('one-way cubic pair: weak ends at the first fold r + beta c = 2 ((1 - beta)/3)^(3/2) (derived in label-regimes.test.ts), then intermediate', () => {
    const { c } = cubicRoots(R);
    let lo = 0; let hi = 1;
    const g = (b: number) => R + b * c - 2 * ((1 - b) / 3) ** 1.5;
    for (let i = 0; i < 200; i++) { const m = 0.5 * (lo + hi); if (g(lo) * g(m) <= 0) hi = m; else lo = m; }
    const beta1 = 0.5 * (lo + hi);
    const system = compileModelJson(cubicNetwork({ r: R, nodes: ['upstream', 'downstream'], links: [{ from: 'upstream', to: 'downstream' }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
    const result = labelRegimes(system, traceDiagram(system));
    expect(result.regimes[0].regime).toBe('weak');
    expect(Math.abs(result.regimes[0].to - beta1)).toBeLessThan(1e-8);
    expect(result.regimes[1].regime).toBe('intermediate');
    expect(result.regimes[1].from).toBe(result.regimes[0].to);
  });

  it('uncoupled cubic triple swept over r in [-0.2, 0.2]: weak everywhere, all 8 patterns stable', () => {
    // Elements bistable for |r| < 2/(3 sqrt 3) (cusp, Strogatz ch. 3); coupling fixed at 0.
    const system = compileModelJson(cubicNetwork({ r: 0, nodes: ['n0', 'n1', 'n2'], links: [{ from: 'n0', to: 'n1', twoWay: true }, { from: 'n1', to: 'n2', twoWay: true }], couplingValue: 0, sweep: { parameter: 'r', from: -0.2, to: 0.2 } }));
    const result = labelRegimes(system, traceDiagram(system));
    expect(result.regimes.length).toBeGreaterThan(0);
    expect(result.regimes.every((b) => b.regime === 'weak')).toBe(true);
    expect(result.regimes[0].from).toBe(-0.2);
    expect(result.regimes[result.regimes.length - 1].to).toBe(0.2);
    for (const g of result.escapeGraphs) expect(new Set(g.states.map((s) => s.pattern.join('/'))).size).toBe(8);
  });

  it('three-lake chain with different loads: every band has a reason and every saddle edge joins two stable states', () => {
    // Shallow-lake element P' = a - b P + P^8/(1 + P^8) (Carpenter, Ludwig & Brock 1999, q = 8);
    // invented loads and links.
    const system = compileModelJson({
      format: 'brinkmap/network-1', name: 'Three lakes, downstream flow (invented)',
      element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
      nodes: [{ id: 'upper' }, { id: 'middle', parameters: { a: 0.07 } }, { id: 'lower' }],
      links: [{ from: 'upper', to: 'middle', weight: 1 }, { from: 'middle', to: 'lower', weight: 1, twoWay: true }],
      coupling: { parameter: 'beta', value: 0, term: 'source - target' },
      sweep: { parameter: 'beta', from: 0, to: 1 },
    });
    const result = labelRegimes(system, traceDiagram(system));
    expect(result.regimes.length).toBeGreaterThan(0);
    for (const b of result.regimes) {
      expect(b.reason.length).toBeGreaterThan(10);
      expect(b.reason).toMatch(/upper|middle|lower/);
    }
    expect(result.regimes[0].from).toBe(0);
    expect(result.regimes[result.regimes.length - 1].to).toBe(1);
    for (let k = 1; k < result.regimes.length; k++) expect(result.regimes[k].from).toBe(result.regimes[k - 1].to);
    let edges = 0;
    for (const g of result.escapeGraphs) {
      for (const s of g.states) {
        expect(residual(system, s.x, g.p)).toBeLessThan(1e-10);
        expect(Math.max(...realParts(system, s.x, g.p))).toBeLessThan(0);
      }
      for (const e of g.saddles) {
        edges++;
        expect(e.from).not.toBe(e.to);
        for (const end of [e.from, e.to]) expect(end >= 0 && end < g.states.length).toBe(true);
        expect(residual(system, e.x, g.p)).toBeLessThan(1e-10);
        expect(realParts(system, e.x, g.p).filter((re) => re > 0)).toHaveLength(1);
      }
    }
    expect(edges).toBeGreaterThan(0);
  });

  it('symmetric ring of three cubic elements: weak, intermediate, strong; both edges are folds of the (u, u, w) family', { timeout: 120_000 }, () => {
    // Ring a-b-c, two-way links. On the invariant plane x_a = x_b = u, x_c = w the equations are
    //   r + u - u^3 + beta (w - u) = 0,   r + w - w^3 + 2 beta (u - w) = 0.
    // The first gives beta = (r + u - u^3) / (u - w); put into the second:
    //   w^3 - w = 3 r + 2 u - 2 u^3,
    // a cubic in w for each u. So the family is parametrized by u (three root branches in w), and its
    // saddle-nodes are the local extrema of beta(u), found here by a scan and a ternary search.
    // Under the one-exit rule the band is strong only once the last of the other exits (saddles of
    // this family meeting index-2 saddles) is gone: at the largest fold in (0, 1). The weak band ends
    // where the partially tipped states of the family vanish. (At beta = (1 - 3 m^2)/3 the symmetric
    // state becomes an index-1 saddle, but the family's saddles are still other ways out there.)
    const folds = ringFolds(R);
    const system = compileModelJson(cubicNetwork({ r: R, nodes: ['a', 'b', 'c'], links: [{ from: 'a', to: 'b', twoWay: true }, { from: 'b', to: 'c', twoWay: true }, { from: 'c', to: 'a', twoWay: true }] }));
    const result = labelRegimes(system, traceDiagram(system));
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    const nearest = (p: number) => Math.min(...folds.map((f) => Math.abs(f - p)));
    expect(nearest(result.regimes[0].to)).toBeLessThan(1e-8);
    expect(Math.abs(result.regimes[2].from - Math.max(...folds))).toBeLessThan(1e-8);
    const { m } = cubicRoots(R);
    expect(result.regimes[2].from).toBeGreaterThan((1 - 3 * m * m) / 3);
    expect(result.regimes[2].reason).toContain('a, b and c tip together');
  });

  it('non-bistable element x\' = r - x traced by the engine: regimes undefined, no labels', () => {
    const doc = { ...cubicNetwork({ r: 0, nodes: ['only', 'other'], links: [{ from: 'only', to: 'other', twoWay: true }] }),
      element: { variable: 'x', rate: 'r - x', parameters: { r: 0 } } };
    const system = compileModelJson(doc);
    const result = labelRegimes(system, traceDiagram(system));
    expect(result.regimes).toEqual([]);
    expect(result.diagnostics.some((d) => d.code === 'regimes-undefined' && d.level === 'error')).toBe(true);
  });
});

/** Saddle-nodes in (0, 1) of the ring's (u, u, w) family (derivation in the ring test): extrema of beta(u). */
function ringFolds(r: number): number[] {
  // Real roots of w^3 - w - q = 0, i.e. q + w - w^3 = 0: Viete's formula (fixtures.cubicRoots) while
  // there are three of them (|q| < 2/(3 sqrt 3)).
  const roots = (q: number) => {
    if (!(Math.abs(q) < 2 / (3 * Math.sqrt(3)))) return [];
    const c = cubicRoots(q);
    return [c.a, c.m, c.c];
  };
  const folds: number[] = [];
  for (let branch = 0; branch < 3; branch++) {
    const beta = (u: number) => {
      const ws = roots(3 * r + 2 * u - 2 * u ** 3);
      return ws.length === 3 ? (r + u - u ** 3) / (u - ws[branch]) : Number.NaN;
    };
    const h = 4 / 4000;
    for (let k = 1; k < 4000; k++) {
      const u = -2 + k * h;
      const [b0, b1, b2] = [beta(u - h), beta(u), beta(u + h)];
      if (![b0, b1, b2].every(Number.isFinite) || (b1 - b0) * (b2 - b1) >= 0) continue;
      // Ternary search for the extremum of beta on [u - h, u + h].
      let lo = u - h;
      let hi = u + h;
      const sign = b1 > b0 ? 1 : -1;
      for (let i = 0; i < 200; i++) {
        const m1 = lo + (hi - lo) / 3;
        const m2 = hi - (hi - lo) / 3;
        if (sign * beta(m1) < sign * beta(m2)) lo = m1; else hi = m2;
      }
      const b = beta(0.5 * (lo + hi));
      if (b > 0 && b < 1) folds.push(b);
    }
  }
  return folds.sort((x, y) => x - y);
}
