import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { createLabeller, labelAt, labelRegimes, regimeOfExits } from '../../../src/lib/regimes/index';
import type { Diagram } from '../../../src/lib/atlas/types';
import { cubicNetwork, symmetricPairDiagram, symmetricPairValues } from './fixtures';

const R = 0.1;
const pairDoc = (r: number) => cubicNetwork({ r, nodes: ['left', 'right'], links: [{ from: 'left', to: 'right', twoWay: true }] });

describe('regimeOfExits (the rule on hand-made exits)', () => {
  it('regimeOfExits is weak when every exit tips exactly its engaged nodes, and not when one tips an extra node', () => {
    expect(regimeOfExits([{ engaged: [0], tipping: [0] }, { engaged: [1], tipping: [1] }], 3)).toBe('weak');
    expect(regimeOfExits([{ engaged: [0], tipping: [0] }, { engaged: [1], tipping: [1, 2] }], 3)).toBe('intermediate');
    // An engaged node that falls back is not "exactly the engaged nodes" either.
    expect(regimeOfExits([{ engaged: [0, 1], tipping: [0] }], 3)).toBe('intermediate');
  });

  it('regimeOfExits is strong only for one exit to all-tipped with every node engaged', () => {
    expect(regimeOfExits([{ engaged: [0, 1], tipping: [0, 1] }], 2)).toBe('strong');
    // Two ways out, both together: still intermediate (a network that keeps two ways out is never strong).
    expect(regimeOfExits([{ engaged: [0, 1], tipping: [0, 1] }, { engaged: [0, 1], tipping: [0, 1] }], 2)).toBe('intermediate');
    expect(regimeOfExits([{ engaged: [0], tipping: [0, 1] }], 2)).toBe('intermediate');
    expect(regimeOfExits([], 2)).toBeNull();
  });
});

describe('labelAt on the symmetric cubic pair (analytic branches, closed forms in fixtures.ts)', () => {
  const system = compileModelJson(pairDoc(R));
  const diagram = symmetricPairDiagram(R);
  const { betaSaddleNode, betaPitchfork } = symmetricPairValues(R);
  const labeller = createLabeller(system, diagram);

  it('labelAt is weak below the saddle-node, intermediate between it and the pitchfork, strong above the pitchfork', () => {
    // Below beta_sn = 1/3 - (r/2)^(2/3) the two partially tipped states exist and each exit ends in one;
    // between beta_sn and beta_pf = (1 - 3 m^2)/2 the two lopsided saddles are two exits to all-tipped;
    // above beta_pf they have merged into the symmetric saddle (m, m): one exit, both nodes at the threshold.
    expect(labeller.labelAt(betaSaddleNode - 1e-4).regime).toBe('weak');
    expect(labeller.labelAt(betaSaddleNode + 1e-4).regime).toBe('intermediate');
    expect(labeller.labelAt(betaPitchfork - 1e-5).regime).toBe('intermediate');
    expect(labeller.labelAt(betaPitchfork - 1e-5).exits).toHaveLength(2);
    const above = labeller.labelAt(betaPitchfork + 1e-5);
    expect(above.regime).toBe('strong');
    expect(above.exits).toHaveLength(1);
    // At (m, m) both nodes are at their thresholds: progress exactly 1 (definition of progress).
    for (const s of above.exits[0].progress) expect(Math.abs(s - 1)).toBeLessThan(1e-9);
  });

  it('labelAt does not depend on the diagram range it was given: same label from diagrams over [0, 1] and [0.3, 0.7]', () => {
    const other = createLabeller(system, symmetricPairDiagram(R, 0.3, 0.7));
    for (const p of [0.31, 0.4, 0.45, betaPitchfork + 1e-6, 0.6, 0.69]) {
      const a = labeller.labelAt(p);
      const b = other.labelAt(p);
      expect(b.regime).toBe(a.regime);
      expect(b.key).toBe(a.key);
    }
  });

  it('a label whose equilibria were continued from a neighbour in its span is the label refined from the diagram', () => {
    // (beta_sn, beta_pf) holds no special point: the continued stable states and saddles must be the
    // refined ones (the counting argument of continueFromNeighbour), and so the exits and the key.
    const span = [betaSaddleNode, betaPitchfork] as const;
    const near = createLabeller(system, diagram);
    const p0 = betaSaddleNode + 0.1 * (betaPitchfork - betaSaddleNode);
    near.labelAt(p0, 'all-base', span);
    for (const f of [0.3, 0.6, 0.9]) {
      const p = betaSaddleNode + f * (betaPitchfork - betaSaddleNode);
      const got = near.labelAt(p, 'all-base', span);
      const fresh = createLabeller(system, diagram).labelAt(p);
      expect(got.key).toBe(fresh.key);
      expect(got.exits).toHaveLength(fresh.exits.length);
      for (const e of fresh.exits) {
        const twin = got.exits.find((g) => g.saddle.every((c, i) => Math.abs(c - e.saddle[i]) < 1e-10));
        expect(twin?.destination).toEqual(e.destination);
      }
    }
    expect(near.counts.continued).toBe(3);
    expect(near.counts.continuationFallbacks).toBe(0);
  });

  it('labelRegimes puts the strong band at the pitchfork and the weak band at the saddle-node to 1e-8', () => {
    const result = labelRegimes(system, diagram);
    const strong = result.regimes.find((b) => b.regime === 'strong')!;
    const weak = result.regimes.find((b) => b.regime === 'weak')!;
    expect(Math.abs(strong.from - betaPitchfork)).toBeLessThan(1e-8);
    expect(Math.abs(weak.to - betaSaddleNode)).toBeLessThan(1e-8);
    // labelAt agrees with the band that holds p.
    for (const b of result.regimes) {
      for (const t of [0.1, 0.5, 0.9]) expect(labelAt(system, diagram, b.from + t * (b.to - b.from)).regime).toBe(b.regime);
    }
  });

  it('labelRegimes locates the engagement crossover inside the intermediate band and names it, without changing the label', () => {
    // Between the saddle-node and the pitchfork the lagging node of each lopsided saddle passes progress
    // 0.5: the reasons change, the label does not (both exits still end in all-tipped).
    const result = labelRegimes(system, diagram);
    const x = result.crossovers.filter((c) => c.kind === 'engagement-crossover');
    expect(x.length).toBeGreaterThan(0);
    for (const c of x) {
      expect(c.p).toBeGreaterThan(betaSaddleNode);
      expect(c.p).toBeLessThan(betaPitchfork);
      expect(c.below).toBe('intermediate');
      expect(c.above).toBe('intermediate');
      expect(c.bracket).toBeLessThanOrEqual(1e-9);
      expect(c.description).toMatch(/^engagement crossover: (left|right) now engaged at the exit over (left|right)/);
      // Either side of the located p the engaged sets differ: the change lies inside the bracket.
      const below = labelAt(system, diagram, c.p - 1e-8);
      const aboveLabel = labelAt(system, diagram, c.p + 1e-8);
      expect(below.key).not.toBe(aboveLabel.key);
    }
  });
});

describe('recovery from all-tipped obeys the same rule, mirrored', () => {
  it('recovery bands of r + x - x^3 equal the tipping bands of -r + x - x^3 with mirrored states', () => {
    // x -> -x maps x' = r + x - x^3 + beta (y - x) onto x' = -r + x - x^3 + beta (y - x): all-tipped of
    // the first is all-base of the second, thresholds and progress map onto each other. So the
    // recovery bands of one must be the tipping bands of the other, edge for edge.
    const a = compileModelJson(pairDoc(R));
    const b = compileModelJson(pairDoc(-R));
    const da = symmetricPairDiagram(R);
    const db: Diagram = { ...da,
      branches: da.branches.map((br) => ({ ...br, points: br.points.map((q) => ({ ...q, x: q.x.map((v) => -v) })) })),
      bifurcations: da.bifurcations.map((sp) => ({ ...sp, x: sp.x.map((v) => -v) })) };
    const recovery = labelRegimes(a, da, { starts: ['all-tipped'] }).regimes;
    const tipping = labelRegimes(b, db).regimes;
    expect(recovery.map((x) => x.regime)).toEqual(tipping.map((x) => x.regime));
    expect(recovery.length).toBeGreaterThan(1);
    recovery.forEach((x, k) => {
      expect(x.start).toBe('all-tipped');
      expect(Math.abs(x.from - tipping[k].from)).toBeLessThan(1e-8);
      expect(Math.abs(x.to - tipping[k].to)).toBeLessThan(1e-8);
      expect(x.bounds.map((s) => s.split(':')[0])).toEqual(tipping[k].bounds.map((s) => s.split(':')[0]));
    });
  });
});
