/**
 * Noise section of `npm run bench`: node-steps per second of the escape Monte Carlo
 * (simulateEscapePaths, one thread, and the piscina escape pool on 2 threads) on a 2-node and a
 * 6-node cubic network (invented toy models), against a vectorized baseline written the way a
 * modeler's array script would: all paths at once in typed arrays, the drift formula written out
 * over the array, one normal stream (the same stdlib ziggurat over MT19937), active paths masked.
 * Then the 2-node sweep goal: 24 couplings at a noise level where the predicted mean first escape
 * is about 100 time units, run with BENCH_NOISE_SWEEP_PATHS paths per coupling (default 200) and
 * projected linearly to 10 000 paths (paths are independent, so the time is linear in the count).
 * gMAM time per edge: see the barriers section.
 */
import improvedZiggurat from '@stdlib/random-base-improved-ziggurat';
import { traceDiagram } from '../src/lib/atlas/index.js';
import { compileModelJson } from '../src/lib/model/index.js';
import { loadavg } from 'node:os';
import { prepareEscapes, simulateEscapePaths, type EscapeSetup } from '../src/lib/noise/index.js';
import { sweepEscapesWith, type PathRunner } from '../src/lib/noise/sweep.js';
import { EscapePool } from '../src/worker/escape-pool.js';
import type { BenchSection } from './bench.js';

function cubicDoc(n: number, r: number, beta: number) {
  return {
    format: 'brinkmap/network-1',
    name: `${n} cubic nodes in a chain (invented)`,
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r } },
    nodes: Array.from({ length: n }, (_, i) => ({ id: `n${i}` })),
    links: Array.from({ length: n - 1 }, (_, i) => ({ from: `n${i}`, to: `n${i + 1}`, weight: 1, twoWay: true })),
    coupling: { parameter: 'beta', value: beta },
    sweep: { parameter: 'beta', from: 0, to: 0.3 },
  };
}

/** The baseline: Euler–Maruyama over all paths at once (common practice, no source). Returns node-steps done. */
function vectorizedBaseline(n: number, r: number, beta: number, setup: EscapeSetup, dt: number, tMax: number, paths: number): number {
  const z = improvedZiggurat.factory({ seed: [1, 0] }) as () => number;
  const X = new Float64Array(paths * n);
  for (let k = 0; k < paths; k++) X.set(setup.start, k * n);
  const F = new Float64Array(paths * n);
  const escaped = new Uint8Array(paths * n);
  const active = new Uint8Array(paths).fill(1);
  const left = new Int32Array(paths).fill(n);
  const s = setup.sigma[0] * Math.sqrt(dt);
  let activeCount = paths;
  let nodeSteps = 0;
  for (let step = 0; step * dt < tMax && activeCount > 0; step++) {
    for (let k = 0; k < paths; k++) {
      if (!active[k]) continue;
      const o = k * n;
      for (let i = 0; i < n; i++) {
        const x = X[o + i];
        let c = 0;
        if (i > 0) c += X[o + i - 1] - x;
        if (i < n - 1) c += X[o + i + 1] - x;
        F[o + i] = r + x - x * x * x + beta * c;
      }
    }
    for (let k = 0; k < paths; k++) {
      if (!active[k]) continue;
      const o = k * n;
      for (let i = 0; i < n; i++) {
        X[o + i] += F[o + i] * dt + s * z();
        if (!escaped[o + i] && X[o + i] > setup.thresholds[i]) {
          escaped[o + i] = 1;
          if (--left[k] === 0) {
            active[k] = 0;
            activeCount--;
          }
        }
      }
      nodeSteps += n;
    }
  }
  return nodeSteps;
}

function fmt(v: number, digits = 3): string {
  return Number(v.toPrecision(digits)).toString();
}

function load(): string {
  return loadavg().map((v) => v.toFixed(2)).join(' ');
}

export const noiseSection: BenchSection = {
  title: 'noise: escape Monte Carlo',
  async run() {
    const r = 0.1;
    const beta = 0.05;
    // One pool for the whole section, started and warmed once (threads load the TypeScript and
    // optimize the path loop before any timing); its threads compile each document once.
    const pool = new EscapePool(2);
    try {
      console.log(`  load average before: ${load()} (2 cores shared with other work; the numbers move with it)`);
      console.log('  network  sigma  paths  node-steps  MC 1 thread (node-steps/s)  MC pool 2 threads (per thread)  vectorized baseline  pool / baseline');
      const ratios: number[] = [];
      for (const n of [2, 6]) {
        const doc = cubicDoc(n, r, beta);
        const system = compileModelJson(doc);
        const diagram = traceDiagram(system);
        const sigma = 0.5;
        const prep = prepareEscapes(system, diagram, { level: sigma, weights: new Float64Array(n).fill(1) }, beta, { paths: 1, stepCheckPaths: 0 });
        const paths = Number(process.env.BENCH_NOISE_PATHS ?? (n === 2 ? 6000 : 2000));
        const tMax = 200;
        // Warm-up (not timed): every thread and this thread run the same loop for a while.
        await pool.run({ model: doc, setup: prep.setup, dt: prep.dt, tMax, seed: 2, count: Math.ceil(paths / 4) });
        simulateEscapePaths(system, prep.setup, { dt: prep.dt, tMax, seed: 2, count: Math.ceil(paths / 8) });
        vectorizedBaseline(n, r, beta, prep.setup, prep.dt, tMax, Math.ceil(paths / 8));
        let t = performance.now();
        const one = simulateEscapePaths(system, prep.setup, { dt: prep.dt, tMax, seed: 1, count: paths });
        const oneRate = (one.steps.reduce((a, b) => a + b, 0) * n) / ((performance.now() - t) / 1000);
        t = performance.now();
        const two = await pool.run({ model: doc, setup: prep.setup, dt: prep.dt, tMax, seed: 1, count: paths });
        const twoSteps = two.steps.reduce((a, b) => a + b, 0) * n;
        const twoRate = twoSteps / ((performance.now() - t) / 1000);
        t = performance.now();
        const baseSteps = vectorizedBaseline(n, r, beta, prep.setup, prep.dt, tMax, paths);
        const baseRate = baseSteps / ((performance.now() - t) / 1000);
        ratios.push(twoRate / baseRate);
        console.log(`  ${n} nodes  ${sigma}    ${paths}   ${fmt(twoSteps)}   ${fmt(oneRate)}    ${fmt(twoRate)} (${fmt(twoRate / 2)})    ${fmt(baseRate)}    ${fmt(twoRate / baseRate)}`);
      }
      const goal1 = ratios.every((x) => x >= 2);
      console.log(`  goal: pool on 2 cores >= 2x the vectorized baseline: ${goal1 ? 'met' : 'NOT met'} (${ratios.map((x) => fmt(x)).join(', ')}; load ${load()})`);

      // Sweep goal: sweepEscapesWith on the warm pool (every parameter value's paths on both threads).
      const doc = cubicDoc(2, r, 0);
      const system = compileModelJson(doc);
      const diagram = traceDiagram(system);
      const mid = 0.15;
      let lo = 0.2;
      let hi = 1;
      for (let it = 0; it < 12; it++) {
        const s = Math.sqrt(lo * hi);
        const pr = prepareEscapes(system, diagram, { level: s, weights: Float64Array.of(1, 1) }, mid, { paths: 1, stepCheckPaths: 0 });
        if (pr.prediction.meanFirstEscape > 100) lo = s;
        else hi = s;
      }
      const sigma = Math.sqrt(lo * hi);
      const spec = { level: sigma, weights: Float64Array.of(1, 1) };
      const per = Number(process.env.BENCH_NOISE_SWEEP_PATHS ?? 1000);
      const ps = Array.from({ length: 24 }, (_, i) => 0.005 + (0.29 * i) / 23);
      const runner = pool.runner(doc);
      let simMs = 0;
      let nodeSteps = 0;
      const timed: PathRunner = async (setup, run) => {
        const t0 = performance.now();
        const b = await runner(setup, run);
        simMs += performance.now() - t0;
        nodeSteps += b.steps.reduce((a, c) => a + c, 0) * b.n;
        return b;
      };
      const dtOverride = process.env.BENCH_NOISE_SWEEP_DT ? Number(process.env.BENCH_NOISE_SWEEP_DT) : undefined;
      const t = performance.now();
      const sweep = await sweepEscapesWith(system, diagram, spec, ps, timed, { paths: per, seed: 1, stepCheckPaths: 0, budget: 1e13, dt: dtOverride });
      const totalMs = performance.now() - t;
      const fixedMs = totalMs - simMs;
      const projected = (fixedMs + (simMs * 10_000) / per) / 1000;
      const at = sweep.points[11].report!;
      console.log(`  2-node sweep (sweepEscapesWith on the 2-thread pool): 24 couplings in [0.005, 0.295], sigma ${fmt(sigma, 4)} (predicted mean first escape 100 at beta = ${mid}; Monte Carlo ${fmt(at.escapeTimes[0].mean)} at beta = ${fmt(ps[11])}), dt ${fmt(at.dt)}${dtOverride ? ' (BENCH_NOISE_SWEEP_DT)' : ' (default)'}`);
      console.log(`    ${per} paths per coupling: set-up, prediction, exit switches, bands ${fmt(fixedMs / 1000)} s; paths ${fmt(simMs / 1000)} s (${fmt(nodeSteps)} node-steps, ${fmt(nodeSteps / (simMs / 1000))} node-steps/s); projected to 10 000 paths: ${fmt(projected)} s`);
      console.log(`  goal: 24 couplings x 10 000 paths in < 60 s: ${projected < 60 ? 'met' : 'NOT met'} (projected ${fmt(projected)} s; load ${load()})`);
    } finally {
      await pool.close();
    }
  },
};
