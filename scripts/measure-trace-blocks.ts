/**
 * Measures the fixed split of a full trace into blocks (docs/numerics.md §11): for the invented
 * cubic chains of `npm run bench` and blocks = 1, 2, 4, the time of each block traced alone in this
 * process (so the best two-thread time is the larger half of the work), the points traced in all
 * blocks against the points kept after the merge (work done twice), and whether the blocked diagram
 * keeps every special point (to 1e-10) and every point of every branch of the one-block trace.
 *   node --import tsx scripts/measure-trace-blocks.ts [--eight | --only-eight] [--blocks=1,2,4]
 */
import { traceBlock, traceDiagramWith, type BlockResult, type Diagram } from '../src/lib/atlas/index.js';
import { compileModelJson } from '../src/lib/model/index.js';
import { cubicDoc, chain, diagramAgreement } from './trace-blocks-common.js';

const eight = { key: '8-node one-way chain', doc: cubicDoc('8 nodes one-way chain (invented)', 8, chain(8, false)), settings: { maxBranches: 100_000 } };
const counts = (process.argv.find((a) => a.startsWith('--blocks='))?.slice(9) ?? '1,2,4').split(',').map(Number);
const cases = process.argv.includes('--only-eight') ? [eight] : [
  { key: '6-node one-way chain', doc: cubicDoc('6 nodes one-way chain (invented)', 6, chain(6, false)), settings: {} },
  { key: '6-node two-way chain', doc: cubicDoc('6 nodes two-way chain (invented)', 6, chain(6, true)), settings: {} },
  ...(process.argv.includes('--eight') ? [eight] : []),
];

for (const c of cases) {
  const system = compileModelJson(c.doc);
  let reference: Diagram | null = null;
  let oneBlockMs = 0;
  for (const blocks of counts) {
    // Untimed run first (JIT warm-up), then the timed one.
    if (blocks === counts[0] && system.dimension < 8) await traceDiagramWith(system, { ...c.settings, traceBlocks: 2 }, {}, async (bs) => bs.map((b) => traceBlock(system, b)));
    const times: number[] = [];
    let runnerFrom = 0;
    let runnerTo = 0;
    let traced = 0;
    const t0 = performance.now();
    const diagram = await traceDiagramWith(system, { ...c.settings, traceBlocks: blocks }, {}, async (bs) => { runnerFrom = performance.now(); const out = bs.map((b): BlockResult => {
      const t = performance.now();
      const r = traceBlock(system, b);
      times.push(performance.now() - t);
      traced += r.branches.reduce((q, br) => q + br.points.length, 0);
      return r;
    }); runnerTo = performance.now(); return out; });
    const wall = performance.now() - t0;
    if (blocks === 1) {
      reference = diagram;
      traced = diagram.branches.reduce((q, br) => q + br.points.length, 0);
      times.push(wall);
      oneBlockMs = wall;
    }
    const kept = diagram.branches.reduce((q, br) => q + br.points.length, 0);
    const sum = times.reduce((q, v) => q + v, 0);
    const agree = diagramAgreement(reference!, diagram, 1e-10, 1e-6);
    console.log(`${c.key}, ${blocks} block(s): ${diagram.branches.length} branches, ${kept} points kept of ${traced} traced; blocks ${times.map((t) => (t / 1000).toFixed(2)).join(' + ')} s (sum ${(sum / 1000).toFixed(2)} s, wall ${(wall / 1000).toFixed(2)} s ${blocks > 1 ? ` of which starts ${((runnerFrom - t0) / 1000).toFixed(2)} s, merge ${((t0 + wall - runnerTo) / 1000).toFixed(2)} s` : ''}; on two free cores at best ${(oneBlockMs / twoCore(times)).toFixed(2)}x the one-block trace); special points ${agree.specialFound}/${agree.specialTotal} within 1e-10, branch points ${agree.pointsOn}/${agree.pointsTotal} on a branch; ${diagram.bifurcations.length} special points`);
  }
}

/** Wall time of the blocks on two threads taking them in order (each free thread takes the next block). */
function twoCore(times: number[]): number {
  const free = [0, 0];
  for (const t of times) {
    const k = free[0] <= free[1] ? 0 : 1;
    free[k] += t;
  }
  return Math.max(...free);
}
