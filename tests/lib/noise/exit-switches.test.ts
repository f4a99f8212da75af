import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas';
import { compileModelJson } from '../../../src/lib/model';
import { exitSwitches } from '../../../src/lib/noise/exit-switches';
import { cubicNetwork, cubicRoots } from '../regimes/fixtures';

/**
 * Two uncoupled cubic elements r + x - x^3 (coupling 0), swept over the element parameter r. Node a
 * follows the sweep, node b keeps r = 0.1 (or follows it too). Uncoupled, each exit moves one
 * coordinate, so its barrier is that element's own 1-D barrier (derived; gradient case):
 *   tipping T(r) = 2 (V_r(m) - V_r(a)), return R(r) = 2 (V_r(m) - V_r(c)), V_r(x) = -r x - x^2/2 + x^4/4,
 * roots a < m < c from cubicRoots (Viete). The element is odd under (x, r) -> (-x, -r), so R(r) = T(-r).
 * T decreases in r. Out of all-base the exits cost T(p) (a) and T(0.1) (b): switch at p = 0.1 with
 * barrier T(0.1). Out of all-tipped: R(p) = T(-p) and R(0.1) = T(-0.1): switch at p = 0.1 with
 * barrier T(-0.1). Out of the mixed states one exit is lowest on all of [0, 0.2] (T(p) < T(-0.1) and
 * T(0.1) < T(-p)), so there is no other switch.
 */
const T = (r: number) => {
  const { a, m } = cubicRoots(r);
  const V = (x: number) => -r * x - (x * x) / 2 + x ** 4 / 4;
  return 2 * (V(m) - V(a));
};

function uncoupled(nodeR?: Record<string, number>, from = 0, to = 0.2) {
  const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }],
    sweep: { parameter: 'r', from, to }, nodeR, couplingValue: 0 }));
  return { system, diagram: traceDiagram(system) };
}

describe('exitSwitches(system, diagram, from, to, weights)', () => {
  const { system, diagram } = uncoupled({ b: 0.1 });

  it('locates the switches of all-base and all-tipped at r = 0.1 to 1e-8 with the common barrier', () => {
    const res = exitSwitches(system, diagram, 0, 0.2, new Float64Array([1, 1]));
    expect(res.switches.map((s) => s.state).sort()).toEqual(['all-base', 'all-tipped']);
    for (const s of res.switches) {
      expect(Math.abs(s.p - 0.1)).toBeLessThanOrEqual(1e-8);
      expect(s.barrier).toBeCloseTo(s.state === 'all-base' ? T(0.1) : T(-0.1), 7);
    }
    const base = res.switches.find((s) => s.state === 'all-base')!;
    // Below 0.1 node b (r = 0.1 > p) tips more easily; above, node a does.
    expect(base.saddles).toEqual(['all-base -> b tipped', 'all-base -> a tipped']);
    expect(res.diagnostics).toEqual([]);
  });

  it('states: computes only the barriers out of the given states and finds the same switches there', () => {
    const every = exitSwitches(system, diagram, 0, 0.2, new Float64Array([1, 1]));
    const base = exitSwitches(system, diagram, 0, 0.2, new Float64Array([1, 1]), { states: ['all-base'] });
    expect(base.switches).toEqual(every.switches.filter((s) => s.state === 'all-base'));
    // The samples hold the all-base exits only (the mixed states and all-tipped were not computed).
    const statesSeen = new Set(base.samples.flatMap((q) => q.exits.map((e) => e.state)));
    expect([...statesSeen]).toEqual(['all-base']);
    expect(new Set(every.samples.flatMap((q) => q.exits.map((e) => e.state))).size).toBe(4);
  });

  it('samples every interval, reports the barriers it saw and finds a crossing that a sample hits exactly', () => {
    // Three samples put one exactly on the crossing at 0.1, where the two exits tie.
    const res = exitSwitches(system, diagram, 0, 0.2, new Float64Array([1, 1]), { samplesPerInterval: 3 });
    expect(res.samples.map((s) => s.p)).toEqual([0.05, 0.1, 0.15].map((p) => expect.closeTo(p, 12)));
    const first = res.samples[0].exits.find((e) => e.state === 'all-base' && e.saddle === 'all-base -> a tipped')!;
    expect(first.barrier).toBeCloseTo(T(0.05), 10);
    expect(res.switches.map((s) => s.state).sort()).toEqual(['all-base', 'all-tipped']);
    for (const s of res.switches) expect(Math.abs(s.p - 0.1)).toBeLessThanOrEqual(1e-8);
  });

  it('does not count barriers tied by symmetry as switches', () => {
    // Identical nodes: every exit of all-base (and of all-tipped) has a mirror image with the same barrier.
    const twin = uncoupled(undefined, 0.02, 0.2);
    const res = exitSwitches(twin.system, twin.diagram, 0.02, 0.2, new Float64Array([1, 1]));
    expect(res.switches).toEqual([]);
    const row = res.samples[0].exits.filter((e) => e.state === 'all-base').map((e) => e.barrier);
    expect(row).toHaveLength(2);
    expect(row[0]).toBeCloseTo(row[1], 12);
  });

  it('reports progress up to 1 and stops when cancelled', () => {
    const seen: number[] = [];
    exitSwitches(system, diagram, 0, 0.2, new Float64Array([1, 1]), { samplesPerInterval: 2, progress: (r) => seen.push(r.fraction) });
    expect(seen[seen.length - 1]).toBe(1);
    for (let k = 1; k < seen.length; k++) expect(seen[k]).toBeGreaterThanOrEqual(seen[k - 1]);
    const cancelled = exitSwitches(system, diagram, 0, 0.2, new Float64Array([1, 1]), { signal: { aborted: true } });
    expect(cancelled.cancelled).toBe(true);
    expect(cancelled.switches).toEqual([]);
  });

  it('reports a lowest exit that changes because its saddle vanishes at a fold as a diagnostic, not a switch', () => {
    // Symmetric pair r = 0.1 swept over beta: the partially tipped states and their saddles vanish in
    // the fold at beta_sn = 1/3 - (r/2)^(2/3) = 0.197 (fixtures.ts); past it all-base leaves only over
    // the synchronous saddles to all-tipped, which do not exist before it.
    const pairDoc = cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0.15, to: 0.25 } });
    const pair = compileModelJson(pairDoc);
    const res = exitSwitches(pair, traceDiagram(pair), 0.15, 0.25, new Float64Array([1, 1]), { samplesPerInterval: 2 });
    expect(res.switches).toEqual([]);
    const vanished = res.diagnostics.filter((d) => d.code === 'exit-saddle-vanished');
    expect(vanished.length).toBeGreaterThan(0);
    for (const d of vanished) expect(d.p!).toBeGreaterThan(1 / 3 - Math.pow(0.05, 2 / 3));
  });
});
