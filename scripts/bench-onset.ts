/**
 * Bench section for the critical coupling per node (src/lib/onset, docs/onset.md), issue 12 goal 5:
 * all nodes of a 64-node sparse network (mean degree 4) in under 10 s.
 * Network (invented, no real lakes): cubic elements x' = r_i + x - x^3 with r_i in [0.05, 0.15], a ring
 * plus 64 random chords (seeded LCG), 128 two-way links with weights in [0.5, 1.5], so every node has
 * degree 4 on average; diffusive coupling beta * w (source - target), beta swept 0 -> 1.
 * Baseline in the same process (common practice, no source): the engine's own continueBranch +
 * locateZero (which compute the spectrum at every point and factorize with ml-matrix) on the first
 * 8 nodes, stopped at the first fold; "agree" compares its fold parameters with ours.
 */
import { loadavg } from 'node:os';
import type { BenchSection } from './bench.js';
import { compileModelJson, type CompiledSystem } from '../src/lib/model/index.js';
import { criticalCoupling } from '../src/lib/onset/index.js';
import { defaultTraceSettings } from '../src/lib/atlas/trace-settings.js';
import { BorderedWorkspace, continueBranch, locateZero, newton, tangentAt, normInf, type TracedPoint } from '../src/lib/numerics/index.js';
import { elementRoles } from '../src/lib/regimes/index.js';

export function sparseNetwork64(seed = 12345) {
  const N = 64;
  let s = seed >>> 0;
  const rand = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const seen = new Set<string>();
  const links: { from: string; to: string; weight: number; twoWay: boolean }[] = [];
  const add = (a: number, b: number) => {
    const key = a < b ? `${a}-${b}` : `${b}-${a}`;
    if (a === b || seen.has(key)) return;
    seen.add(key);
    links.push({ from: `n${a}`, to: `n${b}`, weight: 0.5 + rand(), twoWay: true });
  };
  for (let i = 0; i < N; i++) add(i, (i + 1) % N);
  while (links.length < 2 * N) add(Math.floor(rand() * N), Math.floor(rand() * N));
  return {
    format: 'brinkmap/network-1',
    name: '64 nodes, sparse (mean degree 4), invented',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: Array.from({ length: N }, (_, i) => ({ id: `n${i}`, parameters: { r: 0.05 + 0.1 * rand() } })),
    links,
    coupling: { parameter: 'beta', value: 0 },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  };
}

/** First fold of the branch through "only node i tipped" by the engine's continueBranch + locateZero. */
function engineFold(system: CompiledSystem, i: number): number | null {
  const n = system.dimension;
  const s = defaultTraceSettings;
  const roles = elementRoles(system, 0, Array.from({ length: n }, () => [-10, 10] as [number, number])).roles.map((q) => q!);
  const guess = Float64Array.from(roles, (q) => q.base);
  guess[i] = roles[i].tipped;
  const x0 = newton(system, guess, 0).x;
  const y0 = new Float64Array(n + 1);
  y0.set(x0);
  const ws = new BorderedWorkspace(n);
  const e = new Float64Array(n + 1);
  e[n] = 1;
  const tan = tangentAt(system, y0, e, ws);
  const scale = Math.max(1, 1 + normInf(x0));
  let found: number | null = null;
  continueBranch(system, y0, tan.tangent, tan.determinant, {
    lo: 0, hi: 1, initialStep: s.initialStep * scale, minStep: s.minStep * scale, maxStep: s.maxStep * scale,
    maxParameterStep: s.maxParameterStep, maxTurn: s.maxTurn, maxPoints: s.maxPointsPerBranch / 2, stateBound: s.stateBound,
    residualTolerance: s.residualTolerance, stepTolerance: s.stepTolerance, maxCorrectorIterations: s.maxCorrectorIterations,
  }, {
    onStep: (a: TracedPoint, b: TracedPoint) => {
      if (found === null && a.t[n] * b.t[n] < 0) found = locateZero(system, 'fold', a, b, { parameterTolerance: s.locateParameterTolerance }).point.y[n];
    },
    stopAt: () => (found !== null ? 'closed-loop' : null),
  });
  return found;
}

function cpuMs(since: NodeJS.CpuUsage): number {
  const u = process.cpuUsage(since);
  return (u.user + u.system) / 1000;
}

export const onsetSection: BenchSection = {
  title: 'Critical coupling per node: 64-node sparse network (mean degree 4), all nodes, one cold run',
  run() {
    const doc = sparseNetwork64();
    const system = compileModelJson(doc);
    const load = loadavg()[0];
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    const res = criticalCoupling(system);
    const wall = performance.now() - t0;
    const cpu = cpuMs(c0);
    const folds = res.nodes.filter((q) => q.status === 'fold');
    const crit = folds.map((q) => q.critical!).sort((a, b) => a - b);
    const dragging = folds.filter((q) => (q.next?.length ?? 0) > 0).length;
    console.log(`  nodes ${res.nodes.length}, links ${doc.links.length} two-way (mean degree ${(2 * doc.links.length / doc.nodes.length).toFixed(1)}), continuation points ${res.iterations}`);
    console.log(`  folds ${folds.length}, none in range ${res.nodes.filter((q) => q.status === 'none-in-range').length}, failed ${res.nodes.filter((q) => q.status === 'failed').length}, diagnostics ${res.diagnostics.length}`);
    if (crit.length > 0) console.log(`  critical coupling min ${crit[0].toFixed(4)}, median ${crit[Math.floor(crit.length / 2)].toFixed(4)}, max ${crit[crit.length - 1].toFixed(4)}; nodes that drag others: ${dragging}`);
    console.log(`  wall ${wall.toFixed(0)} ms, CPU ${cpu.toFixed(0)} ms (process, all threads), load average at start ${load.toFixed(2)}`);
    console.log(`  goal: all 64 nodes < 10 s wall -> ${wall < 10_000 ? 'met' : 'NOT met'} (${(wall / 1000).toFixed(1)} s)`);
    const k = 8;
    const c1 = process.cpuUsage();
    const t1 = performance.now();
    const ref = Array.from({ length: k }, (_, i) => engineFold(system, i));
    const baseWall = performance.now() - t1;
    const baseCpu = cpuMs(c1);
    const worst = Math.max(...ref.map((p, i) => (p === null || res.nodes[i].critical === null ? Infinity : Math.abs(p - res.nodes[i].critical!))));
    console.log(`  baseline (engine continueBranch + locateZero, first ${k} nodes): ${(baseWall / k).toFixed(0)} ms/node wall, ${(baseCpu / k).toFixed(0)} ms/node CPU; ours ${(wall / res.nodes.length).toFixed(0)} ms/node wall, ${(cpu / res.nodes.length).toFixed(0)} ms/node CPU; agree to ${worst.toExponential(1)} in beta -> ${worst < 1e-9 ? 'yes' : 'NO'}`);
  },
};

// `node --import tsx scripts/bench-onset.ts` runs this section alone.
if (import.meta.url === `file://${process.argv[1]}`) {
  console.log(`== ${onsetSection.title}`);
  onsetSection.run();
}
