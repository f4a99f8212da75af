import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model';
import type { CompiledSystem } from '../../../src/lib/model/compiled-system';
import { barriersAt } from '../../../src/lib/noise/barriers';
import { noiseGraphAt } from '../../../src/lib/noise/graph-at';
import { NoiseSettingError } from '../../../src/lib/noise/noise-spec';
import { predictEscapes } from '../../../src/lib/noise/prediction';
import type { Barrier, NoiseGraph } from '../../../src/lib/noise/types';
import { cubicNetwork, cubicRoots, oneWayPairDiagram, symmetricPairDiagram, uncoupledDiagram } from '../regimes/fixtures';

/**
 * Barriers of a gradient cubic network from its closed-form potential (hand-derived): F = -grad V with
 *   V(x) = sum_i (x_i^4 / 4 - x_i^2 / 2 - r x_i) + beta / 2 sum_{two-way links} (x_i - x_j)^2,
 * barrier = 2 (V(saddle) - V(state)) (docs/noise.md), for both ends of every saddle.
 */
function closedFormBarriers(graph: NoiseGraph, r: number, beta: number, links: [number, number][]): Barrier[] {
  const V = (x: readonly number[]) => x.reduce((a, v) => a + v ** 4 / 4 - v * v / 2 - r * v, 0)
    + links.reduce((a, [i, j]) => a + (beta / 2) * (x[i] - x[j]) ** 2, 0);
  return graph.graph.saddles.flatMap((e, s) => [[e.from, e.to], [e.to, e.from]].map(([from, to]) => ({
    p: graph.p, from, saddle: s, to, barrier: 2 * (V(e.x) - V(graph.graph.states[from].x)),
    method: 'potential' as const, path: [], converged: true, detail: {},
  })));
}

function graphOf(system: CompiledSystem, diagram: Parameters<typeof noiseGraphAt>[1], p: number): NoiseGraph {
  const g = noiseGraphAt(system, diagram, p);
  if (!g.ok) throw new Error(g.reason);
  return g;
}

const baseIndex = (g: NoiseGraph) => g.graph.states.findIndex((s) => s.pattern.every((x) => x === 'base'));
const uniform = (n: number, level: number) => ({ level, weights: new Float64Array(n).fill(1) });

describe('predictEscapes(system, graph, barriers, spec, options)', () => {
  const single = compileModelJson(cubicNetwork({ r: 0, nodes: ['n0'], links: [], sweep: { parameter: 'r', from: -0.2, to: 0.2 } }));
  const singleGraph = graphOf(single, uncoupledDiagram(1, -0.2, 0.2), 0);

  it("gives Kramers' mean escape time pi sqrt 2 exp(1 / (2 sigma^2)) for the double well x' = x - x^3", () => {
    // Kramers 1940; Berglund 2013 (review of Kramers' law): E tau = pi sqrt 2 exp(1 / (2 sigma^2)) for dx = (x - x^3) dt + sigma dW.
    const barriers = closedFormBarriers(singleGraph, 0, 0, []);
    expect(barriers.map((b) => b.barrier)).toEqual([0.5, 0.5]);
    for (const sigma of [0.2, 0.35]) {
      const pr = predictEscapes(single, singleGraph, barriers, uniform(1, sigma), { start: baseIndex(singleGraph), gradient: true });
      expect(pr.prefactor).toBe('eyring-kramers');
      expect(pr.meanFirstEscape / (Math.PI * Math.SQRT2 * Math.exp(1 / (2 * sigma * sigma))) - 1).toBeCloseTo(0, 12);
      expect(pr.sequences).toEqual([{ order: ['n0'], probability: expect.closeTo(1, 14) }]);
      expect(pr.meanLastEscape).toBe(pr.meanFirstEscape);
    }
  });

  it('warns when the noise is not weak against the barrier', () => {
    // barrier / sigma^2 = 0.5 / 0.25 = 2 < 3.
    const pr = predictEscapes(single, singleGraph, closedFormBarriers(singleGraph, 0, 0, []), uniform(1, 0.5), { start: 0, gradient: true });
    expect(pr.diagnostics.map((d) => d.code)).toContain('prediction-noise-not-weak');
  });

  describe('two uncoupled identical nodes (r = 0.1)', () => {
    const r = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['n0', 'n1'], links: [], sweep: { parameter: 'r', from: -0.2, to: 0.2 } }));
    const graph = graphOf(system, uncoupledDiagram(2, -0.2, 0.2), r);
    const sigma = 0.3;
    const pr = predictEscapes(system, graph, closedFormBarriers(graph, r, 0, []), uniform(2, sigma), { start: baseIndex(graph), gradient: true });
    // One node: f(x) = r + x - x^3, roots a < m < c (Viete, cubicRoots), f' = 1 - 3x^2,
    // V(x) = x^4/4 - x^2/2 - r x; up rate k_up = sqrt(f'(m) |f'(a)|) / (2 pi) exp(-2 (V(m) - V(a)) / sigma^2) and
    // down rate k_down likewise from c (Eyring–Kramers, Berglund 2013; in 2-D the uncoupled determinants factor).
    const { a, m, c } = cubicRoots(r);
    const V = (x: number) => x ** 4 / 4 - x * x / 2 - r * x;
    const d = (x: number) => 1 - 3 * x * x;
    const kUp = (Math.sqrt(d(m) * Math.abs(d(a))) / (2 * Math.PI)) * Math.exp((-2 * (V(m) - V(a))) / sigma ** 2);
    const kDown = (Math.sqrt(d(m) * Math.abs(d(c))) / (2 * Math.PI)) * Math.exp((-2 * (V(m) - V(c))) / sigma ** 2);
    const tau = 1 / kUp;

    it('gives both orders probability 1/2 (exchangeability)', () => {
      expect(pr.sequences.map((s) => s.order.join(' ')).sort()).toEqual(['n0 n1', 'n1 n0']);
      for (const s of pr.sequences) expect(s.probability).toBeCloseTo(0.5, 12);
    });

    it('gives mean first escape tau / 2 and mean last escape 3 tau / 2', () => {
      // The first escape is the minimum of two independent Exp(1/tau) first-passage times: mean tau/2; the last is
      // their maximum: E max = E T1 + E T2 - E min = 2 tau - tau/2 = 3 tau / 2 (returns of the first node do not
      // change the other's first passage, the nodes being independent).
      expect(pr.meanFirstEscape / (tau / 2) - 1).toBeCloseTo(0, 10);
      expect(pr.meanLastEscape / (1.5 * tau) - 1).toBeCloseTo(0, 10);
    });

    it('gives the return probability k_down / (k_down + k_up)', () => {
      // After the first escape, the tipped node falls back (rate k_down) or the other escapes (k_up): a race of two exponentials.
      expect(pr.returnProbability).toBeCloseTo(kDown / (kDown + kUp), 10);
    });

    it('records the crossing node of every transition and the Eyring–Kramers prefactor', () => {
      for (const rate of pr.rates) {
        const from = graph.graph.states[rate.from].pattern;
        const to = graph.graph.states[rate.to].pattern;
        const newly = [0, 1].filter((i) => from[i] === 'base' && to[i] === 'tipped').map((i) => [`n${i}`]);
        expect(rate.crossings).toEqual(newly);
        expect(rate.prefactor).not.toBeNull();
      }
    });
  });

  it('gives three uncoupled identical nodes six orders of 1/6 and k-th escape means tau (1/3 + ... + 1/(4 - k))', () => {
    // Exchangeability, and the order statistics of three independent Exp(1/tau) first passages (Renyi's
    // representation: the gaps are Exp with rates 3/tau, 2/tau, 1/tau), so E T_k = tau sum_{j<k} 1/(3 - j).
    const r = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['n0', 'n1', 'n2'], links: [], sweep: { parameter: 'r', from: -0.2, to: 0.2 } }));
    const graph = graphOf(system, uncoupledDiagram(3, -0.2, 0.2), r);
    const sigma = 0.3;
    const pr = predictEscapes(system, graph, closedFormBarriers(graph, r, 0, []), uniform(3, sigma), { start: baseIndex(graph), gradient: true });
    expect(pr.sequences).toHaveLength(6);
    for (const s of pr.sequences) expect(s.probability).toBeCloseTo(1 / 6, 12);
    const { a, m } = cubicRoots(r);
    const V = (x: number) => x ** 4 / 4 - x * x / 2 - r * x;
    const tau = (2 * Math.PI) / Math.sqrt((1 - 3 * m * m) * Math.abs(1 - 3 * a * a)) * Math.exp((2 * (V(m) - V(a))) / sigma ** 2);
    const expected = [1 / 3, 1 / 3 + 1 / 2, 1 / 3 + 1 / 2 + 1].map((h) => h * tau);
    pr.meanKthEscape.forEach((t, k) => expect(t / expected[k] - 1).toBeCloseTo(0, 10));
  });

  describe('symmetric diffusive pair (gradient, r = 0.1)', () => {
    const r = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 1 } }));
    const diagram = symmetricPairDiagram(r, 0, 1);

    it('orders a cascade over an asymmetric saddle: the node at its threshold first, then the other', () => {
      // beta = 0.3 lies between the saddle-node (0.197) and the pitchfork (0.485) of symmetricPairValues: only
      // all-base and all-tipped are stable, joined by the two mirror saddles (one per tipping node).
      const graph = graphOf(system, diagram, 0.3);
      expect(graph.graph.states).toHaveLength(2);
      const pr = predictEscapes(system, graph, closedFormBarriers(graph, r, 0.3, [[0, 1]]), uniform(2, 0.25), { start: baseIndex(graph), gradient: true });
      for (const rate of pr.rates.filter((x) => x.from === baseIndex(graph))) {
        const lead = graph.graph.saddles[rate.saddle].x[0] > graph.graph.saddles[rate.saddle].x[1] ? 'a' : 'b';
        expect(rate.crossings).toEqual([[lead], [lead === 'a' ? 'b' : 'a']]);
      }
      // Mirror symmetry: both orders 1/2.
      for (const s of pr.sequences) expect(s.probability).toBeCloseTo(0.5, 10);
      expect(pr.meanFirstEscape).toBe(pr.meanLastEscape);
    });

    it('splits the synchronous escape over the symmetric saddle 1/2 : 1/2', () => {
      // beta = 0.55 > pitchfork: the only saddle is the symmetric (m, m), whose unstable manifold is the diagonal:
      // both nodes cross together, a tie.
      const graph = graphOf(system, diagram, 0.55);
      const pr = predictEscapes(system, graph, closedFormBarriers(graph, r, 0.55, [[0, 1]]), uniform(2, 0.25), { start: baseIndex(graph), gradient: true });
      const up = pr.rates.find((x) => x.from === baseIndex(graph))!;
      expect(up.crossings.map((g) => g.slice().sort())).toEqual([['a', 'b']]);
      expect(pr.sequences.map((s) => s.probability)).toEqual([expect.closeTo(0.5, 14), expect.closeTo(0.5, 14)]);
    });

    it('gives the same prediction from barriersAt as from the closed-form potential (four states at beta = 0.1)', () => {
      // Interface check with the barriers engine: detects the gradient, pairs (from, saddle, to) the same way; its
      // barriers agree with 2 dV of the closed-form potential to about 1e-7, so rates agree to ~1e-5 at sigma = 0.25.
      const graph = graphOf(system, diagram, 0.1);
      expect(graph.graph.states).toHaveLength(4);
      const computed = barriersAt(system, graph, new Float64Array([1, 1]));
      expect(computed.gradient).toBe(true);
      const spec = uniform(2, 0.25);
      const start = baseIndex(graph);
      const fromEngine = predictEscapes(system, graph, computed.barriers, spec, { start, gradient: computed.gradient });
      const fromClosed = predictEscapes(system, graph, closedFormBarriers(graph, r, 0.1, [[0, 1]]), spec, { start, gradient: true });
      expect(fromEngine.prefactor).toBe('eyring-kramers');
      const key = (x: { from: number; saddle: number; to: number }) => `${x.from}:${x.saddle}:${x.to}`;
      const closedRates = new Map(fromClosed.rates.map((x) => [key(x), x]));
      expect(fromEngine.rates).toHaveLength(fromClosed.rates.length);
      for (const x of fromEngine.rates) {
        const y = closedRates.get(key(x))!;
        expect(x.rate / y.rate - 1).toBeCloseTo(0, 4);
        expect(x.crossings).toEqual(y.crossings);
      }
      expect(fromEngine.meanFirstEscape / fromClosed.meanFirstEscape - 1).toBeCloseTo(0, 4);
      for (const s of fromEngine.sequences) expect(s.probability).toBeCloseTo(0.5, 6);
    });
  });

  it('falls back to the leading exponential order for a non-gradient (one-way) pair and says so', () => {
    const r = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['up', 'down'], links: [{ from: 'up', to: 'down' }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
    const graph = graphOf(system, oneWayPairDiagram(r, 0, 0.6).diagram, 0.1);
    // Hand-set barriers (not physical values): the check is the rate formula k = exp(-barrier / sigma^2) with C = 1.
    const barriers: Barrier[] = graph.graph.saddles.flatMap((e, s) => [[e.from, e.to], [e.to, e.from]].map(([from, to], k) => ({
      p: graph.p, from, saddle: s, to, barrier: 0.1 + 0.05 * s + 0.2 * k, method: 'minimum-action' as const, path: [], converged: true, detail: {},
    })));
    const sigma = 0.2;
    const pr = predictEscapes(system, graph, barriers, uniform(2, sigma), { start: baseIndex(graph), gradient: false });
    expect(pr.prefactor).toBe('exponential-only');
    expect(pr.diagnostics.map((d) => d.code)).toContain('prediction-exponential-only');
    for (const rate of pr.rates) {
      expect(rate.prefactor).toBeNull();
      expect(rate.rate).toBeCloseTo(Math.exp(-rate.barrier / sigma ** 2), 14);
    }
    const total = pr.sequences.reduce((s, x) => s + x.probability, 0);
    expect(total + pr.incomplete).toBeCloseTo(1, 12);
  });

  it('takes the Bouchet–Reygner prefactor for the non-gradient one-way pair, and the upstream escape has the 1-D Kramers prefactor', () => {
    // x_up' = f(x_up), x_down' = f(x_down) + beta (x_up - x_down), f(x) = r + x - x^3: the upstream
    // node does not feel the other, so its own escape from base over its middle root is the 1-D
    // double well's, whatever the downstream node does. The escape from all-base over the saddle with
    // `up` at its middle root therefore has the 1-D Eyring–Kramers prefactor
    //   C = f'(m) / (2 pi) sqrt(|f'(a)| / f'(m)) = sqrt(|f'(a)| f'(m)) / (2 pi)
    // (Berglund 2013, the 1-D form; a, m the base and middle roots, cubicRoots), which the
    // two-dimensional Bouchet–Reygner formula must reproduce (a non-trivial case: V is not separable).
    const r = 0.1;
    const beta = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['up', 'down'], links: [{ from: 'up', to: 'down' }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
    const graph = graphOf(system, oneWayPairDiagram(r, 0, 0.6).diagram, beta);
    const start = baseIndex(graph);
    const iso = new Float64Array([1, 1]);
    const found = barriersAt(system, graph, iso, { pairs: (from) => from === start });
    expect(found.gradient).toBe(false);
    const pr = predictEscapes(system, graph, found.barriers, uniform(2, 0.2), { start, gradient: false });
    expect(pr.prefactor).toBe('bouchet-reygner');
    const { a, m } = cubicRoots(r);
    const fp = (x: number) => 1 - 3 * x * x;
    const expected = Math.sqrt(Math.abs(fp(a)) * fp(m)) / (2 * Math.PI);
    const upFirst = pr.rates.find((x) => x.from === start && Math.abs(graph.graph.saddles[x.saddle].x[0] - m) < 1e-6);
    expect(upFirst).toBeTruthy();
    // Measured 9.3e-4 with gmam's default 200 segments (bouchet-reygner.ts: the error is the path's).
    expect(Math.abs(upFirst!.prefactor! / expected - 1)).toBeLessThan(2e-3);
  });

  it('reports progress up to 1 and returns a partial answer when cancelled', () => {
    const barriers = closedFormBarriers(singleGraph, 0, 0, []);
    const fractions: number[] = [];
    predictEscapes(single, singleGraph, barriers, uniform(1, 0.2), { start: 0, gradient: true, progress: (x) => fractions.push(x.fraction) });
    expect(fractions.at(-1)).toBe(1);
    expect(fractions.every((f, k) => k === 0 || f >= fractions[k - 1])).toBe(true);
    const cancelled = predictEscapes(single, singleGraph, barriers, uniform(1, 0.2), { start: 0, gradient: true, signal: { aborted: true } });
    expect(cancelled.sequences).toEqual([]);
    expect(cancelled.incomplete).toBe(1);
    expect(cancelled.diagnostics.map((d) => d.code)).toContain('prediction-cancelled');
  });

  it('escapes downwards from all-tipped, past (threshold + base) / 2 by default, with the mirrored Kramers time', () => {
    // r = 0: the double well is symmetric, so recovery from +1 has the same time pi sqrt 2 exp(1/(2 sigma^2)) (Kramers 1940).
    const barriers = closedFormBarriers(singleGraph, 0, 0, []);
    const tipped = singleGraph.graph.states.findIndex((s) => s.pattern[0] === 'tipped');
    const pr = predictEscapes(single, singleGraph, barriers, uniform(1, 0.2), { start: tipped, gradient: true });
    expect(pr.thresholds).toEqual([expect.closeTo(-0.5, 9)]);
    expect(pr.sequences).toEqual([{ order: ['n0'], probability: expect.closeTo(1, 14) }]);
    expect(pr.meanFirstEscape / (Math.PI * Math.SQRT2 * Math.exp(1 / (2 * 0.04))) - 1).toBeCloseTo(0, 12);
  });

  it('rejects a bad level, start or thresholds naming the field', () => {
    const barriers = closedFormBarriers(singleGraph, 0, 0, []);
    const call = (level: number, start: number, thresholds?: Float64Array) => () =>
      predictEscapes(single, singleGraph, barriers, uniform(1, level), { start, gradient: true, thresholds });
    expect(call(0, 0)).toThrow(NoiseSettingError);
    expect(call(Number.NaN, 0)).toThrow(/noise/);
    expect(call(0.2, 3)).toThrow(/start/);
    expect(call(0.2, 0, new Float64Array(2))).toThrow(/thresholds/);
  });
});
