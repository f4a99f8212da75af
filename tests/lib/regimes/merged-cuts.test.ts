import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { lakeNetwork, benchCubicNetwork } from './fixtures';
import { createLabeller, labelRegimes, type RegimeResult } from '../../../src/lib/regimes/index';

/**
 * Sampling across cuts that cannot change the label (mergeCuts, docs/regimes.md "Cuts that cannot
 * change a label") against the labeller that starts a new sampled interval at every cut
 * (mergeCuts: false), on the same diagram: an independent computation of the same rule, with far
 * denser sampling (every interval between special points gets its own samples). The bands must be
 * the same (regimes, bounds, ends to the crossovers' location tolerance of 1e-9), with fewer
 * labelled parameter values.
 */

const lakes = lakeNetwork;

const cubic = benchCubicNetwork;
const chain = (k: number, twoWay: boolean) => Array.from({ length: k - 1 }, (_, i) => ({ from: i, to: i + 1, twoWay }));

const networks = [
  ['three lakes, one-way chain', lakes([0.08, 0.06, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1 }], 1.2)],
  ['three lakes, one-way and two-way links', lakes([0.05, 0.07, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1, twoWay: true }])],
  ['four lakes, two-way ring with a chord', lakes([0.05, 0.055, 0.06, 0.045], [
    { from: 0, to: 1, weight: 1, twoWay: true }, { from: 1, to: 2, weight: 0.5, twoWay: true },
    { from: 2, to: 3, weight: 1.3, twoWay: true }, { from: 3, to: 0, weight: 0.7, twoWay: true }, { from: 0, to: 2, weight: 0.4 },
  ])],
  ['five cubic nodes, two-way chain', cubic(5, chain(5, true))],
  ['five cubic nodes, one-way chain', cubic(5, chain(5, false))],
] as const;

const bandsOf = (r: RegimeResult) => r.regimes.map((b) => ({ start: b.start, regime: b.regime, bounds: b.bounds.map((s) => s.split(':')[0]), from: b.from, to: b.to, reason: b.reason }));

describe('labelling across cuts that cannot change the label', () => {
  let passedOverSaddleNodeEdge = 0;
  let keptSaddleNodeEdge = 0;
  for (const [name, doc] of networks) {
    it(`gives the bands of the every-interval labeller with fewer labels: ${name}`, () => {
      const system = compileModelJson(doc);
      const diagram = traceDiagram(system);
      const starts = ['all-base', 'all-tipped'] as const;
      const every = labelRegimes(system, diagram, { mergeCuts: false, starts: [...starts], escapeGraphs: false });
      const merged = labelRegimes(system, diagram, { starts: [...starts], escapeGraphs: false });
      const a = bandsOf(every);
      const b = bandsOf(merged);
      expect(b.length).toBe(a.length);
      a.forEach((band, k) => {
        expect(b[k].start).toBe(band.start);
        expect(b[k].regime).toBe(band.regime);
        expect(b[k].bounds).toEqual(band.bounds);
        expect(b[k].reason).toBe(band.reason);
        // Ends at cuts are the same special point; located crossovers agree to their bracket (1e-9).
        expect(Math.abs(b[k].from - band.from)).toBeLessThanOrEqual(1e-9);
        expect(Math.abs(b[k].to - band.to)).toBeLessThanOrEqual(1e-9);
        for (const s of band.bounds) if (s.includes('saddle-node')) keptSaddleNodeEdge++;
      });
      expect(merged.crossovers.length).toBe(every.crossovers.length);
      expect(merged.work.points).toBeLessThan(every.work.points);
      const cuts = diagram.bifurcations.filter((sp) => sp.type === 'saddle-node').length;
      if (cuts > a.length + 1) passedOverSaddleNodeEdge++;
    }, 120_000);
  }
  it('kept a saddle-node that ends a band and passed over others (the comparison is not vacuous)', () => {
    expect(keptSaddleNodeEdge).toBeGreaterThan(0);
    expect(passedOverSaddleNodeEdge).toBeGreaterThan(0);
  });
});

describe('PointLabel.restsOn', () => {
  it('names the branches of the start state, its exit saddles and their destinations', () => {
    // Two invented lakes, one-way link: at beta = 0.05 the all-base state has exits (tipping a lake).
    const system = compileModelJson(lakes([0.08, 0.06], [{ from: 0, to: 1, weight: 1 }]));
    const diagram = traceDiagram(system);
    const labeller = createLabeller(system, diagram);
    const p = 0.05;
    const label = labeller.labelAt(p);
    expect(label.regime).not.toBeNull();
    const eq = labeller.equilibriaAt(p);
    const ids = new Set(diagram.branches.map((b) => b.id));
    expect(label.restsOn!.length).toBeGreaterThan(0);
    for (const id of label.restsOn!) expect(ids.has(id)).toBe(true);
    // Every exit saddle's branch is among them (found independently: the equilibrium at the saddle's state).
    for (const e of label.exits) {
      const s = eq.find((q) => q.x.every((v, i) => Math.abs(v - e.saddle[i]) < 1e-9));
      expect(s?.branch).toBeDefined();
      expect(label.restsOn).toContain(s!.branch);
    }
  });
});
