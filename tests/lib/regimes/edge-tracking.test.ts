import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { compileModelJson } from '../../../src/lib/model';
import { trackEdge, type EdgeTrackSettings } from '../../../src/lib/regimes/edge-tracking';
import { labelAt, labelRegimes, progressOf } from '../../../src/lib/regimes';
import { newtonAtFixedParameter } from '../../../src/lib/regimes/linear-algebra';
import type { Diagram } from '../../../src/lib/atlas/types';
import { cubicNetwork, cubicRoots, symmetricPairDiagram, symmetricPairValues } from './fixtures';

const R = 0.1;
const settings: EdgeTrackSettings = {
  flow: { relativeTolerance: 1e-8, absoluteTolerance: 1e-10, timeCap: 1e4, maxSteps: 200_000, stateBound: 1e6 },
  trackTime: 400, trackStep: 5, bisectTolerance: 1e-7, maxIntegrations: 5000,
  newtonTolerance: 1e-12, newtonMaxIterations: 40, hyperbolicTolerance: 1e-9,
};

const pair = compileModelJson(cubicNetwork({ r: R, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }] }));

/**
 * The pair's Jacobian written out by hand (independent of the compiled model):
 * F_i = r + x_i - x_i^3 + beta (x_j - x_i), so dF_i/dx_i = 1 - 3 x_i^2 - beta, dF_i/dx_j = beta.
 */
function pairSpectrum(x: readonly number[], beta: number): number[] {
  const j = Matrix.from1DArray(2, 2, [1 - 3 * x[0] ** 2 - beta, beta, beta, 1 - 3 * x[1] ** 2 - beta]);
  return new EigenvalueDecomposition(j).realEigenvalues;
}
const pairRates = (x: readonly number[], beta: number) => [R + x[0] - x[0] ** 3 + beta * (x[1] - x[0]), R + x[1] - x[1] ** 3 + beta * (x[0] - x[1])];

/** The bench's invented one-way ring with chords: node i feeds i + 1 and i + 5 (mod 20), r_i spread over [0.05, 0.15]. */
const N = 20;
const ring = compileModelJson({
  format: 'brinkmap/network-1', name: '20 nodes, one-way ring with chords (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
  nodes: Array.from({ length: N }, (_, i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + (0.1 * i) / (N - 1) } })),
  links: Array.from({ length: N }, (_, i) => [{ from: `n${i + 1}`, to: `n${((i + 1) % N) + 1}`, weight: 1 }, { from: `n${i + 1}`, to: `n${((i + 5) % N) + 1}`, weight: 1 }]).flat(),
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
});
const ringRoles = Array.from({ length: N }, (_, i) => { const c = cubicRoots(0.05 + (0.1 * i) / (N - 1)); return { base: c.a, threshold: c.m, tipped: c.c }; });

/**
 * Classical fourth-order Runge–Kutta with a fixed step (Hairer, Nørsett & Wanner, Solving ODEs I,
 * section II.1), written out here so that the fate of a point is checked without the engine's
 * integrator: the ring's rates by hand, x_i' = r_i + x_i - x_i^3 + beta (sum over in-links of x_j - x_i).
 */
function ringFate(x0: readonly number[], beta: number, lo: readonly number[], hi: readonly number[]): 'base' | 'tipped' | 'none' {
  const r = Array.from({ length: N }, (_, i) => 0.05 + (0.1 * i) / (N - 1));
  const rate = (x: number[]) => x.map((xi, i) => {
    const from = [(i - 1 + N) % N, (i - 5 + N) % N];
    return r[i] + xi - xi ** 3 + beta * from.reduce((s, j) => s + x[j] - xi, 0);
  });
  let x = x0.slice();
  const h = 0.02;
  for (let step = 0; step < 200_000; step++) {
    const k1 = rate(x);
    const k2 = rate(x.map((v, i) => v + 0.5 * h * k1[i]));
    const k3 = rate(x.map((v, i) => v + 0.5 * h * k2[i]));
    const k4 = rate(x.map((v, i) => v + h * k3[i]));
    x = x.map((v, i) => v + (h / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]));
    const dist = (y: readonly number[]) => Math.max(...y.map((v, i) => Math.abs(v - x[i])));
    if (dist(lo) < 1e-3) return 'base';
    if (dist(hi) < 1e-3) return 'tipped';
  }
  return 'none';
}

describe('trackEdge (edge tracking, Skufca, Yorke & Eckhardt 2006)', () => {
  it('settles on the symmetric saddle (m, m) of the two-way pair above its pitchfork', () => {
    // Above the pitchfork beta_pf = (1 - 3 m^2) / 2 (fixtures.symmetricPairValues) the only saddle
    // between all-base (a, a) and all-tipped (c, c) is (m, m), m the middle root of r + x - x^3
    // (Viete's formula, fixtures.cubicRoots); its eigenvalues are 1 - 3 m^2 > 0 along (1, 1) and
    // 1 - 3 m^2 - 2 beta < 0 across, so it is the edge state.
    const { a, m, c } = cubicRoots(R);
    const beta = 0.8;
    expect(beta).toBeGreaterThan(symmetricPairValues(R).betaPitchfork);
    const lo = newtonAtFixedParameter(pair, [a, a], beta, 1e-13, 40).x;
    const hi = newtonAtFixedParameter(pair, [c, c], beta, 1e-13, 40).x;
    // The far end off the diagonal (the diagonal is invariant: a track on it could not leave it).
    const track = trackEdge(pair, beta, [Array.from(lo), Array.from(hi)], 0, [c + 0.05, c - 0.03], [Array.from(lo), Array.from(hi)], settings);
    expect(track.kind).toBe('equilibrium');
    if (track.kind !== 'equilibrium') return;
    expect(Math.abs(track.equilibrium.x[0] - m)).toBeLessThan(1e-10);
    expect(Math.abs(track.equilibrium.x[1] - m)).toBeLessThan(1e-10);
    expect(track.equilibrium.unstable).toBe(1);
    expect(track.destination).toBe(1);
    const eig = pairSpectrum(track.equilibrium.x, beta).sort((u, v) => u - v);
    expect(Math.abs(eig[1] - (1 - 3 * m * m))).toBeLessThan(1e-9);
    expect(Math.abs(eig[0] - (1 - 3 * m * m - 2 * beta))).toBeLessThan(1e-9);
  });

  it('settles on a lopsided index-1 saddle of the pair below its pitchfork (checked by hand-written rates and ml-matrix)', () => {
    const { a, c } = cubicRoots(R);
    const beta = 0.1;
    expect(beta).toBeLessThan(symmetricPairValues(R).betaSaddleNode);
    const lo = newtonAtFixedParameter(pair, [a, a], beta, 1e-13, 40).x;
    const hi = newtonAtFixedParameter(pair, [c, c], beta, 1e-13, 40).x;
    // Below the saddle-node the partially tipped states (a', c') and (c', a') are stable too; every
    // stable state must be known, or a fate that ends there is not decided.
    const part = [[a, c], [c, a]].map((g) => Array.from(newtonAtFixedParameter(pair, g, beta, 1e-13, 40).x));
    const states = [Array.from(lo), Array.from(hi), ...part];
    expect(trackEdge(pair, beta, [Array.from(lo), Array.from(hi)], 0, [c + 0.05, c - 0.03], states, settings))
      .toMatchObject({ kind: 'unresolved', why: 'a point near the boundary reached no known stable state' });
    const track = trackEdge(pair, beta, states, 0, [c + 0.05, c - 0.03], states, settings);
    expect(track.kind).toBe('equilibrium');
    if (track.kind !== 'equilibrium') return;
    const x = track.equilibrium.x;
    expect(Math.max(...pairRates(x, beta).map(Math.abs))).toBeLessThan(1e-11);
    expect(Math.abs(x[0] - x[1])).toBeGreaterThan(0.1);
    const eig = pairSpectrum(x, beta);
    expect(eig.filter((l) => l > 0)).toHaveLength(1);
    // Its destination is not all-base: the far side leaves the start's basin.
    expect(track.destination).not.toBe(0);
  });

  it('keeps moving on the one-way 20-node ring at beta = 0.5: a state on the basin boundary that is no equilibrium', () => {
    const beta = 0.5;
    const lo = Array.from(newtonAtFixedParameter(ring, ringRoles.map((q) => q.base), beta, 1e-13, 60).x);
    const hi = Array.from(newtonAtFixedParameter(ring, ringRoles.map((q) => q.tipped), beta, 1e-13, 60).x);
    const track = trackEdge(ring, beta, [lo, hi], 0, hi.map((v, i) => v + 0.05 * Math.sin(i + 1) * (v - lo[i])), [lo, hi], settings);
    expect(track.kind).toBe('moving');
    if (track.kind !== 'moving') return;
    expect(track.destination).toBe(1);
    expect(track.samples.length).toBeGreaterThan(10);
    // It keeps moving: no snapshot is near an equilibrium (speed bounded away from zero).
    expect(track.minSpeed).toBeGreaterThan(1e-2);
    // On the boundary: pushed a little towards all-tipped a snapshot goes there, pushed back it
    // returns to all-base, each fate found by the hand-written RK4 integrator above.
    const x = track.samples[track.samples.length - 1];
    const push = (s: number) => x.map((v, i) => v + s * (hi[i] - lo[i]));
    expect(ringFate(push(1e-3), beta, lo, hi)).toBe('tipped');
    expect(ringFate(push(-1e-3), beta, lo, hi)).toBe('base');
    // Not all nodes are engaged at once in any snapshot (progress >= 0.5, docs/regimes.md).
    for (const y of track.samples) expect(progressOf(y, ringRoles).filter((s) => s >= 0.5).length).toBeLessThan(N);
  });

  it('says so when the far end returns to the start', () => {
    const { a, c } = cubicRoots(R);
    const lo = Array.from(newtonAtFixedParameter(pair, [a, a], 0.8, 1e-13, 40).x);
    const hi = Array.from(newtonAtFixedParameter(pair, [c, c], 0.8, 1e-13, 40).x);
    const track = trackEdge(pair, 0.8, [lo, hi], 0, [a + 0.01, a], [lo, hi], settings);
    expect(track).toMatchObject({ kind: 'unresolved', why: 'the far end of the segment returns to the start state' });
  });
});

describe('labels through edge states (docs/regimes.md, "Exits through a moving edge state")', () => {
  it('labels the one-way ring at beta = 0.5 intermediate through one moving exit to all-tipped, unlabelled without edge tracking', () => {
    // No diagram: the labeller's own guesses (uncoupled all-base, all-tipped, one node at its
    // threshold) give the equilibria. The rule: the one exit ends in all-tipped (not contained, so
    // not weak) and fewer than all 20 nodes are engaged in its snapshot (not strong): intermediate.
    const empty: Diagram = { branches: [], bifurcations: [], diagnostics: [], settings: { from: 0, to: 1 } } as unknown as Diagram;
    const off = labelAt(ring, empty, 0.5, { edgeTracking: false });
    expect(off.regime).toBeNull();
    expect(off.reason).toBe('no way out of all-base found');
    const on = labelAt(ring, empty, 0.5);
    expect(on.regime).toBe('intermediate');
    expect(on.exits).toHaveLength(1);
    expect(on.exits[0].via).toBe('moving-edge');
    expect(on.exits[0].tipping).toHaveLength(N);
    expect(on.exits[0].engaged.length).toBeGreaterThan(0);
    expect(on.exits[0].engaged.length).toBeLessThan(N);
    expect(on.reason).toContain('a state moving along the basin boundary');
  });

  it('finds the strong-coupling saddle (m, m) that a stripped diagram misses, and then agrees with the full diagram', () => {
    // The full analytic diagram of the pair labels weak, intermediate, strong (escape-graph.test.ts);
    // a diagram without the (m, m) branch leaves lone strong-coupling labels without their exit unless
    // edge tracking finds the saddle on the basin boundary.
    const full = symmetricPairDiagram(R);
    const { m } = cubicRoots(R);
    const stripped = { ...full, bifurcations: [], branches: full.branches.filter((b) => b.points.every((q) => q.x[0] === q.x[1] && q.x[0] !== m)) };
    const values = Array.from({ length: 9 }, (_, k) => 0.6 + 0.05 * k);
    const without = values.map((p) => labelAt(pair, stripped, p, { edgeTracking: false }));
    expect(without.some((l) => l.regime === null)).toBe(true);
    for (const p of values) {
      const l = labelAt(pair, stripped, p);
      expect(l.regime).toBe(labelAt(pair, full, p).regime);
      expect(l.regime).toBe('strong');
    }
  });

  it('leaves labels that rest on index-1 saddles alone: the pair with its full diagram labels the same with and without edge tracking', () => {
    const full = symmetricPairDiagram(R);
    const a = labelRegimes(pair, full, { escapeGraphs: false });
    const b = labelRegimes(pair, full, { escapeGraphs: false, edgeTracking: false });
    expect(a.regimes).toEqual(b.regimes);
  });
});
