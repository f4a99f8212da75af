import { polynomialRoot } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { compileModelJson } from '../../../src/lib/model/index.js';

// Three identical cubic elements x' = r + x - x^3 (r = 0.1, invented), all pairs coupled both ways.
const doc = {
  format: 'brinkmap/network-1',
  name: 'Symmetric triangle of cubic elements (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
  nodes: [{ id: 'A' }, { id: 'B' }, { id: 'C' }],
  links: [
    { from: 'A', to: 'B', weight: 1, twoWay: true },
    { from: 'B', to: 'C', weight: 1, twoWay: true },
    { from: 'C', to: 'A', weight: 1, twoWay: true },
  ],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
};

describe('traceDiagram on a fully symmetric triangle (a double zero eigenvalue)', () => {
  it('reports the symmetric middle state\'s double eigenvalue crossing at beta = f\'(x0)/3 as degenerate, once', () => {
    // On (x0, x0, x0) J = f'(x0) I - beta L with L the Laplacian of the triangle, eigenvalues 0, 3, 3:
    // J has f'(x0) once and f'(x0) - 3 beta twice, so two eigenvalues cross zero together at
    // beta = f'(x0)/3 (derived). det [DH; t] keeps its sign there; only the unstable count (3 -> 1) shows it.
    const x0 = (polynomialRoot(0.1, 1, 0, -1) as unknown as (number | { re: number; im: number })[])
      .map((z) => (typeof z === 'number' ? z : z.re))
      .sort((a, b) => a - b)[1];
    const betaStar = (1 - 3 * x0 * x0) / 3;
    const d = traceDiagram(compileModelJson(doc));
    const deg = d.bifurcations.filter((s) => s.type === 'degenerate');
    expect(deg).toHaveLength(1);
    expect(Math.abs(deg[0].p - betaStar)).toBeLessThan(1e-9);
    for (const v of deg[0].x) expect(Math.abs(v - x0)).toBeLessThan(1e-9);
    expect(deg[0].note).toMatch(/2 eigenvalues cross zero together/);
    // Nothing else claims that point as a simple branch point or a saddle-node.
    expect(d.bifurcations.filter((s) => Math.abs(s.p - betaStar) < 1e-7 && s.type !== 'degenerate')).toEqual([]);
  });
});
