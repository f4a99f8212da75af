import { describe, expect, it } from 'vitest';
import type { CompiledSystem } from '../../../src/lib/model/compiled-system';
import { compileModelJson } from '../../../src/lib/model/index';
import { analyseEquilibrium as describeEquilibrium, buildEscapeGraph, defaultRegimeOptions, equilibriaAt, labelAt, labelRegimes } from '../../../src/lib/regimes/index';
import { cubicNetwork, cubicRoots, symmetricPairDiagram, symmetricPairValues } from './fixtures';

/** A hand-written linear system x' = A x (no network). */
function linear(a: number[][]): CompiledSystem {
  const n = a.length;
  return {
    dimension: n, variables: a.map((_, i) => `x${i}`), parameter: 'p', sweep: { from: 0, to: 1 }, start: [],
    rates: (x, _p, out) => { for (let i = 0; i < n; i++) { let s = 0; for (let j = 0; j < n; j++) s += a[i][j] * x[j]; out[i] = s; } return out; },
    jacobian: (_x, _p, out) => { for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = a[i][j]; return out; },
    parameterDerivative: (_x, _p, out) => out.fill(0),
  };
}

const o = defaultRegimeOptions;

describe('buildEscapeGraph edge cases', () => {
  it('buildEscapeGraph reports a saddle whose unstable manifold reaches no stable state and leaves it out', () => {
    // x' = x, y' = -y: the origin is an index-1 saddle (eigenvalues 1, -1); its unstable manifold is
    // the x axis, along which |x| grows like e^t without bound (no stable state exists).
    const sys = linear([[1, 0], [0, -1]]);
    const saddle = describeEquilibrium(sys, Float64Array.of(0, 0), 0, 0, o.hyperbolicTolerance);
    expect(saddle.unstable).toBe(1);
    const g = buildEscapeGraph(sys, 0, [saddle], null, o);
    expect(g.graph.saddles).toEqual([]);
    expect(g.diagnostics[0]).toMatchObject({ code: 'manifold-unresolved', level: 'warning' });
    expect(g.diagnostics[0].message).toContain('left the box');
  });

  it('buildEscapeGraph gives no edges when there is no saddle', () => {
    // x' = -x, y' = -2y: one stable node, nothing to escape through.
    const sys = linear([[-1, 0], [0, -2]]);
    const node = describeEquilibrium(sys, Float64Array.of(0, 0), 0, 0, o.hyperbolicTolerance);
    const g = buildEscapeGraph(sys, 0, [node], null, o);
    expect(g.graph.states).toHaveLength(1);
    expect(g.graph.saddles).toEqual([]);
    expect(g.diagnostics).toEqual([]);
  });

  it('buildEscapeGraph leaves out non-hyperbolic equilibria with a warning', () => {
    // x' = 0 * x, y' = -y: eigenvalue 0 exactly.
    const sys = linear([[0, 0], [0, -1]]);
    const e = describeEquilibrium(sys, Float64Array.of(0, 0), 0, 0, o.hyperbolicTolerance);
    const g = buildEscapeGraph(sys, 0, [e], null, o);
    expect(g.graph.states).toEqual([]);
    expect(g.diagnostics[0].code).toBe('non-hyperbolic');
  });

  const R = 0.1;
  const system = compileModelJson(cubicNetwork({ r: R, nodes: ['left', 'right'], links: [{ from: 'left', to: 'right', twoWay: true }] }));

  it('buildEscapeGraph adds a stable state the diagram does not show, with a warning, and labels stay right', () => {
    const full = symmetricPairDiagram(R);
    // Drop every branch point near the partially tipped state (left tipped, right base) at small beta.
    const diagram = { ...full, branches: full.branches.map((b) => ({ ...b, points: b.points.filter((q) => !(q.x[0] > 0.5 && q.x[1] < -0.5)) })) };
    const result = labelRegimes(system, diagram);
    expect(result.diagnostics.some((d) => d.code === 'state-not-in-diagram')).toBe(true);
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    expect(result.escapeGraphs[0].states).toHaveLength(4);
  });

  it('labelRegimes finds the saddles a diagram leaves out, agrees with the full diagram, and a lone labelAt says where it cannot', () => {
    const full = symmetricPairDiagram(R);
    const { m } = cubicRoots(R);
    // Keep only the symmetric all-base and all-tipped lines: no saddle at all. The labeller's own
    // guesses (each node at its threshold, the others at base or tipped; label-at.ts) still reach the
    // asymmetric saddles for weak and moderate coupling, but not the symmetric saddle (m, m) of strong
    // coupling once it has moved far from those guesses. Inside one span between cuts (here the whole
    // range: the stripped diagram has no special points) labelRegimes continues the saddles it found
    // from one labelled point to the next (continueFromNeighbour); where two continued saddles merge
    // (the pitchfork) it refines afresh, and the near-critical guesses find (m, m) there.
    const diagram = { ...full, bifurcations: [], branches: full.branches.filter((b) => b.points.every((q) => q.x[0] === q.x[1] && q.x[0] !== m)) };
    expect(diagram.branches).toHaveLength(2);
    const stripped = labelRegimes(system, diagram, { escapeGraphs: false });
    const reference = labelRegimes(system, full, { escapeGraphs: false });
    expect(reference.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    // A label is a function of p alone (docs/regimes.md): wherever the stripped diagram labels, it
    // gives the reference label, with the same two edges to the bisection tolerance 1e-9.
    expect(stripped.regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    for (const k of [0, 1]) expect(Math.abs(stripped.regimes[k].to - reference.regimes[k].to)).toBeLessThan(1e-8);
    expect(stripped.diagnostics.map((d) => d.code)).toContain('state-not-in-diagram');
    expect(Math.abs(stripped.regimes[2].to - 1)).toBeLessThan(1e-12);
    // Lone labels in strong coupling have no neighbour to continue from: without edge tracking, where
    // the diagram's guesses miss (m, m) they say so rather than guess, and wherever they label they
    // agree with the full diagram (with edge tracking they find (m, m): edge-tracking.test.ts).
    const lone = Array.from({ length: 21 }, (_, k) => labelAt(system, diagram, 0.5 + 0.025 * k, { edgeTracking: false }));
    const missed = lone.filter((l) => l.regime === null);
    expect(missed.length).toBeGreaterThan(0);
    for (const l of missed) expect(l.reason).toBe('no way out of all-base found');
    for (const l of lone.filter((x) => x.regime !== null)) expect(l.regime).toBe(labelAt(system, full, l.p).regime);
  });

  it('buildEscapeGraph measures a slow passage that grows like (beta - beta_sn)^(-1/2) past the saddle-node', () => {
    // Past a saddle-node the flow through the ghost of the vanished equilibria is a bottleneck whose
    // passage time scales as (beta - beta_sn)^(-1/2) (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed.,
    // section 4.3: T = pi / sqrt(r) for x' = r + x^2). Quadrupling the distance should halve it.
    const { betaSaddleNode } = symmetricPairValues(R);
    const diagram = symmetricPairDiagram(R);
    const slow = (delta: number) => {
      const p = betaSaddleNode + delta;
      const eq = equilibriaAt(system, diagram, p, o);
      const { a, m, c } = cubicRoots(R);
      const roles = { base: a, threshold: m, tipped: c };
      const g = buildEscapeGraph(system, p, eq.equilibria, [roles, roles], o);
      // The cascading branch is the one into all tipped (state with both nodes tipped).
      const allTipped = g.graph.states.findIndex((s) => s.pattern.every((q) => q === 'tipped'));
      const times = g.saddles.map((s, k) => (g.graph.saddles[k].to === allTipped ? s.branches[1].slowTime : NaN));
      return times[0];
    };
    const t1 = slow(1e-5);
    const t4 = slow(4e-5);
    expect(t1).toBeGreaterThan(100);
    expect(t1 / t4).toBeGreaterThan(1.8);
    expect(t1 / t4).toBeLessThan(2.2);
  });

  it('labelRegimes turns a model function that throws into a diagnostic, not an exception', () => {
    const broken = { ...system, network: system.network, rates: () => { throw new Error('rate exploded'); } };
    const result = labelRegimes(broken as CompiledSystem, symmetricPairDiagram(R));
    expect(result.regimes).toEqual([]);
    expect(result.diagnostics.some((d) => d.code === 'regimes-failed' && d.message.includes('rate exploded'))).toBe(true);
  });

  it('labelRegimes refuses a diagram whose states do not fit the model', () => {
    const d = symmetricPairDiagram(R);
    const wrong = { ...d, branches: [{ ...d.branches[0], points: d.branches[0].points.map((q) => ({ ...q, x: [q.x[0]] })) }] };
    const result = labelRegimes(system, wrong);
    expect(result.regimes).toEqual([]);
    expect(result.diagnostics[0].code).toBe('regimes-diagram-mismatch');
  });

  it('labelRegimes stops at the integration cap with a warning and labels only the intervals before it', () => {
    // The cap is set to what the first interval (up to the saddle-node) needs plus one, so it runs out
    // in the second interval: the weak band is kept, the rest is left unlabelled. Every branch is
    // integrated here (orderedLimits off): with the order deciding, the second interval needs almost none.
    const { betaSaddleNode } = symmetricPairValues(R);
    const integrateAll = { orderedLimits: false };
    const first = labelRegimes(system, symmetricPairDiagram(R), { ...integrateAll, to: betaSaddleNode, escapeGraphs: false });
    expect(first.regimes.map((b) => b.regime)).toEqual(['weak']);
    const result = labelRegimes(system, symmetricPairDiagram(R), { ...integrateAll, maxIntegrations: first.work.integrations + 1 });
    expect(result.regimes.map((b) => b.regime)).toEqual(['weak']);
    expect(result.regimes[0].to).toBe(betaSaddleNode);
    expect(result.diagnostics.some((d) => d.code === 'regimes-budget')).toBe(true);
  });
});
