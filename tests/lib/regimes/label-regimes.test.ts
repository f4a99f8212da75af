import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { labelRegimes } from '../../../src/lib/regimes/index';
import { cubicNetwork, cubicRoots, oneWayPairDiagram, symmetricPairDiagram, symmetricPairValues, uncoupledDiagram } from './fixtures';

const R = 0.1;

describe('labelRegimes on two identical cubic elements with symmetric diffusive coupling (analytic branches)', () => {
  const system = compileModelJson(cubicNetwork({ r: R, nodes: ['left', 'right'], links: [{ from: 'left', to: 'right', twoWay: true }] }));
  const diagram = symmetricPairDiagram(R);
  const { betaSaddleNode, betaPitchfork } = symmetricPairValues(R);
  const result = labelRegimes(system, diagram);

  it('labelRegimes gives weak, intermediate, strong in that order', () => {
    expect(result.diagnostics).toEqual([]);
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
  });

  it('labelRegimes ends the weak band at the saddle-node and starts the strong one at the pitchfork', () => {
    // beta_sn = 1/3 - (r/2)^(2/3) and beta_pf = (1 - 3 m^2)/2, derived in fixtures.ts (symmetricPairValues).
    const [weak, mid, strong] = result.regimes;
    expect(weak.from).toBe(0);
    expect(Math.abs(weak.to - betaSaddleNode)).toBeLessThan(1e-8);
    expect(weak.bounds).toEqual(['sweep-bound', 'saddle-node']);
    expect(mid.from).toBe(weak.to);
    expect(Math.abs(strong.from - betaPitchfork)).toBeLessThan(1e-8);
    expect(strong.bounds).toEqual(['pitchfork', 'sweep-bound']);
    expect(strong.to).toBe(1);
  });

  it('labelRegimes explains each band naming the nodes', () => {
    const [weak, mid, strong] = result.regimes;
    expect(weak.reason).toContain('stable partially tipped states reached from all-base');
    expect(weak.reason).toContain('left tipped, right base');
    expect(weak.reason).toContain('right tipped, left base');
    expect(mid.reason).toMatch(/left tipping first commits right, reaching all tipped/);
    expect(strong.reason).toMatch(/left and right tip together/);
  });

  it('labelRegimes builds one escape graph per interval with the expected stable patterns', () => {
    // Weak interval: the four patterns are stable (uncoupled limit plus continuity up to beta_sn);
    // beyond the saddle-node only the symmetric all-base and all-tipped states remain.
    const pats = result.escapeGraphs.map((g) => g.states.map((s) => s.pattern.join('/')).sort());
    expect(pats[0]).toEqual(['base/base', 'base/tipped', 'tipped/base', 'tipped/tipped']);
    expect(pats[1]).toEqual(['base/base', 'tipped/tipped']);
    expect(pats[2]).toEqual(['base/base', 'tipped/tipped']);
    // Strong interval: the one saddle is the symmetric middle state (m, m) with eigenvector (1, 1)/sqrt 2
    // (see the Jacobian in fixtures.ts): direction components equal.
    const { m } = cubicRoots(R);
    const strongGraph = result.escapeGraphs[2];
    expect(strongGraph.saddles).toHaveLength(1);
    const s = strongGraph.saddles[0];
    expect(s.kind).toBe('synchronous');
    expect(Math.abs(s.x[0] - m)).toBeLessThan(1e-10);
    expect(Math.abs(s.direction![0] - Math.SQRT1_2)).toBeLessThan(1e-8);
    // Unstable eigenvalue along (1, 1) is f'(m) = 1 - 3 m^2 (derived in fixtures.ts).
    expect(Math.abs(s.eigenvalue! - (1 - 3 * m * m))).toBeLessThan(1e-9);
  });

  it('labelRegimes labels recovery from all-tipped when asked, with start set', () => {
    const both = labelRegimes(system, diagram, { starts: ['all-base', 'all-tipped'] });
    const rec = both.regimes.filter((b) => b.start === 'all-tipped');
    expect(rec.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    expect(rec[0].reason).toContain('partially recovered');
    expect(both.regimes.filter((b) => b.start === undefined)).toHaveLength(3);
  });
});

describe('labelRegimes on one-way coupling upstream -> downstream (analytic branches)', () => {
  // x1' = r + x1 - x1^3, x2' = (r + beta x1) + (1 - beta) x2 - x2^3. The downstream cubic
  // g(y) = (r + beta x1) + (1 - beta) y - y^3 has g'(y) = 0 at y = ±q, q = sqrt((1 - beta)/3), where
  // g(±q) = r + beta x1 ± 2 q^3. Its lower (base) root vanishes when the local minimum g(-q) reaches 0:
  //   r + beta x1 = 2 ((1 - beta)/3)^(3/2);
  // its upper (tipped) root vanishes when the local maximum g(q) reaches 0: -(r + beta x1) = 2 q^3.
  // (upstream tipped, downstream base), x1 = c:  r + beta c = 2 ((1 - beta)/3)^(3/2)      -> beta_1
  // (upstream base, downstream tipped), x1 = a:  beta |a| - r = 2 ((1 - beta)/3)^(3/2)    -> beta_2
  // The left sides increase and the right side decreases in beta, so each has one root in (0, 1),
  // found here by bisection; beta_1 < beta_2 because r + beta c > beta |a| - r.
  const { a, c } = cubicRoots(R);
  const bisect = (g: (b: number) => number) => {
    let lo = 0; let hi = 1;
    for (let i = 0; i < 200; i++) { const mid = 0.5 * (lo + hi); if (g(lo) * g(mid) <= 0) hi = mid; else lo = mid; }
    return 0.5 * (lo + hi);
  };
  const beta1 = bisect((b) => R + b * c - 2 * ((1 - b) / 3) ** 1.5);
  const beta2 = bisect((b) => b * Math.abs(a) - R - 2 * ((1 - b) / 3) ** 1.5);
  const system = compileModelJson(cubicNetwork({ r: R, nodes: ['upstream', 'downstream'], links: [{ from: 'upstream', to: 'downstream' }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
  const { diagram, folds } = oneWayPairDiagram(R, 0, 0.6);
  const result = labelRegimes(system, diagram);

  it('the fixture folds agree with the fold equations (two routes to the same values)', () => {
    expect(folds).toHaveLength(2);
    expect(Math.abs(folds[0].p - beta1)).toBeLessThan(1e-9);
    expect(Math.abs(folds[1].p - beta2)).toBeLessThan(1e-9);
  });

  it('labelRegimes ends the weak band at the first saddle-node, after which the band is intermediate', () => {
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate']);
    expect(Math.abs(result.regimes[0].to - beta1)).toBeLessThan(1e-8);
    expect(result.regimes[0].bounds).toEqual(['sweep-bound', 'saddle-node']);
  });

  it('labelRegimes reports that tipping upstream commits downstream while downstream alone is contained', () => {
    const mid = result.regimes[1].reason;
    expect(mid).toContain('upstream tipping first commits downstream, reaching all tipped');
    expect(mid).toContain('still contained: downstream tipped, upstream base');
    const g = result.escapeGraphs.find((e) => e.p > beta1 && e.p < beta2)!;
    const kinds = g.saddles.filter((s) => s.kind).map((s) => s.kind).sort();
    expect(kinds).toEqual(['cascading', 'contained']);
  });
});

describe('labelRegimes on an uncoupled network swept over the element parameter', () => {
  // Coupling fixed at 0: every combination of the element roots is an equilibrium and each node is
  // bistable for |r| < 2/(3 sqrt 3) = 0.3849 (cusp form, Strogatz ch. 3), so over [-0.2, 0.2] every
  // tipping stays contained.
  const system = compileModelJson(cubicNetwork({ r: 0, nodes: ['n0', 'n1', 'n2'], links: [{ from: 'n0', to: 'n1', twoWay: true }, { from: 'n1', to: 'n2', twoWay: true }], couplingValue: 0, sweep: { parameter: 'r', from: -0.2, to: 0.2 } }));
  const result = labelRegimes(system, uncoupledDiagram(3, -0.2, 0.2));

  it('labelRegimes gives one weak band over the whole range', () => {
    expect(result.diagnostics).toEqual([]);
    expect(result.regimes).toHaveLength(1);
    expect(result.regimes[0]).toMatchObject({ from: -0.2, to: 0.2, regime: 'weak', bounds: ['sweep-bound', 'sweep-bound'] });
  });

  it('labelRegimes finds every one of the 2^3 patterns as a stable state and every tipping contained', () => {
    const g = result.escapeGraphs[0];
    const pats = new Set(g.states.map((s) => s.pattern.join('/')));
    expect(pats.size).toBe(8);
    // Index-1 saddles: one node at its threshold root m, the others at a or c: 3 * 2^2 = 12.
    expect(g.saddles).toHaveLength(12);
    const out = g.saddles.filter((s) => s.kind !== undefined);
    expect(out).toHaveLength(3);
    expect(out.every((s) => s.kind === 'contained')).toBe(true);
  });
});

describe('labelRegimes on elements that are not bistable', () => {
  it('labelRegimes reports regimes undefined for x\' = r - x and gives no labels', () => {
    const doc = { ...cubicNetwork({ r: 0, nodes: ['only', 'other'], links: [{ from: 'only', to: 'other', twoWay: true }] }),
      element: { variable: 'x', rate: 'r - x', parameters: { r: 0 } } };
    const system = compileModelJson(doc);
    const diagram = { parameter: 'beta', variables: ['only', 'other'], bifurcations: [], diagnostics: [], settings: { from: 0, to: 1 }, engineVersion: 'test',
      branches: [{ id: 'b1', origin: { kind: 'start' as const }, ends: ['sweep-bound', 'sweep-bound'] as const, points: [0, 0.5, 1].map((p) => ({ p, x: [0, 0], unstable: 0 })) }] };
    const result = labelRegimes(system, diagram as never);
    expect(result.regimes).toEqual([]);
    expect(result.escapeGraphs).toEqual([]);
    expect(result.diagnostics[0]).toMatchObject({ level: 'error', code: 'regimes-undefined' });
    expect(result.diagnostics[0].message).toContain("node 'only'");
    expect(result.diagnostics[0].message).toContain('1 equilibrium');
  });

  it('labelRegimes reports regimes undefined for a model that is not a network', () => {
    const system = compileModelJson({ format: 'brinkmap/ode-1', name: 'not a network', variables: ['x'], parameters: { r: 0 }, rates: { x: 'r + x - x^3' }, sweep: { parameter: 'r', from: -0.1, to: 0.1 } });
    const result = labelRegimes(system, uncoupledDiagram(1, -0.1, 0.1));
    expect(result.regimes).toEqual([]);
    expect(result.diagnostics[0].code).toBe('regimes-undefined');
  });
});
