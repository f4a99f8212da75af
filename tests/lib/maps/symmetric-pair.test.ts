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

/**
 * Through r = 0 the saddle-node curves of the pair have a cusp. From the asymmetric branch
 * beta(s) = (1 - s^2 - r/s)/3 (fixtures.ts), the fold dbeta/ds = 0 gives r = 2 s^3 and
 * beta = (1 - 3 s^2)/3: the curve (beta, r) = ((1 - 3s^2)/3, 2 s^3) is a semicubical parabola whose
 * tangent vanishes at s = 0, i.e. a cusp at beta = 1/3, r = 0, with d^2 = (8r/s + 4 - s^2)/3 -> 4/3,
 * so x = (s ± d)/2 -> (±1/sqrt 3, ∓1/sqrt 3), one cusp per mirror-image curve.
 */
describe('map of the symmetric pair across r = 0 (derived cusp at beta = 1/3)', () => {
  const sys = compileTwoParameter(pair, { second: 'r' });
  const map = traceMap(sys, { secondFrom: -0.2, secondTo: 0.2, regionColumns: 0, regionRows: 0 });

  it('locates the two mirror-image cusps at (1/3, 0) with x = ±(1/sqrt 3, -1/sqrt 3) to 1e-9', () => {
    const cusps = map.points.filter((q) => q.type === 'cusp');
    expect(cusps).toHaveLength(2);
    const u = 1 / Math.sqrt(3);
    for (const c of cusps) {
      expect(Math.abs(c.p[0] - 1 / 3)).toBeLessThan(1e-9);
      expect(Math.abs(c.p[1])).toBeLessThan(1e-9);
      expect(Math.abs(Math.abs(c.x[0]) - u)).toBeLessThan(1e-9);
      expect(Math.abs(c.x[0] + c.x[1])).toBeLessThan(1e-9);
      expect(Math.sign(c.evidence.before as number)).toBe(-Math.sign(c.evidence.after as number));
    }
    expect(Math.sign(cusps[0].x[0])).toBe(-Math.sign(cusps[1].x[0]));
  });

  it('the saddle-node curves follow beta = 1/3 - (|r|/2)^(2/3) on both sides of the cusp to 1e-8', () => {
    const folds = map.curves.filter((c) => c.type === 'saddle-node');
    expect(folds).toHaveLength(2);
    for (const c of folds) for (const q of c.points) expect(Math.abs(q.p[0] - (1 / 3 - Math.pow(Math.abs(q.p[1]) / 2, 2 / 3)))).toBeLessThan(1e-8);
  });
});

describe('map of the one-way pair (no permutation symmetry)', () => {
  it('continues no pitchfork curve and says why in an info diagnostic', () => {
    const oneWay = cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2' }] });
    const sys = compileTwoParameter(oneWay, { second: 'r' });
    const map = traceMap(sys, { secondFrom: 0.05, secondTo: 0.2, seeds: 2, regionColumns: 0, regionRows: 0 });
    expect(map.curves.filter((c) => c.type === 'pitchfork')).toEqual([]);
    expect(map.curves.filter((c) => c.type === 'saddle-node').length).toBeGreaterThan(0);
    expect(map.diagnostics.find((d) => d.code === 'branch-point-not-continued')?.level).toBe('info');
  });
});

describe('traceMap settings and cancellation', () => {
  const sys = compileTwoParameter(pair, { second: 'r' });
  it('invalid settings give an empty map with an error diagnostic naming the setting', () => {
    const map = traceMap(sys, { secondFrom: 0.1, secondTo: 0.1 });
    expect(map.curves).toEqual([]);
    expect(map.diagnostics[0]).toMatchObject({ level: 'error', code: 'invalid-settings' });
    expect(map.diagnostics[0].message).toMatch(/^secondFrom\/secondTo/);
    expect(traceMap(sys, { secondFrom: 0, secondTo: 0.2, seeds: 0 }).diagnostics[0].message).toMatch(/^seeds/);
  });
  it('a cancelled map is partial and says so', () => {
    let calls = 0;
    const map = traceMap(sys, { secondFrom: 0.02, secondTo: 0.3 }, { isCancelled: () => ++calls > 50 });
    expect(map.diagnostics.some((d) => d.code === 'cancelled')).toBe(true);
    expect(map.regions).toEqual([]);
  });
});
