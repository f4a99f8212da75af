/**
 * `npm run bench`: speed and precision of the continuation engine against a naive baseline run in
 * the same process on the same machine (numbers are only comparable within one run).
 * Networks are invented lake-like examples (no real lakes): P' = a - b P + P^8/(1 + P^8) per node
 * (Carpenter, Ludwig & Brock 1999 form) with diffusive coupling beta * sum w (P_source - P_target).
 *
 * Baseline (common practice, no source): a fixed grid of beta, Newton at each grid value from the
 * previous point, special points bracketed by sign changes of det J_x between grid points (and a
 * branch lost where Newton fails, i.e. at a fold); each estimate is the middle of its grid cell.
 * Reference values: saddle-nodes refined by Newton on the augmented system F = 0, det J_x = 0
 * (Seydel, §5.1) started from the engine's value; other special points: the engine's own value.
 *
 * To add a section (e.g. coupling regimes), push a BenchSection onto `sections` below.
 */
import { traceDiagram, traceDiagramWith, type Diagram, type SpecialPoint } from '../src/lib/atlas/index.js';
import { TracePool } from '../src/worker/trace-pool.ts';
import type { CompiledSystem } from '../src/lib/model/index.js';
import { compileModelJson } from '../src/lib/model/index.js';
import { availableParallelism, cpus, loadavg } from 'node:os';
import { LuDecomposition, Matrix } from 'ml-matrix';
import { findStartingEquilibria } from '../src/lib/atlas/starting-equilibria.js';
import { defaultTraceSettings, type TraceSettings } from '../src/lib/atlas/trace-settings.js';
import { labelRegimes } from '../src/lib/regimes/index.js';
import { labelRegimesByMidpoint } from '../src/lib/regimes/midpoint-labeller.js';
import { onsetSection } from './bench-onset.js';
import { barriersSection } from './bench-barriers.js';
import { noiseSection } from './bench-noise.js';
import { mapsSection } from './bench-maps.js';
import { storageSection } from './bench-storage.js';
import { cubicDoc, chain } from './trace-blocks-common.js';

export interface BenchSection {
  readonly title: string;
  /** Prints its own lines; returns nothing (or a promise the runner awaits). */
  run(): void | Promise<void>;
}

interface NetworkSpec {
  name: string;
  a: number[];
  links: { from: number; to: number; weight: number; twoWay?: boolean }[];
}

function networkDoc(spec: NetworkSpec) {
  return {
    format: 'brinkmap/network-1',
    name: spec.name,
    element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
    nodes: spec.a.map((a, i) => ({ id: `lake${i + 1}`, parameters: { a } })),
    links: spec.links.map((l) => ({ from: `lake${l.from + 1}`, to: `lake${l.to + 1}`, weight: l.weight, ...(l.twoWay ? { twoWay: true } : {}) })),
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  };
}

// Invented example networks.
const networks: NetworkSpec[] = [
  { name: '2 lakes, one stream', a: [0.05, 0.07], links: [{ from: 0, to: 1, weight: 1 }] },
  { name: '3 lakes, downstream flow', a: [0.05, 0.07, 0.05], links: [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1, twoWay: true }] },
  {
    name: '6 lakes, branching valley',
    a: [0.04, 0.05, 0.06, 0.05, 0.07, 0.045],
    links: [
      { from: 0, to: 1, weight: 1 },
      { from: 1, to: 2, weight: 0.8 },
      { from: 1, to: 3, weight: 0.6, twoWay: true },
      { from: 3, to: 4, weight: 1 },
      { from: 4, to: 5, weight: 0.7 },
    ],
  },
  {
    name: '20 lakes, long chain',
    a: Array.from({ length: 20 }, (_, i) => 0.04 + 0.0015 * i),
    links: Array.from({ length: 19 }, (_, i) => ({ from: i, to: i + 1, weight: 1 })),
  },
];

function time<T>(f: () => T): { value: T; ms: number; cpu: number } {
  const c = process.cpuUsage();
  const t = performance.now();
  const value = f();
  const ms = performance.now() - t;
  const u = process.cpuUsage(c);
  return { value, ms, cpu: (u.user + u.system) / 1000 };
}

/*
 * The baseline's linear algebra is the array library a modeler's script would call: ml-matrix's
 * LuDecomposition on Matrix objects, exactly what the engine's DenseLu wrapped before issue 12
 * (and what the issue-12 measurements used). Since then DenseLu runs the same algorithm on flat
 * arrays (bit-identical, faster); the baseline keeps the library call so that its cost is the
 * script's, not ours.
 */
class LibraryLu {
  readonly determinant: number;
  private readonly lu: LuDecomposition | null;
  private readonly singular: boolean;
  constructor(a: Float64Array, private readonly size: number) {
    if (!a.every(Number.isFinite)) {
      this.lu = null;
      this.determinant = Number.NaN;
      this.singular = true;
      return;
    }
    // As DenseLu did up to 1.4.0: one scratch Matrix per size, copied by LuDecomposition.
    this.lu = new LuDecomposition(libraryScratch(squares, a, size, size));
    this.singular = this.lu.isSingular();
    this.determinant = this.singular ? 0 : this.lu.determinant;
  }
  solve(b: ArrayLike<number>): Float64Array | null {
    if (this.lu === null || this.singular) return null;
    const z = this.lu.solve(libraryScratch(columns, b, this.size, 1));
    const out = new Float64Array(this.size);
    for (let i = 0; i < this.size; i++) {
      const v = z.get(i, 0);
      if (!Number.isFinite(v)) return null;
      out[i] = v;
    }
    return out;
  }
}
const squares = new Map<number, Matrix>();
const columns = new Map<number, Matrix>();
function libraryScratch(cache: Map<number, Matrix>, a: ArrayLike<number>, rows: number, cols: number): Matrix {
  let m = cache.get(rows);
  if (!m) cache.set(rows, (m = new Matrix(rows, cols)));
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) m.set(i, j, a[i * cols + j]);
  return m;
}

function detJx(system: CompiledSystem, x: Float64Array, p: number, buf: Float64Array): number {
  system.jacobian(x, p, buf);
  return new LibraryLu(buf, system.dimension).determinant;
}

/** The root finder of the baseline: damped Newton at fixed p (the algorithm of numerics/newton.ts) on LibraryLu. */
function newton(system: CompiledSystem, x0: ArrayLike<number>, p: number, o: { maxIterations: number }): { converged: boolean; x: Float64Array } {
  const n = system.dimension;
  let x = Float64Array.from(x0);
  const f = new Float64Array(n);
  const j = new Float64Array(n * n);
  const trial = new Float64Array(n);
  const ft = new Float64Array(n);
  const sumSq = (a: Float64Array) => a.reduce((s, v) => s + v * v, 0);
  const normInf = (a: Float64Array) => a.reduce((s, v) => Math.max(s, Math.abs(v)), 0);
  system.rates(x, p, f);
  let fn = sumSq(f);
  for (let it = 1; it <= o.maxIterations; it++) {
    system.jacobian(x, p, j);
    const d = new LibraryLu(j, n).solve(f.map((v) => -v));
    if (d === null || !Number.isFinite(fn)) return { converged: false, x };
    let lambda = 1;
    let accepted = false;
    for (let back = 0; back < 20; back++) {
      for (let i = 0; i < n; i++) trial[i] = x[i] + lambda * d[i];
      system.rates(trial, p, ft);
      const t2 = sumSq(ft);
      if (Number.isFinite(t2) && (t2 < fn || t2 === 0 || back === 19)) {
        accepted = Number.isFinite(t2);
        break;
      }
      lambda *= 0.5;
    }
    if (!accepted) return { converged: false, x };
    x = Float64Array.from(trial);
    f.set(ft);
    fn = sumSq(f);
    const res = normInf(f);
    if (normInf(x) > 1e8) return { converged: false, x };
    if ((res <= 1e-11 && lambda * normInf(d) <= 1e-10 * (1 + normInf(x))) || res === 0) return { converged: true, x };
  }
  return { converged: false, x };
}

interface BaselineResult {
  estimates: { p: number; x: number[] }[];
  points: number;
}

/** Naive grid continuation from each start (see the header). */
function baseline(system: CompiledSystem, starts: Float64Array[], steps: number): BaselineResult {
  const n = system.dimension;
  const { from, to } = system.sweep;
  const dp = (to - from) / steps;
  const j = new Float64Array(n * n);
  const estimates: { p: number; x: number[] }[] = [];
  let points = 0;
  for (const s of starts) {
    let x = Float64Array.from(s);
    let d = detJx(system, x, from, j);
    for (let k = 1; k <= steps; k++) {
      const p = from + k * dp;
      const r = newton(system, x, p, { maxIterations: 20 });
      points++;
      const jump = r.converged ? Math.max(...Array.from(r.x, (v, i) => Math.abs(v - x[i]))) : Infinity;
      if (!r.converged || jump > 0.2) {
        estimates.push({ p: p - dp / 2, x: Array.from(x) });
        break;
      }
      const d2 = detJx(system, r.x, p, j);
      if (d * d2 < 0) estimates.push({ p: p - dp / 2, x: Array.from(r.x, (v, i) => (v + x[i]) / 2) });
      x = Float64Array.from(r.x);
      d = d2;
    }
  }
  return { estimates, points };
}

/** Newton on G(x, p) = (F(x, p), det J_x(x, p)) with a central-difference Jacobian, from the engine's fold. */
function refineFold(system: CompiledSystem, sp: SpecialPoint): number {
  const n = system.dimension;
  const m = n + 1;
  const y = Float64Array.from([...sp.x, sp.p]);
  const f = new Float64Array(n);
  const j = new Float64Array(n * n);
  const g = (z: Float64Array): Float64Array => {
    const x = z.subarray(0, n);
    system.rates(x, z[n], f);
    const out = new Float64Array(m);
    out.set(f);
    out[n] = detJx(system, Float64Array.from(x), z[n], j);
    return out;
  };
  for (let it = 0; it < 30; it++) {
    const g0 = g(y);
    const a = new Float64Array(m * m);
    for (let c = 0; c < m; c++) {
      const h = 1e-6 * (1 + Math.abs(y[c]));
      const yp = Float64Array.from(y);
      const ym = Float64Array.from(y);
      yp[c] += h;
      ym[c] -= h;
      const gp = g(yp);
      const gm = g(ym);
      for (let r = 0; r < m; r++) a[r * m + c] = (gp[r] - gm[r]) / (2 * h);
    }
    const step = new LibraryLu(a, m).solve(g0.map((v) => -v));
    if (!step) break;
    for (let i = 0; i < m; i++) y[i] += step[i];
    if (Math.max(...Array.from(step, Math.abs)) < 1e-14 * (1 + Math.abs(y[n]))) break;
  }
  return y[n];
}

function fmt(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return '-';
  if (v === 0) return '0';
  return Math.abs(v) >= 1e4 || Math.abs(v) < 1e-2 ? v.toExponential(digits - 1) : v.toPrecision(digits);
}

function median(v: number[]): number {
  if (v.length === 0) return Number.NaN;
  const s = [...v].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function row(cells: (string | number)[], widths: number[]): string {
  return cells.map((c, i) => String(c).padStart(widths[i])).join('  ');
}

const engineSection: BenchSection = {
  title: 'Whole diagram: pseudo-arclength engine vs naive grid baseline (same process, one core)',
  run() {
    const widths = [28, 6, 6, 8, 9, 10, 8, 9, 7, 10, 11, 9, 10, 10];
    console.log(row(['network', 'starts', 'branch', 'points', 'time ms', 'points/s', 'special', 'grid ms', 'cost x', 'err engine', 'err grid', 'cost10 x', 'err grid10', 'precision'], widths));
    for (const spec of networks) {
      const system = compileModelJson(networkDoc(spec));
      traceDiagram(system); // warm-up (JIT), not timed
      const runs = spec.a.length <= 3 ? 5 : 1;
      let best = Infinity;
      let d: Diagram | null = null;
      for (let k = 0; k < runs; k++) {
        const t = time(() => traceDiagram(system));
        if (t.ms < best) {
          best = t.ms;
          d = t.value;
        }
      }
      const diagram = d!;
      const points = diagram.branches.reduce((s, b) => s + b.points.length, 0);
      const starts = findStartingEquilibria(system, system.sweep.from, { ...defaultTraceSettings, from: 0, to: 1 }).points;
      // Equal cost: the grid gets as many Newton solves in total as the engine has points.
      const steps = Math.max(10, Math.round(points / Math.max(1, starts.length)));
      const base = time(() => baseline(system, starts, steps));
      const fineT = time(() => baseline(system, starts, steps * 10));
      const fine = fineT.value;
      const refs = diagram.bifurcations.map((s) => ({ s, ref: s.type === 'saddle-node' ? refineFold(system, s) : s.p }));
      const errEngine = refs.map(({ s, ref }) => Math.abs(s.p - ref));
      const nearest = (est: { p: number; x: number[] }[], s: SpecialPoint, ref: number) => {
        let bestErr = Infinity;
        for (const e of est) {
          const dx = Math.max(...e.x.map((v, i) => Math.abs(v - s.x[i])));
          if (dx < 0.3) bestErr = Math.min(bestErr, Math.abs(e.p - ref));
        }
        return bestErr;
      };
      const errGrid = refs.map(({ s, ref }) => nearest(base.value.estimates, s, ref));
      const errFine = refs.map(({ s, ref }) => nearest(fine.estimates, s, ref));
      const found = errGrid.filter(Number.isFinite);
      const mEngine = Math.max(median(errEngine), 1e-16);
      console.log(
        row(
          [
            spec.name,
            starts.length,
            diagram.branches.length,
            points,
            fmt(best, 4),
            fmt((points / best) * 1000, 3),
            diagram.bifurcations.length,
            fmt(base.ms, 4),
            fmt(base.ms / best, 3),
            fmt(median(errEngine)),
            `${fmt(median(found))}${found.length < errGrid.length ? `(${errGrid.length - found.length}miss)` : ''}`,
            fmt(fineT.ms / best, 3),
            fmt(median(errFine.filter(Number.isFinite))),
            fmt(median(found) / mEngine, 2),
          ],
          widths,
        ),
      );
      if (spec.a.length === 3) {
        const fineErr = median(errFine.filter(Number.isFinite));
        console.log(`  3-node goal: whole diagram < 300 ms -> ${best < 300 ? 'met' : 'NOT met'} (${fmt(best, 4)} ms, best of ${runs}).`);
        console.log(`  precision goal (>= 1000x at equal or lower cost): the 10x grid costs ${fmt(fineT.ms / best, 2)}x the engine and is ${fmt(fineErr / mEngine, 2)}x less precise -> ${fineT.ms >= best && fineErr / mEngine >= 1000 ? 'met' : 'see table'}`);
      }
    }
    console.log('  err = median |p - reference| over the special points; grid cells missing a special point are counted as "miss".');
    console.log('  precision = median grid error / median engine error (engine error floored at 1e-16); cost x = grid time / engine time');
    console.log('  (grid: as many Newton solves as the engine has points; grid10: ten times finer).');
  },
};

/** Sparse ring with chords: node i links to i + 1 and i + 5 (mod k), one way; mean degree 4 counting both ends. */
const ringWithChords = (k: number) => Array.from({ length: k }, (_, i) => [{ from: i, to: (i + 1) % k }, { from: i, to: (i + 5) % k }]).flat();
/** Bands of a labelling in words: how many and which regimes, and how much of the sweep is labelled. */
function labelled(r: ReturnType<typeof labelRegimes>): string {
  const kinds = [...new Set(r.regimes.map((b) => b.regime))].join('/');
  const covered = r.regimes.filter((b) => (b.start ?? 'all-base') === 'all-base').reduce((q, b) => q + (b.to - b.from), 0);
  return `${r.regimes.length} bands (${kinds || 'none'}), ${fmt(100 * covered, 3)} % of the sweep labelled`;
}
const allToAll = (k: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k - i - 1 }, (_, j) => ({ from: i, to: i + j + 1, twoWay: true }))).flat();

/**
 * Issue 12, goals 1, 3 and 4: whole trace with bands (traceDiagram + labelRegimes, as the CLI's
 * `trace` runs them) against the grid sweep a modeler would script (4,000 parameter values, one
 * Newton solve per start and value on ml-matrix's LU, stopped where Newton fails or jumps), in the
 * same process: best of 3 after an untimed run of each side for the 4-node network, one run for the
 * larger ones after a warm-up on a 3-node network. Checks beside the
 * times: every saddle-node against Newton on the augmented system (refineFold, to 1e-10), every
 * starting equilibrium on a traced branch, every fold the grid detects matched by a traced saddle-node.
 */
const goalsSection: BenchSection = {
  title: 'Whole diagram with bands, issue 12 goals 1, 3 and 4: engine trace + labelling vs 4,000-value grid sweep (same process)',
  async run() {
    const warm = compileModelJson(cubicDoc('warm-up', 3, chain(3, false)));
    labelRegimes(warm, traceDiagram(warm));
    const threaded: { key: string; doc: unknown; settings: Partial<TraceSettings>; diagram: Diagram; ms: number }[] = [];
    const cases = [
      { key: '4-node all-to-all', doc: cubicDoc('4 nodes all-to-all (invented)', 4, allToAll(4)), goal: 0.3, grid: true },
      { key: '6-node one-way chain', doc: cubicDoc('6 nodes one-way chain (invented)', 6, chain(6, false)), goal: 0.3, grid: true },
      { key: '6-node two-way chain', doc: cubicDoc('6 nodes two-way chain (invented)', 6, chain(6, true)), goal: 0.3, grid: true },
      // The whole trace of 3^8 starts needs more than the default branch cap (maxBranches 400).
      { key: '8-node one-way chain', doc: cubicDoc('8 nodes one-way chain (invented)', 8, chain(8, false)), goal: 60_000, grid: false, settings: { maxBranches: 100_000 } },
      // Goal 4 (docs/numerics.md §12): beyond 3^8 patterns the restricted starts, no time goal; the
      // grid runs from the same starts at beta = 0. 20 nodes at the default startBudget with the branch
      // cap lifted (822 starts, k = 2); 32 nodes at a budget of 200 (k = 1, 98 starts).
      // BENCH_SKIP_LARGE=1 leaves both out.
      { key: '20-node sparse ring', doc: cubicDoc('20 nodes, ring with chords (invented)', 20, ringWithChords(20)), goal: Number.NaN, grid: true, restricted: true, settings: { maxBranches: 100_000 } },
      { key: '32-node sparse ring', doc: cubicDoc('32 nodes, ring with chords (invented)', 32, ringWithChords(32)), goal: Number.NaN, grid: true, restricted: true, settings: { maxBranches: 100_000, startBudget: 200 } },
    ] as { key: string; doc: ReturnType<typeof cubicDoc>; goal: number; grid: boolean; restricted?: boolean; settings?: Partial<TraceSettings> }[];
    const widths = [22, 6, 7, 8, 9, 9, 9, 9, 8, 8, 8, 10, 7, 7];
    console.log(row(['network', 'starts', 'branch', 'points', 'trace ms', 'label ms', 'whole ms', 'grid ms', 'trace x', 'label x', 'whole x', 'fold err', 'starts', 'grid'], widths));
    const lines: string[] = [];
    // BENCH_SKIP_8=1 leaves out the 8-node case (about 3 minutes on this machine).
    for (const c of cases.filter((q) => !(process.env.BENCH_SKIP_8 === '1' && q.key.startsWith('8')) && !(process.env.BENCH_SKIP_LARGE === '1' && q.restricted))) {
      const system = compileModelJson(c.doc);
      const starts = findStartingEquilibria(system, system.sweep.from, { ...defaultTraceSettings, from: 0, to: 1, ...(c.settings ?? {}) }).points;
      // Sub-second cases: one untimed run of each side, then the best of 3 (JIT warm-up would
      // otherwise dominate); the 6- and 8-node cases run once, after the 3-node warm-up above.
      const small = system.dimension <= 4;
      if (small) {
        labelRegimes(system, traceDiagram(system));
        if (c.grid) baseline(system, starts, 4000);
      }
      const reps = small ? 3 : 1;
      let tTrace = time(() => traceDiagram(system, c.settings ?? {}));
      for (let k = 1; k < reps; k++) {
        const t = time(() => traceDiagram(system, c.settings ?? {}));
        if (t.ms < tTrace.ms) tTrace = t;
      }
      const diagram = tTrace.value;
      if (!small && !c.restricted) threaded.push({ key: c.key, doc: c.doc, settings: c.settings ?? {}, diagram, ms: tTrace.ms });
      let tLabel = time(() => labelRegimes(system, diagram));
      for (let k = 1; k < reps; k++) {
        const t = time(() => labelRegimes(system, diagram));
        if (t.ms < tLabel.ms) tLabel = t;
      }
      const whole = tTrace.ms + tLabel.ms;
      const wholeCpu = tTrace.cpu + tLabel.cpu;
      const points = diagram.branches.reduce((q, b) => q + b.points.length, 0);
      // Special points to 1e-10: each saddle-node against Newton on F = 0, det J_x = 0.
      const folds = diagram.bifurcations.filter((b) => b.type === 'saddle-node');
      const foldErr = folds.reduce((m, b) => Math.max(m, Math.abs(b.p - refineFold(system, b))), 0);
      // No branch lost: every starting equilibrium is a point of a traced branch.
      const atFrom = diagram.branches.flatMap((b) => b.points.filter((q) => q.p === system.sweep.from));
      const onBranch = starts.filter((x0) => atFrom.some((q) => q.x.every((v, i) => Math.abs(v - x0[i]) < 1e-6 * (1 + Math.abs(x0[i]))))).length;
      let gridMs = Number.NaN;
      let gridCpu = Number.NaN;
      let gridMatched = '-';
      if (c.grid) {
        let g = time(() => baseline(system, starts, 4000));
        for (let k = 1; k < reps; k++) {
          const t = time(() => baseline(system, starts, 4000));
          if (t.ms < g.ms) g = t;
        }
        gridMs = g.ms;
        gridCpu = g.cpu;
        const dp = (system.sweep.to - system.sweep.from) / 4000;
        // A grid fold (Newton lost the branch) is matched by a traced saddle-node within two cells.
        const lostAt = g.value.estimates;
        const matched = lostAt.filter((e) => folds.some((b) => Math.abs(b.p - e.p) <= 2 * dp && b.x.every((v, i) => Math.abs(v - e.x[i]) < 0.3))).length;
        gridMatched = `${matched}/${lostAt.length}`;
      }
      console.log(row([c.key, starts.length, diagram.branches.length, points, fmt(tTrace.ms, 4), fmt(tLabel.ms, 4), fmt(whole, 4), fmt(gridMs, 4), fmt(tTrace.ms / gridMs, 3), fmt(tLabel.ms / gridMs, 3), fmt(whole / gridMs, 3), fmt(foldErr, 2), `${onBranch}/${starts.length}`, gridMatched], widths));
      const capped = diagram.diagnostics.some((d) => d.code === 'branch-cap' || d.code === 'starting-points-capped');
      const exact = foldErr <= 1e-10 && onBranch === starts.length && !capped;
      if (c.restricted) {
        const cov = diagram.coverage;
        const n = system.dimension;
        const none = !!cov && cov.starts + cov.farEnd + cov.grown.states < 3 ** n && cov.untraced === 0;
        lines.push(`  goal 4, ${c.key} (${n} nodes, mean degree 4): no enumeration of 3^${n} -> ${none ? 'met' : 'NOT met'} (${starts.length} starts${cov ? ` + ${cov.farEnd} at the sweep end + ${cov.grown.states} grown` : ''}; whole ${fmt(whole / 1000, 3)} s: trace ${fmt(tTrace.ms / 1000, 3)} s + labelling ${fmt(tLabel.ms / 1000, 3)} s; grid from the same starts ${fmt(gridMs / 1000, 3)} s, whole ${fmt(whole / gridMs, 3)}x; ${labelled(tLabel.value)})`);
        lines.push(`    coverage: ${cov ? cov.text : 'none (every pattern enumerated)'}`);
      } else if (c.grid) {
        lines.push(`  goal 1, ${c.key}: whole trace with bands <= ${c.goal}x the grid (wall time) -> ${whole / gridMs <= c.goal && exact ? 'met' : 'NOT met'} (wall ${fmt(whole / gridMs, 3)}x: trace ${fmt(tTrace.ms / gridMs, 3)}x + labelling ${fmt(tLabel.ms / gridMs, 3)}x; CPU ${fmt(wholeCpu / gridCpu, 3)}x: trace ${fmt(tTrace.cpu / gridCpu, 3)}x + labelling ${fmt(tLabel.cpu / gridCpu, 3)}x; folds to ${fmt(foldErr, 2)}, ${onBranch}/${starts.length} starts on branches${capped ? ', branch cap hit' : ''})`);
      } else {
        lines.push(`  goal 3, ${c.key} (${starts.length} starts, maxBranches lifted to ${c.settings?.maxBranches}): whole trace with bands < 60 s -> ${whole < c.goal && exact ? 'met' : 'NOT met'} (${fmt(whole / 1000, 3)} s: trace ${fmt(tTrace.ms / 1000, 3)} s + labelling ${fmt(tLabel.ms / 1000, 3)} s; folds to ${fmt(foldErr, 2)}, ${onBranch}/${starts.length} starts on branches${capped ? ', branch cap hit' : ''})`);
      }
    }
    for (const l of lines) console.log(l);
    await threadsLines(threaded);
    console.log('  x = engine wall time / grid wall time (< 1: the engine is faster); the verdicts use wall time, as the issue measured. CPU time of');
    console.log('  each side is printed beside it: on this shared machine wall ratios of the same code moved by up to 2x between runs under load;');
    console.log('  CPU time also counts the engine\'s garbage-collector threads, which the grid hardly uses, so it reads higher on a quiet machine.');
    console.log('  whole = trace + labelling; fold err = largest |p - p_ref| over the saddle-nodes;');
    console.log(`  starts = starting equilibria lying on a traced branch; grid = grid folds (Newton lost the branch) matched by a traced saddle-node. Load average ${loadavg()[0].toFixed(2)} on ${cpus().length} cores.`);
  },
};

/**
 * Issue 12, threads (docs/numerics.md §11): the traces timed above (one thread: the blocks one after
 * another in this thread) again on the trace pool's two threads, started once and warmed on a 4-node
 * network split in two blocks; the speed-up is the one-thread wall time over the two-thread one, and
 * "identical" compares the two diagrams as JSON text.
 */
async function threadsLines(cases: { key: string; doc: unknown; settings: Partial<TraceSettings>; diagram: Diagram; ms: number }[]): Promise<void> {
  if (cases.length === 0) return;
  const threads = Math.min(2, availableParallelism());
  const pool = new TracePool(threads);
  try {
    const warmDoc = cubicDoc('warm-up', 4, chain(4, false));
    await traceDiagramWith(compileModelJson(warmDoc), { traceBlocks: 2 }, {}, pool.runner(warmDoc));
    for (const c of cases) {
      const system = compileModelJson(c.doc);
      const t0 = performance.now();
      const d = await traceDiagramWith(system, c.settings, {}, pool.runner(c.doc));
      const ms = performance.now() - t0;
      const same = JSON.stringify(d) === JSON.stringify(c.diagram);
      console.log(`  threads, ${c.key}: trace on 1 thread ${fmt(c.ms / 1000, 3)} s, on ${threads} threads ${fmt(ms / 1000, 3)} s: ${fmt(c.ms / ms, 3)}x; diagrams ${same ? 'identical' : 'DIFFERENT'} (${d.branches.length} branches, ${d.bifurcations.length} special points)`);
    }
  } finally {
    await pool.close();
  }
}

/**
 * Coupling regimes (docs/regimes.md): time to label every band of the 2-, 3- and 6-node diagrams with
 * the pointwise labeller (labelRegimes: sampled labels, located crossovers, one escape graph per band),
 * against the midpoint labeller it replaced (labelRegimesByMidpoint: one full escape graph per
 * interval between cuts), in the same process on the same diagram. The bands differ by design (the
 * rule changed), so the table gives both band counts instead of an agreement column.
 */
const regimesSection: BenchSection = {
  title: 'Coupling regimes: pointwise labels with located edges vs the midpoint labeller before issue 10 (same process, one core)',
  run() {
    const widths = [28, 7, 6, 7, 7, 8, 8, 10, 10, 8, 6, 9];
    console.log(row(['network', 'points', 'cont', 'across', 'integr', 'decided', 'skipped', 'label ms', 'before ms', 'speed x', 'bands', 'bands bf'], widths));
    let sixNode: { label: number; before: number } | null = null;
    for (const spec of networks.filter((n) => n.a.length <= 6)) {
      const system = compileModelJson(networkDoc(spec));
      const diagram = traceDiagram(system);
      labelRegimes(system, diagram); labelRegimesByMidpoint(system, diagram); // warm-up (JIT), not timed
      const runs = 3;
      let best = Infinity;
      let bestBefore = Infinity;
      let found: ReturnType<typeof labelRegimes> | null = null;
      let before: ReturnType<typeof labelRegimesByMidpoint> | null = null;
      for (let k = 0; k < runs; k++) {
        // Alternate the two so that a change in machine load hits both alike.
        const t = time(() => labelRegimes(system, diagram));
        if (t.ms < best) { best = t.ms; found = t.value; }
        const b = time(() => labelRegimesByMidpoint(system, diagram));
        if (b.ms < bestBefore) { bestBefore = b.ms; before = b.value; }
      }
      const result = found!;
      console.log(row([spec.name, result.work.points, result.work.continued, result.work.acrossCuts, result.work.integrations, result.work.decided, result.work.skipped, fmt(best, 4), fmt(bestBefore, 4),
        fmt(bestBefore / best, 3), result.regimes.length, before!.regimes.length], widths));
      if (spec.a.length === 6) sixNode = { label: best, before: bestBefore };
    }
    console.log('  points = parameter values labelled; cont = of them, equilibria continued from a neighbour (across = from the other side of a');
    console.log('  saddle-node cut); integr = manifold branches integrated; decided = branch ends read off the order of the equilibria;');
    console.log('  skipped = saddles ruled out without integrating; speed x = before / label (> 1: the new labeller is faster).');
    console.log('  Best of 3 after one warm-up run of each. "before" runs on the same integrator and linear algebra as the new labeller.');
    if (sixNode) {
      console.log(`  goal (labelling of the 6-node network not slower than the midpoint labeller): ${sixNode.label <= sixNode.before ? 'met' : 'NOT met'} (${fmt(sixNode.label, 4)} ms vs ${fmt(sixNode.before, 4)} ms).`);
    }
  },
};

export const sections: BenchSection[] = [engineSection, goalsSection, regimesSection];
sections.push(onsetSection);
sections.push(barriersSection);
sections.push(noiseSection);
sections.push(mapsSection);
sections.push(storageSection(() => cubicDoc('6 nodes two-way chain (invented)', 6, chain(6, true))));

// BENCH_ONLY=regimes (a word of the title) runs only the matching sections.
const only = process.env.BENCH_ONLY?.toLowerCase();
for (const s of sections.filter((x) => !only || x.title.toLowerCase().includes(only))) {
  console.log(`\n== ${s.title}`);
  await s.run();
}
