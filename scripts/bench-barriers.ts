/**
 * Bench section for the exit barriers (src/lib/noise/barriers.ts, docs/noise.md "Exit barriers"):
 * time per edge of the geometric minimum action method (both ends of each edge) on a 2-node and a
 * 6-node network, and, on their two-way (gradient) twins, the potential method's time per edge and
 * the largest relative gap between gMAM and the potential (gMAM forced), as a precision check.
 * Networks (invented): cubic elements x' = r_i + x - x^3, diffusive coupling beta * (source - target)
 * at beta = 0.05; one-way links make the field non-gradient. 6 nodes: only the edges out of all-base
 * and into it (the Monte Carlo's start), to keep the run short.
 */
import type { BenchSection } from './bench.js';
import type { Branch, Diagram } from '../src/lib/atlas/index.js';
import { compileModelJson } from '../src/lib/model/index.js';
import { barriersAt, noiseGraphAt } from '../src/lib/noise/index.js';

function cubicChain(n: number, twoWay: boolean) {
  const ids = Array.from({ length: n }, (_, i) => `n${i + 1}`);
  return {
    format: 'brinkmap/network-1',
    name: `${n} cubic elements, ${twoWay ? 'two-way' : 'one-way'} chain (invented)`,
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: ids.map((id, i) => ({ id, parameters: { r: 0.06 + (0.08 * i) / Math.max(1, n - 1) } })),
    links: ids.slice(1).map((id, i) => ({ from: ids[i], to: id, weight: 1, twoWay })),
    coupling: { parameter: 'beta', value: 0 },
    sweep: { parameter: 'beta', from: 0, to: 0.1 },
  };
}

/** Roots a < m < c of r + x - x^3 by Viete's trigonometric formula (as in tests/lib/regimes/fixtures.ts). */
function roles(r: number) {
  const theta = Math.acos((r * 3 * Math.sqrt(3)) / 2);
  const [base, threshold, tipped] = [0, 1, 2].map((k) => (2 / Math.sqrt(3)) * Math.cos(theta / 3 - (2 * Math.PI * k) / 3)).sort((x, y) => x - y);
  return { base, threshold, tipped };
}

/**
 * Tracing the 6-node chain takes tens of seconds and is not what this section measures, so the
 * diagram holds one short branch per combination of the uncoupled roots (3^n guesses); noiseGraphAt
 * refines them by Newton's method at beta = 0.05, where weak coupling keeps all of them.
 */
function guessDiagram(n: number, rs: number[], p: number): Diagram {
  const branches: Branch[] = [];
  for (let code = 0; code < 3 ** n; code++) {
    const x = rs.map((r, i) => { const q = roles(r); return [q.base, q.threshold, q.tipped][Math.floor(code / 3 ** i) % 3]; });
    branches.push({ id: `g${code}`, origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'], points: [{ p: p - 1e-3, x, unstable: 0 }, { p: p + 1e-3, x, unstable: 0 }] });
  }
  return { parameter: 'beta', variables: rs.map((_, i) => `n${i + 1}`), branches, bifurcations: [], diagnostics: [], settings: { from: p - 1e-3, to: p + 1e-3 }, engineVersion: 'bench-guesses' };
}

function graphOf(n: number, twoWay: boolean) {
  const doc = cubicChain(n, twoWay);
  const system = compileModelJson(doc);
  const rs = doc.nodes.map((x) => x.parameters.r);
  const g = noiseGraphAt(system, guessDiagram(n, rs, 0.05), 0.05, { roles: rs.map(roles) });
  if (!g.ok) throw new Error(g.reason);
  return { system, g };
}

const fmt = (v: number, d = 3) => (!Number.isFinite(v) ? String(v) : v !== 0 && Math.abs(v) < 1e-3 ? v.toExponential(d - 1) : v.toPrecision(d));
const row = (cells: (string | number)[], widths: number[]) => cells.map((c, i) => String(c).padEnd(widths[i])).join(' ');

export const barriersSection: BenchSection = {
  title: 'Exit barriers: gMAM time per edge (non-gradient) and gMAM vs potential on the gradient twins (one core)',
  run() {
    const widths = [36, 7, 12, 10, 12, 14, 12];
    console.log(row(['network', 'pairs', 'method', 'ms/pair', 'iterations', 'max N-change', 'max gap'], widths));
    for (const n of [2, 6]) {
      for (const twoWay of [false, true]) {
        const { system, g } = graphOf(n, twoWay);
        const base = g.graph.states.findIndex((s) => s.pattern.every((x) => x === 'base'));
        const pairs = n > 2 ? (k: number, e: number) => k === base || g.graph.saddles[e].from === base : undefined;
        const w = new Float64Array(n).fill(1);
        barriersAt(system, g, w, { pairs: (k, e) => (pairs ? pairs(k, e) : true) && e === 0 }); // warm-up (JIT), not timed
        const t0 = performance.now();
        const mam = barriersAt(system, g, w, { method: 'minimum-action', pairs });
        const tMam = performance.now() - t0;
        const count = mam.barriers.length;
        const iters = mam.barriers.reduce((s, b) => s + Number(b.detail.iterations), 0) / Math.max(1, count);
        const change = Math.max(...mam.barriers.map((b) => Number(b.detail.discretizationChange)));
        const name = `${n} nodes, ${twoWay ? 'two-way (gradient)' : 'one-way'}`;
        console.log(row([name, count, 'gMAM', fmt(tMam / count), fmt(iters), fmt(change, 2), twoWay ? '' : '-'], widths));
        if (twoWay) {
          const t1 = performance.now();
          const pot = barriersAt(system, g, w, { pairs });
          const tPot = performance.now() - t1;
          let gap = 0;
          pot.barriers.forEach((b, k) => { gap = Math.max(gap, Math.abs(mam.barriers[k].barrier - b.barrier) / b.barrier); });
          console.log(row(['', pot.barriers.length, pot.gradient ? 'potential' : 'NOT gradient', fmt(tPot / pot.barriers.length), '', '', fmt(gap, 2)], widths));
        }
      }
    }
    console.log('  pairs = (state, saddle) barriers computed; ms/pair includes the manifold integrations and the gradient test.');
    console.log('  max N-change = largest |S_2N - S_N| / S_2N (N = 100 segments); max gap = largest |gMAM - potential| / potential.');
  },
};
