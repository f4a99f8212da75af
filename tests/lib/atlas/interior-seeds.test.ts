import { readFileSync } from 'node:fs';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { compileTwoParameter, saddleNodesAt, traceMap } from '../../../src/lib/maps/index';
import { compileModelJson } from '../../../src/lib/model';

/**
 * Branches that do not reach the sweep's start (src/lib/atlas/interior-seeds.ts). The invented 3-lake
 * chain of tests/fixtures/engine-three-lakes.json at b = 0.74: only the upper element is bistable
 * alone, so the starts at beta = 0 lie on three branches; coupling creates more equilibria inside the
 * sweep, born at saddle-nodes. The independent route is the two-parameter map (src/lib/maps: saddle-node
 * curves continued in (beta, b) from seeds at other values of b, then cut at b = 0.74), and each
 * saddle-node is checked on its own: F = 0 and a zero eigenvalue of J by ml-matrix's eigenvalue
 * decomposition (a general-purpose library).
 */
const fixture = JSON.parse(readFileSync('tests/fixtures/engine-three-lakes.json', 'utf8'));
const sys = compileTwoParameter(fixture.model, { second: 'b' });

describe('interior seeds: branches born inside the sweep', () => {
  const b = 0.74;
  const system = sys.atSecond(b);
  const diagram = traceDiagram(system);
  const folds = diagram.bifurcations.filter((q) => q.type === 'saddle-node');

  it('without interior seeds the diagram at b = 0.74 has no saddle-node (the gap of docs/maps.md §5)', () => {
    const before = traceDiagram(system, { interiorSeedValues: 0 });
    expect(before.bifurcations.filter((q) => q.type === 'saddle-node')).toEqual([]);
  });

  it('finds every saddle-node of the map\'s slice at b = 0.74 within 1e-8, and no other', () => {
    const map = traceMap(sys, { secondFrom: 0.3, secondTo: 1, regionColumns: 0, regionRows: 0 });
    const slice = saddleNodesAt(sys, map.curves, b).filter((q) => q.p >= 0 && q.p <= 0.3);
    // docs/maps.md §5 lists two: beta = 0.2661 and 0.0913.
    expect(slice.length).toBeGreaterThanOrEqual(2);
    const distance = (p: number, x: readonly number[], q: { p: number; x: readonly number[] }) => Math.max(Math.abs(p - q.p), ...x.map((v, i) => Math.abs(v - q.x[i])));
    for (const q of slice) expect(Math.min(...folds.map((f) => distance(q.p, q.x, f)))).toBeLessThan(1e-8);
    for (const f of folds) expect(Math.min(...slice.map((q) => distance(f.p, f.x, q)))).toBeLessThan(1e-8);
  });

  it('each saddle-node found is an equilibrium with a zero eigenvalue (ml-matrix)', () => {
    expect(folds.length).toBeGreaterThanOrEqual(2);
    const n = system.dimension;
    for (const f of folds) {
      const x = Float64Array.from(f.x);
      const F = new Float64Array(n);
      system.rates(x, f.p, F);
      expect(Math.max(...Array.from(F, Math.abs))).toBeLessThan(1e-10);
      const J = new Float64Array(n * n);
      system.jacobian(x, f.p, J);
      const m = new Matrix(n, n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m.set(i, j, J[i * n + j]);
      const eig = new EigenvalueDecomposition(m);
      const smallest = Math.min(...eig.realEigenvalues.map((re, k) => Math.hypot(re, eig.imaginaryEigenvalues[k])));
      expect(smallest).toBeLessThan(1e-8);
    }
  });

  it('leaves a diagram whose branches all reach the start as it was (seeds on traced branches are skipped)', () => {
    // The symmetric cubic pair: all nine equilibria at beta = 0 are starts, every branch reaches it.
    const pair = compileModelJson({
      format: 'brinkmap/network-1', name: 'symmetric cubic pair (test)',
      element: { variable: 'x', rate: 'x - x^3 + r', parameters: { r: 0.1 } },
      nodes: [{ id: 'a' }, { id: 'b' }], links: [{ from: 'a', to: 'b', weight: 1 }, { from: 'b', to: 'a', weight: 1 }],
      coupling: { parameter: 'beta', value: 0, term: 'source - target' }, sweep: { parameter: 'beta', from: 0, to: 0.5 },
    });
    const on = traceDiagram(pair);
    const off = traceDiagram(pair, { interiorSeedValues: 0 });
    expect(on.branches.length).toBe(off.branches.length);
    expect(on.branches.map((q) => q.points)).toEqual(off.branches.map((q) => q.points));
    expect(on.bifurcations).toEqual(off.bifurcations);
  });
});
