import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { compileTwoParameter, saddleNodesAt, traceMap } from '../../../src/lib/maps/index';

/**
 * A one-parameter slice of the map equals the one-parameter diagram at that value (issue 14): the
 * saddle-node curves of the invented 3-lake chain (tests/fixtures/engine-three-lakes.json, element
 * a - b P + P^8/(1 + P^8)) in (beta, b), cut at values of b that are not seed values, against
 * today's engine (traceDiagram, an independent route: sign changes of the tangent's parameter
 * component on equilibrium branches) on the document with b set to that value.
 */
const fixture = JSON.parse(readFileSync('tests/fixtures/engine-three-lakes.json', 'utf8'));

describe('slices of the 3-lake map against one-parameter diagrams', () => {
  const sys = compileTwoParameter(fixture.model, { second: 'b' });
  const map = traceMap(sys, { secondFrom: 0.5, secondTo: 0.7, regionColumns: 0, regionRows: 0 });

  it('traces saddle-node curves that all end on the parameter bounds, without warnings', () => {
    expect(map.curves.length).toBeGreaterThan(4);
    for (const c of map.curves) expect(c.ends).toEqual(['parameter-bound', 'parameter-bound']);
    expect(map.diagnostics.filter((d) => d.level !== 'info')).toEqual([]);
  });

  for (const b of [0.5137, 0.5893, 0.6137, 0.6781]) {
    it(`at b = ${b}: every saddle-node of the diagram is a slice point within 1e-8 and vice versa`, () => {
      const diagram = traceDiagram(sys.atSecond(b));
      const folds = diagram.bifurcations.filter((q) => q.type === 'saddle-node');
      const slice = saddleNodesAt(sys, map.curves, b).filter((q) => q.p >= 0 && q.p <= 0.3);
      expect(folds.length).toBeGreaterThan(0);
      expect(slice.every((q) => q.converged)).toBe(true);
      const distance = (p: number, x: readonly number[], q: { p: number; x: readonly number[] }) => Math.max(Math.abs(p - q.p), ...x.map((v, i) => Math.abs(v - q.x[i])));
      for (const f of folds) expect(Math.min(...slice.map((q) => distance(f.p, f.x, q)))).toBeLessThan(1e-8);
      for (const q of slice) expect(Math.min(...folds.map((f) => distance(q.p, q.x, f)))).toBeLessThan(1e-8);
    });
  }
});
