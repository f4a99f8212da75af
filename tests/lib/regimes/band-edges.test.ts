import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compileModelJson } from '../../../src/lib/model/index';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { labelAt, labelRegimes, type RegimeResult } from '../../../src/lib/regimes/index';
import type { RegimeBand } from '../../../src/lib/regimes/index';

/** Band edges strictly inside (lo, hi), with the labels on both sides. */
function edgesInside(bands: readonly RegimeBand[], lo: number, hi: number, margin: number) {
  const out: { p: number; below: string | null; above: string | null }[] = [];
  const cuts = [...new Set(bands.flatMap((b) => [b.from, b.to]))].sort((a, b) => a - b);
  for (const p of cuts) {
    if (p <= lo + margin || p >= hi - margin) continue;
    const below = bands.find((b) => b.to === p)?.regime ?? null;
    const above = bands.find((b) => b.from === p)?.regime ?? null;
    if (below !== above) out.push({ p, below, above });
  }
  return out;
}

/** Every edge of one inside the common range is an edge of the other, to tol, with the same labels. */
function expectSameEdges(a: RegimeResult, b: RegimeResult, lo: number, hi: number, tol: number) {
  const ea = edgesInside(a.regimes, lo, hi, 1e-6);
  const eb = edgesInside(b.regimes, lo, hi, 1e-6);
  expect(ea.map((e) => `${e.below}>${e.above}`)).toEqual(eb.map((e) => `${e.below}>${e.above}`));
  ea.forEach((e, k) => expect(Math.abs(e.p - eb[k].p)).toBeLessThan(tol));
}

// Same document as the first variant of seeds/02_demo_models.ts ("Fenn lakes: downstream flow only",
// invented): copied because the seed module imports the database layer.
const demoChain = (from: number, to: number) => ({
  format: 'brinkmap/network-1', name: 'Fenn lakes, downstream flow only',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'middle', parameters: { a: 0.06 } }, { id: 'lower', parameters: { a: 0.05 } }],
  links: [{ from: 'upper', to: 'middle', weight: 1 }, { from: 'middle', to: 'lower', weight: 1 }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from, to },
});

describe('band edges do not depend on the sweep range', () => {
  it('the downstream demo chain has the same bands over [0, 1.2], [0, 1.5] and [0, 4] inside [0, 1.2]', { timeout: 600_000 }, () => {
    // docs/regimes.md (before issue 10) recorded a strong band from 0.9577 over [0, 4] and none over
    // [0, 1.5]; a label that is a function of p alone must give one answer.
    const results = [1.2, 1.5, 4].map((to) => {
      const system = compileModelJson(demoChain(0, to));
      return labelRegimes(system, traceDiagram(system), { escapeGraphs: false });
    });
    for (const r of results) expect(r.regimes.length).toBeGreaterThan(0);
    expectSameEdges(results[0], results[1], 0, 1.2, 1e-8);
    expectSameEdges(results[0], results[2], 0, 1.2, 1e-8);
  });

  it('random cubic networks of 2 to 4 nodes, two overlapping sweep ranges: same edges to 1e-8, labelAt agrees with the bands (fast-check)', { timeout: 600_000 }, () => {
    // Invented networks of the cubic element r + x - x^3 (bistable for |r| < 2/(3 sqrt 3), Strogatz
    // ch. 3) with diffusive coupling. Few runs: each traces and labels two diagrams.
    const network = fc.integer({ min: 2, max: 4 }).chain((n) => fc.record({
      r: fc.array(fc.double({ min: 0.03, max: 0.15, noNaN: true }), { minLength: n, maxLength: n }),
      weights: fc.array(fc.double({ min: 0.5, max: 1.5, noNaN: true }), { minLength: n - 1, maxLength: n - 1 }),
      twoWay: fc.array(fc.boolean(), { minLength: n - 1, maxLength: n - 1 }),
      a: fc.double({ min: 0, max: 0.2, noNaN: true }),
      b: fc.double({ min: 0.35, max: 0.5, noNaN: true }),
      c: fc.double({ min: 0.25, max: 0.3, noNaN: true }),
      d: fc.double({ min: 0.6, max: 0.8, noNaN: true }),
      probes: fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 3, maxLength: 3 }),
    }));
    fc.assert(fc.property(network, (net) => {
      const n = net.r.length;
      const nodes = Array.from({ length: n }, (_, i) => `n${i}`);
      const doc = (from: number, to: number) => ({
        format: 'brinkmap/network-1', name: 'random cubic chain (invented)',
        element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
        nodes: nodes.map((id, i) => ({ id, parameters: { r: net.r[i] } })),
        links: net.weights.map((w, i) => ({ from: nodes[i], to: nodes[i + 1], weight: w, twoWay: net.twoWay[i] })),
        coupling: { parameter: 'beta', value: 0 },
        sweep: { parameter: 'beta', from, to },
      });
      // Two ranges that overlap on [c, min(b + 0.3, d)], with different ends on both sides.
      const r1: [number, number] = [net.a, net.b + 0.3];
      const r2: [number, number] = [net.c, net.d];
      const lo = Math.max(r1[0], r2[0]);
      const hi = Math.min(r1[1], r2[1]);
      const s1 = compileModelJson(doc(...r1));
      const s2 = compileModelJson(doc(...r2));
      const d1 = traceDiagram(s1);
      const res1 = labelRegimes(s1, d1, { escapeGraphs: false });
      const res2 = labelRegimes(s2, traceDiagram(s2), { escapeGraphs: false });
      expectSameEdges(res1, res2, lo, hi, 1e-8);
      for (const t of net.probes) {
        const p = lo + t * (hi - lo);
        const band = res1.regimes.find((b) => b.from < p && p < b.to);
        if (!band) continue;
        expect(labelAt(s1, d1, p).regime).toBe(band.regime);
      }
    }), { numRuns: 4, seed: 10, endOnFailure: true });
  });
});
