import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas';
import { compileModelJson } from '../../../src/lib/model';
import { noiseGraphAt } from '../../../src/lib/noise';
import { cubicNetwork, cubicRoots } from '../regimes/fixtures';

describe('noiseGraphAt(system, diagram, p)', () => {
  const r = 0.1;
  const system = compileModelJson(cubicNetwork({ r, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
  const diagram = traceDiagram(system);

  it('at weak coupling has the four patterns and four saddles of the symmetric pair', () => {
    const g = noiseGraphAt(system, diagram, 0.05);
    if (!g.ok) throw new Error(g.reason);
    expect(g.graph.states.map((s) => s.pattern.join(' ')).sort()).toEqual(['base base', 'base tipped', 'tipped base', 'tipped tipped']);
    expect(g.graph.saddles).toHaveLength(4);
    expect(g.saddles).toHaveLength(4);
    expect(g.states).toHaveLength(4);
  });

  it('gives each stable state its spectrum: at all-base, eigenvalues 1 - 3a^2 and 1 - 3a^2 - 2 beta', () => {
    // J = [[1 - 3a^2 - beta, beta], [beta, 1 - 3a^2 - beta]] at the symmetric state (a, a): eigenvalues
    // 1 - 3a^2 (along (1, 1)) and 1 - 3a^2 - 2 beta (along (1, -1)); a = cubicRoots(r).a (derived, closed form).
    const beta = 0.05;
    const g = noiseGraphAt(system, diagram, beta);
    if (!g.ok) throw new Error(g.reason);
    const k = g.graph.states.findIndex((s) => s.pattern.every((x) => x === 'base'));
    const a = cubicRoots(r).a;
    const re = g.states[k].eigenvalues.map((e) => e.re).sort((u, v) => u - v);
    expect(re[0]).toBeCloseTo(1 - 3 * a * a - 2 * beta, 9);
    expect(re[1]).toBeCloseTo(1 - 3 * a * a, 9);
    expect(g.states[k].x[0]).toBeCloseTo(a, 9);
  });

  it('gives each saddle exactly one unstable eigenvalue with its eigenvector', () => {
    const g = noiseGraphAt(system, diagram, 0.3);
    if (!g.ok) throw new Error(g.reason);
    for (const s of g.saddles) {
      expect(s.unstable).toBe(1);
      expect(s.unstableVector).toHaveLength(2);
    }
    expect(g.roles.map((x) => x.threshold)).toEqual([cubicRoots(r).m, cubicRoots(r).m].map((m) => expect.closeTo(m, 9)));
  });

  it('reports why it has no graph for a model that is not a network', () => {
    const ode = compileModelJson({ format: 'brinkmap/ode-1', name: 'double well (textbook)', variables: ['x'], parameters: { c: 0 },
      rates: { x: 'c + x - x^3' }, sweep: { parameter: 'c', from: -0.1, to: 0.1 } });
    const g = noiseGraphAt(ode, traceDiagram(ode), 0);
    expect(g.ok).toBe(false);
    if (!g.ok) expect(g.reason).toMatch(/not a network/);
  });
});
