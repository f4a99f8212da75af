/**
 * Bench section for the two-parameter maps (src/lib/maps, docs/maps.md), issue 14: the map of the
 * symmetric cubic pair in (beta, r) under 2 s and of the 3-lake chain in (beta, b) under 10 s.
 * Models (invented, no real lakes): the pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i); the 3-lake
 * chain of tests/fixtures/engine-three-lakes.json (P' = a - b P + P^8/(1 + P^8), one-way links).
 * Baseline in the same process (common practice, no source; what a modeler does by hand): today's
 * one-parameter engine (traceDiagram) at 12 evenly spaced values of the second parameter, keeping
 * its saddle-nodes. "agree" cuts the map's saddle-node curves at those 12 values (saddleNodesAt)
 * and compares every saddle-node of every baseline diagram with the nearest slice point.
 */
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import type { BenchSection } from './bench.js';
import { traceDiagram } from '../src/lib/atlas/index.js';
import { compileTwoParameter, saddleNodesAt, traceMap, type TwoParameterSystem } from '../src/lib/maps/index.js';

interface Case {
  readonly name: string;
  readonly model: unknown;
  readonly second: string;
  readonly range: [number, number];
  readonly goalMs: number;
}

function cases(): Case[] {
  const pair = {
    format: 'brinkmap/network-1', name: 'symmetric cubic pair (invented)',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: [{ id: 'x1' }, { id: 'x2' }], links: [{ from: 'x1', to: 'x2', weight: 1, twoWay: true }],
    coupling: { parameter: 'beta', value: 0 }, sweep: { parameter: 'beta', from: 0, to: 1 },
  };
  const lakes = JSON.parse(readFileSync(new URL('../tests/fixtures/engine-three-lakes.json', import.meta.url), 'utf8')).model;
  return [
    { name: 'symmetric pair (beta, r in [0.02, 0.3])', model: pair, second: 'r', range: [0.02, 0.3], goalMs: 2000 },
    { name: '3-lake chain (beta, b in [0.5, 0.7])', model: lakes, second: 'b', range: [0.5, 0.7], goalMs: 10_000 },
  ];
}

function timed<T>(f: () => T): { value: T; ms: number } {
  const t = performance.now();
  const value = f();
  return { value, ms: performance.now() - t };
}

function baseline(sys: TwoParameterSystem, range: [number, number], k = 12) {
  const values = Array.from({ length: k }, (_, i) => range[0] + ((range[1] - range[0]) * i) / (k - 1));
  return values.map((b) => ({ b, folds: traceDiagram(sys.atSecond(b)).bifurcations.filter((q) => q.type === 'saddle-node') }));
}

export const mapsSection: BenchSection = {
  title: 'two-parameter maps (issue 14): map vs 12 one-parameter diagrams',
  run() {
    console.log(`  load average at start ${loadavg()[0].toFixed(2)}; wall times, best of 2 (alternated)`);
    for (const c of cases()) {
      const sys = compileTwoParameter(c.model, { second: c.second });
      let curves = Infinity;
      let whole = Infinity;
      let base = Infinity;
      let map = null;
      let ref = null;
      for (let round = 0; round < 2; round++) {
        const a = timed(() => traceMap(sys, { secondFrom: c.range[0], secondTo: c.range[1], regionColumns: 0, regionRows: 0 }));
        if (a.ms < curves) { curves = a.ms; map = a.value; }
        const w = timed(() => traceMap(sys, { secondFrom: c.range[0], secondTo: c.range[1] }));
        whole = Math.min(whole, w.ms);
        const g = timed(() => baseline(sys, c.range));
        if (g.ms < base) { base = g.ms; ref = g.value; }
      }
      let worst = 0;
      let missing = 0;
      let folds = 0;
      for (const { b, folds: fs } of ref!) {
        const slice = saddleNodesAt(sys, map!.curves, b);
        for (const f of fs) {
          folds++;
          const d = Math.min(...slice.map((q) => Math.max(Math.abs(q.p - f.p), ...q.x.map((v, i) => Math.abs(v - f.x[i])))));
          if (!(d < 1e-6)) missing++;
          else worst = Math.max(worst, d);
        }
      }
      const counts = ['saddle-node', 'hopf', 'pitchfork'].map((t) => `${map!.curves.filter((q) => q.type === t).length} ${t}`).join(', ');
      console.log(`  ${c.name}: curves ${counts}; points ${map!.points.length}; ${map!.curves.reduce((s, q) => s + q.points.length, 0)} curve points`);
      console.log(`    map (curves) ${curves.toFixed(0)} ms, map with regions (9 x 5 labelAt grid) ${whole.toFixed(0)} ms; baseline 12 diagrams ${base.toFixed(0)} ms; ratio map/baseline ${(curves / base).toFixed(2)} (curves), ${(whole / base).toFixed(2)} (with regions)`);
      console.log(`    baseline saddle-nodes ${folds}, not on a map curve ${missing}, worst distance of the others to the map's slice ${worst.toExponential(1)}`);
      console.log(`    goal: whole map < ${c.goalMs / 1000} s -> ${whole < c.goalMs ? 'met' : 'NOT met'} (${(whole / 1000).toFixed(2)} s)`);
    }
  },
};

// `node --import tsx scripts/bench-maps.ts` runs this section alone.
if (import.meta.url === `file://${process.argv[1]}`) {
  console.log(`== ${mapsSection.title}`);
  mapsSection.run();
}
