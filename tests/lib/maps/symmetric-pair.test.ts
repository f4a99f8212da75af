import { describe, expect, it } from 'vitest';
import { compileTwoParameter, traceMap } from '../../../src/lib/maps/index';
import { cubicNetwork, symmetricPairValues } from '../regimes/fixtures';

/**
 * Symmetric cubic pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i) in (beta, r): saddle-node curve
 * beta = 1/3 - (r/2)^(2/3) and pitchfork curve beta = (1 - 3 m(r)^2)/2, m the middle root of the
 * element (both derived in tests/lib/regimes/fixtures.ts, symmetricPairValues).
 */
const pair = cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }] });

describe('map of the symmetric cubic pair in (beta, r)', () => {
  const sys = compileTwoParameter(pair, { second: 'r' });
  const map = traceMap(sys, { secondFrom: 0.02, secondTo: 0.3 });

  it('finds the two mirror-image saddle-node curves and one pitchfork curve, each across the whole r range', () => {
    expect(map.curves.map((c) => c.type).sort()).toEqual(['pitchfork', 'saddle-node', 'saddle-node']);
    for (const c of map.curves) {
      expect(c.ends).toEqual(['parameter-bound', 'parameter-bound']);
      const rs = c.points.map((q) => q.p[1]);
      expect(Math.min(...rs)).toBeCloseTo(0.02, 12);
      expect(Math.max(...rs)).toBeCloseTo(0.3, 12);
    }
    const [s1, s2] = map.curves.filter((c) => c.type === 'saddle-node');
    // Mirror images: swapping the nodes maps one curve's seed state onto the other's.
    expect(s1.seed.x[0]).toBeCloseTo(s2.seed.x[1], 9);
  });

  it('saddle-node curves follow beta = 1/3 - (r/2)^(2/3) and the pitchfork curve beta = (1 - 3 m(r)^2)/2 to 1e-8', () => {
    for (const c of map.curves) {
      for (const q of c.points) {
        const [beta, r] = q.p;
        const v = symmetricPairValues(r);
        expect(Math.abs(beta - (c.type === 'saddle-node' ? v.betaSaddleNode : v.betaPitchfork))).toBeLessThan(1e-8);
      }
    }
    // The pitchfork curve's states are symmetric (x1 = x2 = m(r)).
    for (const q of map.curves.find((c) => c.type === 'pitchfork')!.points) expect(q.x[0]).toBe(q.x[1]);
  });

  it('regions: weak below the saddle-node curve, intermediate between, strong above the pitchfork curve (labelAt rule, tests/lib/regimes/label-at.test.ts)', () => {
    const labelled = map.regions.filter((g) => g.regime !== null);
    expect(labelled.map((g) => g.regime).sort()).toEqual(['intermediate', 'strong', 'weak']);
    for (const g of labelled) {
      for (const [beta, r] of g.samples) {
        const v = symmetricPairValues(r);
        if (g.regime === 'weak') expect(beta).toBeLessThan(v.betaSaddleNode);
        if (g.regime === 'intermediate') expect(beta > v.betaSaddleNode && beta < v.betaPitchfork).toBe(true);
        if (g.regime === 'strong') expect(beta).toBeGreaterThan(v.betaPitchfork);
      }
    }
    const byRegime = Object.fromEntries(labelled.map((g) => [g.regime, g]));
    const sn = map.curves.filter((c) => c.type === 'saddle-node').map((c) => c.id);
    const pf = map.curves.filter((c) => c.type === 'pitchfork').map((c) => c.id);
    expect(byRegime.weak.boundedBy).toEqual(expect.arrayContaining(sn));
    expect(byRegime.weak.boundedBy).not.toEqual(expect.arrayContaining(pf));
    expect(byRegime.strong.boundedBy).toEqual(pf);
    expect(byRegime.intermediate.boundedBy).toEqual(expect.arrayContaining([...sn, ...pf]));
    // Every label change on the grid has one of the continued curves between the two samples.
    for (const g of map.regions) expect(g.unlocatedEdges).toBe(0);
  });
});
