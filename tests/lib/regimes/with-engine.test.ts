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

  it('symmetric ring of three cubic elements: weak, intermediate, strong, strong from beta = (1 - 3 m^2)/3', () => {
    // At the symmetric middle state (m, m, m), J = f'(m) I + beta L with the ring Laplacian L
    // (-2 on the diagonal, 1 off it), whose eigenvalues are 0 (direction (1,1,1)) and -3 (twice).
    // So J has f'(m) = 1 - 3 m^2 > 0 along (1,1,1) and the double eigenvalue f'(m) - 3 beta, which
    // turns negative at beta* = (1 - 3 m^2)/3: from there the only saddle is the symmetric one,
    // tipping all three together (a double zero eigenvalue, reported by the engine as degenerate).
    const { m } = cubicRoots(R);
    const system = compileModelJson(cubicNetwork({ r: R, nodes: ['a', 'b', 'c'], links: [{ from: 'a', to: 'b', twoWay: true }, { from: 'b', to: 'c', twoWay: true }, { from: 'c', to: 'a', twoWay: true }] }));
    const result = labelRegimes(system, traceDiagram(system));
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    expect(Math.abs(result.regimes[2].from - (1 - 3 * m * m) / 3)).toBeLessThan(1e-8);
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
