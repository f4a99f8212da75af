import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { lakeNetwork } from './fixtures';
import { createLabeller, labelRegimes, resolveOptions } from '../../../src/lib/regimes/index';
import { branchTargets, followBranch } from '../../../src/lib/regimes/escape-graph';
import { isIndexOneSaddle } from '../../../src/lib/regimes/equilibria-at';
import { looksCooperative, orderedLimit } from '../../../src/lib/regimes/start-exits';

const lakes = lakeNetwork;

const oneWayChain = lakes([0.08, 0.06, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1 }], 1.2);
const mixed = lakes([0.05, 0.07, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1, twoWay: true }]);
const ring = lakes([0.05, 0.055, 0.06, 0.045], [
  { from: 0, to: 1, weight: 1, twoWay: true }, { from: 1, to: 2, weight: 0.5, twoWay: true },
  { from: 2, to: 3, weight: 1.3, twoWay: true }, { from: 3, to: 0, weight: 0.7, twoWay: true }, { from: 0, to: 2, weight: 0.4 },
]);

describe('branch ends decided by the order of the equilibria (orderedLimit)', () => {
  // Independent check: the end that orderedLimit reads off the order of the equilibria against the
  // end that numerical integration of the same branch reaches (odex, followBranch), at every index-1
  // saddle with a non-negative unstable eigenvector, both branches, on 40 parameter values.
  for (const [name, doc] of [['one-way chain', oneWayChain], ['one-way and two-way links', mixed], ['two-way ring with a chord', ring]] as const) {
    it(`agrees with integration on every ordered branch: ${name}`, () => {
      const system = compileModelJson(doc);
      const diagram = traceDiagram(system);
      const o = resolveOptions({});
      const labeller = createLabeller(system, diagram, o);
      let compared = 0;
      let undecided = 0;
      for (let k = 0; k < 40; k++) {
        const p = system.sweep.from + ((system.sweep.to - system.sweep.from) * (k + 0.5)) / 40;
        const eq = labeller.equilibriaAt(p);
        expect(looksCooperative(system, eq, p)).toBe(true);
        const targets = branchTargets(system, eq, labeller.rolesAt(p) as never, o);
        for (const s of eq.filter(isIndexOneSaddle)) {
          if (!s.unstableVector!.every((c) => c >= -1e-12)) continue;
          for (const sign of [1, -1] as const) {
            const decided = orderedLimit(s.x, s.unstableVector!, sign, eq.map((e) => e.x), targets.states, o.duplicateTolerance);
            const integrated = followBranch(system, p, s, sign, targets, o, []);
            expect(integrated.reached).toBeGreaterThanOrEqual(0);
            if (decided < 0) { undecided++; continue; }
            expect(decided).toBe(integrated.reached);
            compared++;
          }
        }
      }
      // Not vacuous: the order decides (nearly) every branch of these networks.
      expect(compared).toBeGreaterThan(100);
      expect(undecided).toBeLessThan(compared / 10);
    });
  }

  it('gives the same bands with and without it, integrating far fewer branches', () => {
    for (const doc of [oneWayChain, mixed]) {
      const system = compileModelJson(doc);
      const diagram = traceDiagram(system);
      const withOrder = labelRegimes(system, diagram, { escapeGraphs: false });
      const without = labelRegimes(system, diagram, { escapeGraphs: false, orderedLimits: false });
      expect(withOrder.regimes.map((b) => b.regime)).toEqual(without.regimes.map((b) => b.regime));
      withOrder.regimes.forEach((b, k) => {
        expect(Math.abs(b.from - without.regimes[k].from)).toBeLessThan(1e-9);
        expect(Math.abs(b.to - without.regimes[k].to)).toBeLessThan(1e-9);
      });
      expect(withOrder.crossovers.map((c) => c.kind)).toEqual(without.crossovers.map((c) => c.kind));
      expect(withOrder.work.decided).toBeGreaterThan(0);
      expect(without.work.decided).toBe(0);
      expect(withOrder.work.integrations).toBeLessThan(0.6 * without.work.integrations);
    }
  });

  it('does not decide anything for a system that is not cooperative', () => {
    // An inhibitory link (negative weight) makes an off-diagonal entry of J_x negative: no order argument.
    const doc = lakes([0.05, 0.07], [{ from: 0, to: 1, weight: -0.5 }, { from: 1, to: 0, weight: 1 }], 0.6);
    const system = compileModelJson(doc);
    const r = labelRegimes(system, traceDiagram(system), { escapeGraphs: false });
    expect(r.work.decided).toBe(0);
  });
});

describe('continuing the equilibria across a saddle-node cut', () => {
  it('gives the label and the exits that refining from the whole diagram gives, on both sides of every cut', () => {
    // Independent check: the first point of each span, continued from the point just across the cut
    // (continueAcrossCut), against a fresh labeller that refines every equilibrium the diagram shows.
    for (const doc of [oneWayChain, mixed, ring]) {
      const system = compileModelJson(doc);
      const diagram = traceDiagram(system);
      const result = labelRegimes(system, diagram, { escapeGraphs: false });
      expect(result.work.acrossCuts).toBeGreaterThan(0);
      const cuts = [...new Set(diagram.bifurcations.filter((sp) => sp.type === 'saddle-node').map((sp) => sp.p))].sort((a, b) => a - b);
      const labeller = createLabeller(system, diagram, {});
      let checked = 0;
      for (let k = 0; k < cuts.length; k++) {
        const c = cuts[k];
        const lo = k > 0 ? cuts[k - 1] : system.sweep.from;
        const hi = k + 1 < cuts.length ? cuts[k + 1] : system.sweep.to;
        if (c - lo < 1e-6 || hi - c < 1e-6) continue;
        const h = 1e-7 * (1 + Math.abs(c));
        labeller.labelAt(c - h, 'all-base', [lo, c]);
        const before = labeller.counts.acrossCuts;
        const across = labeller.labelAt(c + h, 'all-base', [c, hi]);
        if (labeller.counts.acrossCuts === before) continue;
        const fresh = createLabeller(system, diagram, {}).labelAt(c + h);
        expect(across.key).toBe(fresh.key);
        expect(across.exits.length).toBe(fresh.exits.length);
        for (const e of across.exits) {
          expect(fresh.exits.some((f) => f.saddle.every((v, i) => Math.abs(v - e.saddle[i]) < 1e-8 * (1 + Math.abs(v))))).toBe(true);
        }
        checked++;
      }
      expect(checked).toBeGreaterThan(0);
    }
  });
});
