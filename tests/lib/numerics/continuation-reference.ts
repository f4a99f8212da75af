/**
 * Reference outputs of the pseudo-arclength continuation, recorded before the one-parameter driver
 * (numerics/pseudo-arclength.ts, continueBranch) and the maps' curve driver were merged into one
 * driver (numerics/continue-curve.ts, issue 14 item 3). `computeReference()` runs the current code on
 * fixed inputs; scripts/make-continuation-reference.ts wrote its output, from the code before the
 * merge, to tests/fixtures/continuation-reference.json, and tests/lib/numerics/continuation-identity.test.ts
 * compares the current output with that file exactly (every float by its bit pattern).
 *
 * Three levels:
 *  - `branches`: continueBranch itself from every starting equilibrium of five small systems (both
 *    directions, default trace settings), plus runs that exercise its hooks and caps (stopAt, isCancelled,
 *    maxPoints, the state bound). Every point's y, t, det, unstable count, eigenvalues and Hopf test value.
 *  - `diagrams`: whole traceDiagram with default settings on networks of at most 4 nodes (far below the
 *    start counts where other work on the trace changes the order of work), as a SHA-256 digest per
 *    branch and of the special points (exact encodings, see `exact`).
 *  - `curves`: the maps' curves (saddle-node, pitchfork, Hopf) continued from fixed seed special points
 *    with fixed options, every point exactly; and whole traceMap digests of the symmetric pair and the
 *    3-lake chain (these also run traceDiagram for their seeds).
 * All models are invented (the 3-lake chain is the invented fixture tests/fixtures/engine-three-lakes.json).
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { defaultTraceSettings, findStartingEquilibria, traceDiagram } from '../../../src/lib/atlas/index.js';
import type { SpecialPoint } from '../../../src/lib/atlas/types.js';
import type { CompiledSystem } from '../../../src/lib/model/compiled-system.js';
import { compileModelJson } from '../../../src/lib/model/compile.js';
import { BorderedWorkspace, nullSpace, tangentAt } from '../../../src/lib/numerics/bordered.js';
import type { TracedPoint } from '../../../src/lib/numerics/branch-point-data.js';
import { continueBranch, type ContinuationHooks, type ContinuationOptions } from '../../../src/lib/numerics/pseudo-arclength.js';
import { normInf } from '../../../src/lib/numerics/vector.js';
import { compileTwoParameter, traceMap, type CurveOptions, type TwoParameterSystem } from '../../../src/lib/maps/index.js';
import { branchPointCurve, hopfCurve, saddleNodeCurve } from '../../../src/lib/maps/seeded-curves.js';

/**
 * Exact, JSON-safe encoding: a Float64Array becomes the hex string of its IEEE-754 bytes; a number
 * that JSON cannot round-trip (-0, NaN, ±Infinity) becomes a tagged string; other numbers stay
 * numbers (JSON.stringify writes the shortest decimal that parses back to the same double).
 */
export function exact(v: unknown): unknown {
  if (v instanceof Float64Array) return `f64:${Buffer.from(v.buffer, v.byteOffset, v.byteLength).toString('hex')}`;
  if (typeof v === 'number') {
    if (Object.is(v, -0)) return 'num:-0';
    if (!Number.isFinite(v)) return `num:${v}`;
    return v;
  }
  if (Array.isArray(v)) return v.map(exact);
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, exact(x)]));
  return v;
}

export const digest = (v: unknown): string => createHash('sha256').update(JSON.stringify(exact(v))).digest('hex');

/**
 * A list of points as its length, a digest of all of them (exact) and the first and last two in
 * full, so that a mismatch is detected anywhere and can be read at the ends (the whole lists are
 * several MB).
 */
export const sampled = <T>(pts: readonly T[]) => ({ count: pts.length, digest: digest(pts), head: pts.slice(0, 2), tail: pts.slice(-2) });

// ---- models (invented) ----

const cubicNode = {
  format: 'brinkmap/ode-1', name: 'one cubic element (invented)', variables: ['x'],
  rates: { x: 'p + x - x^3' }, parameters: { p: -1 }, sweep: { parameter: 'p', from: -1, to: 1 },
};
const cubicPair = (r: number) => ({
  format: 'brinkmap/network-1', name: 'symmetric cubic pair (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r } },
  nodes: [{ id: 'x1' }, { id: 'x2' }], links: [{ from: 'x1', to: 'x2', weight: 1, twoWay: true }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' }, sweep: { parameter: 'beta', from: 0, to: 1 },
});
const cubicAllToAll4 = {
  format: 'brinkmap/network-1', name: '4 cubic nodes all-to-all (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
  nodes: [{ id: 'n1', parameters: { r: 0.05 } }, { id: 'n2', parameters: { r: 0.08 } }, { id: 'n3', parameters: { r: 0.12 } }, { id: 'n4', parameters: { r: 0.15 } }],
  links: [[0, 1], [0, 2], [0, 3], [1, 2], [1, 3], [2, 3]].map(([a, b]) => ({ from: `n${a + 1}`, to: `n${b + 1}`, weight: 1, twoWay: true })),
  coupling: { parameter: 'beta', value: 0, term: 'source - target' }, sweep: { parameter: 'beta', from: 0, to: 1 },
};
const lorenz = {
  format: 'brinkmap/ode-1', name: 'Lorenz system', variables: ['x', 'y', 'z'],
  rates: { x: 'sigma * (y - x)', y: 'x * (rho - z) - y', z: 'x * y - b * z' },
  parameters: { sigma: 10, rho: 1, b: 8 / 3 }, sweep: { parameter: 'rho', from: 0, to: 30 },
};
/** x' = 1 + p x on p in [-1, 1]: x = -1/p grows without bound towards p = 0 (the state bound). */
const blowUp = {
  format: 'brinkmap/ode-1', name: 'x = -1/p (invented)', variables: ['x'],
  rates: { x: '1 + p * x' }, parameters: { p: -1 }, sweep: { parameter: 'p', from: -1, to: -1e-9 },
};
/** Bogdanov-Takens normal form x' = y, y' = b1 + b2 x + x^2 - x y (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., §8.4). */
const btNormalForm = {
  format: 'brinkmap/ode-1', name: 'Bogdanov-Takens normal form', variables: ['x', 'y'],
  rates: { x: 'y', y: 'b1 + b2 * x + x^2 + -1 * x * y' }, parameters: { b1: 0, b2: -0.5 }, sweep: { parameter: 'b1', from: -1, to: 1 },
};
const threeLakes = (): unknown => JSON.parse(readFileSync(new URL('../../fixtures/engine-three-lakes.json', import.meta.url), 'utf8')).model;

// ---- continueBranch ----

/** The options traceDiagram builds from the default settings (src/lib/atlas/trace-diagram.ts, copts). */
function branchOptions(system: CompiledSystem, starts: readonly Float64Array[]): ContinuationOptions {
  const s = { ...defaultTraceSettings, from: system.sweep.from, to: system.sweep.to };
  const width = Math.abs(s.to - s.from);
  let stateSize = 0;
  for (const q of starts) stateSize = Math.max(stateSize, normInf(q));
  const arcScale = Math.max(width, 1 + stateSize);
  return {
    lo: Math.min(s.from, s.to), hi: Math.max(s.from, s.to),
    initialStep: s.initialStep * arcScale, minStep: s.minStep * arcScale, maxStep: s.maxStep * arcScale,
    maxParameterStep: s.maxParameterStep * width, maxTurn: s.maxTurn, maxPoints: Math.max(2, Math.floor(s.maxPointsPerBranch / 2)),
    stateBound: s.stateBound, residualTolerance: s.residualTolerance, stepTolerance: s.stepTolerance, maxCorrectorIterations: s.maxCorrectorIterations,
  };
}

/** Start (y, t, det) at a starting equilibrium as traceDiagram sets it up (null space, orientation towards `to`). */
function startOf(system: CompiledSystem, x: Float64Array): { y: Float64Array; t: Float64Array; det: number } {
  const n = system.dimension;
  const ws = new BorderedWorkspace(n);
  const y = new Float64Array(n + 1);
  y.set(x);
  y[n] = system.sweep.from;
  const ns = nullSpace(system, y, ws);
  let v = ns.vectors[0];
  const dir = system.sweep.to >= system.sweep.from ? 1 : -1;
  if (v[n] * dir < 0) v = v.map((q) => -q);
  const tan = tangentAt(system, y, v, ws);
  return { y, t: tan.ok ? tan.tangent : v, det: tan.determinant };
}

const pointRecord = (q: TracedPoint) => ({ y: q.y, t: q.t, det: q.det, unstable: q.unstable, re: q.spectrum.re, im: q.spectrum.im, hopf: q.hopf.value });

function runBranch(system: CompiledSystem, y: Float64Array, t: Float64Array, det: number, o: ContinuationOptions, hooks: ContinuationHooks = {}) {
  const steps: number[] = [];
  const r = continueBranch(system, y, t, det, o, {
    ...hooks,
    onStep: (a, b) => {
      steps.push(a.y[a.y.length - 1], b.y[b.y.length - 1]);
      hooks.onStep?.(a, b);
    },
  });
  return { end: r.end, rejectedSteps: r.rejectedSteps, newtonIterations: r.newtonIterations, points: sampled(r.points.map(pointRecord)), onStep: digest(Float64Array.from(steps)) };
}

function branchCases(): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const models: [string, unknown][] = [['cubic-node', cubicNode], ['cubic-pair', cubicPair(0.1)], ['cubic-pair-r0', cubicPair(0)], ['three-lakes', threeLakes()], ['lorenz', lorenz]];
  for (const [name, doc] of models) {
    const system = compileModelJson(doc);
    const starts = findStartingEquilibria(system, system.sweep.from, { ...defaultTraceSettings, from: system.sweep.from, to: system.sweep.to }).points;
    const o = branchOptions(system, starts);
    out[name] = starts.slice(0, 8).map((x) => {
      const s = startOf(system, x);
      return { forward: runBranch(system, s.y, s.t, s.det, o), backward: runBranch(system, s.y, s.t.map((q) => -q), -s.det, o) };
    });
  }
  // Hooks and caps on the pair.
  const pair = compileModelJson(cubicPair(0.1));
  const pairStarts = findStartingEquilibria(pair, 0, { ...defaultTraceSettings, from: 0, to: 1 }).points;
  const o = branchOptions(pair, pairStarts);
  const s = startOf(pair, pairStarts[0]);
  const seen: number[] = [];
  out['hook-stopAt'] = runBranch(pair, s.y, s.t, s.det, o, {
    stopAt: (b, idx, arc) => {
      seen.push(idx, arc);
      return idx === 40 ? 'merged' : idx === 60 ? 'closed-loop' : null;
    },
  });
  out['hook-stopAt-seen'] = Float64Array.from(seen);
  let calls = 0;
  out['hook-cancelled'] = runBranch(pair, s.y, s.t, s.det, o, { isCancelled: () => ++calls > 25 });
  out['cap-points'] = runBranch(pair, s.y, s.t, s.det, { ...o, maxPoints: 17 });
  out['cap-parameter-step'] = runBranch(pair, s.y, s.t, s.det, { ...o, maxParameterStep: o.maxParameterStep / 7, maxPoints: 300 });
  out['min-step'] = runBranch(pair, s.y, s.t, s.det, { ...o, minStep: o.maxStep / 3 });
  const bu = compileModelJson(blowUp);
  const buStarts = findStartingEquilibria(bu, bu.sweep.from, { ...defaultTraceSettings, from: bu.sweep.from, to: bu.sweep.to }).points;
  const sb = startOf(bu, buStarts[0]);
  out['state-bound'] = runBranch(bu, sb.y, sb.t, sb.det, { ...branchOptions(bu, buStarts), stateBound: 50 });
  return out;
}

// ---- traceDiagram ----

function diagramCases(): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const models: [string, unknown][] = [['cubic-node', cubicNode], ['cubic-pair', cubicPair(0.1)], ['three-lakes', threeLakes()], ['four-all-to-all', cubicAllToAll4], ['lorenz', lorenz]];
  for (const [name, doc] of models) {
    const d = traceDiagram(compileModelJson(doc));
    out[name] = {
      branches: d.branches.length,
      points: d.branches.reduce((q, b) => q + b.points.length, 0),
      branchDigests: d.branches.map((b) => digest(b)),
      bifurcations: digest(d.bifurcations),
      diagnostics: digest(d.diagnostics),
      coverage: digest(d.coverage ?? null),
    };
  }
  return out;
}

// ---- the maps' curves ----

interface CurveSeed { readonly kind: 'saddle-node' | 'hopf' | 'pitchfork'; readonly sp: SpecialPoint; readonly b: number; readonly swept: 'first' | 'second' }

/** The curve options traceMap builds (src/lib/maps/trace-map.ts) for ranges a in [loA, hiA], b in [loB, hiB] and a given arclength scale. */
function curveOptions(loA: number, hiA: number, loB: number, hiB: number, scale: number): CurveOptions {
  return {
    lo: [loA, loB], hi: [hiA, hiB], initialStep: 2e-3 * scale, minStep: 1e-9 * scale, maxStep: 2e-2 * scale,
    maxParameterStep: [(hiA - loA) / 400, (hiB - loB) / 400], maxTurn: 0.15, maxPoints: 2500, stateBound: 1e6,
    residualTolerance: 1e-10, stepTolerance: 1e-10, maxCorrectorIterations: 8,
  };
}

/**
 * Seed special points, fixed here (values printed from the one-parameter engine's diagrams, not
 * references: they only have to be close to a curve for the curve's corrector to start).
 */
export interface CurveCase { readonly model: unknown; readonly second: string; readonly o: CurveOptions; readonly seeds: readonly CurveSeed[] }

function curveRun(sys: TwoParameterSystem, c: CurveCase) {
  return c.seeds.map((seed, i) => {
    const diagnostics: unknown[] = [];
    const fn = seed.kind === 'saddle-node' ? saddleNodeCurve : seed.kind === 'hopf' ? hopfCurve : branchPointCurve;
    const r = fn(sys, seed.sp, seed.b, seed.swept, c.o, i, diagnostics as never, () => false);
    if (r === null || r === 'no-symmetry') return { result: r, diagnostics };
    return { ys: sampled(r.traced.ys), curve: { ...r.traced.curve, points: sampled(r.traced.curve.points) }, found: r.found, diagnostics };
  });
}

/** Seeds are taken from the one-parameter diagrams once, when the reference is made, and stored with it. */
export function makeCurveCases(): Record<string, CurveCase> {
  const seedsOf = (sys: TwoParameterSystem, bs: number[], kinds: string[]): CurveSeed[] => {
    const seeds: CurveSeed[] = [];
    for (const b of bs) {
      for (const sp of traceDiagram(sys.atSecond(b)).bifurcations) {
        const kind = sp.type === 'saddle-node' ? 'saddle-node' : sp.type === 'hopf' ? 'hopf' : sp.type === 'pitchfork' ? 'pitchfork' : null;
        if (kind && kinds.includes(kind)) seeds.push({ kind, sp, b, swept: 'first' });
      }
    }
    return seeds.slice(0, 6);
  };
  const pair = cubicPair(0.1);
  const lakes = threeLakes();
  return {
    'pair-beta-r': { model: pair, second: 'r', o: curveOptions(0, 1, 0.02, 0.3, 1.4), seeds: seedsOf(compileTwoParameter(pair, { second: 'r' }), [0.1, 0.2], ['saddle-node', 'pitchfork']) },
    'lakes-beta-b': { model: lakes, second: 'b', o: curveOptions(0, 0.3, 0.5, 0.7, 2.5), seeds: seedsOf(compileTwoParameter(lakes, { second: 'b' }), [0.6], ['saddle-node']) },
    'bogdanov-takens-b1-b2': { model: btNormalForm, second: 'b2', o: curveOptions(-1, 1, -1, 1, 2), seeds: seedsOf(compileTwoParameter(btNormalForm, { second: 'b2' }), [-0.5], ['hopf', 'saddle-node']) },
    'lorenz-rho-sigma': { model: lorenz, second: 'sigma', o: curveOptions(0, 30, 8, 12, 30), seeds: seedsOf(compileTwoParameter(lorenz, { second: 'sigma' }), [10], ['hopf', 'pitchfork']) },
  };
}

function curveCases(cases: Record<string, CurveCase>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [name, c] of Object.entries(cases)) out[name] = curveRun(compileTwoParameter(c.model, { second: c.second }), c);
  return out;
}

function mapCases(): Record<string, unknown> {
  const maps: [string, unknown, string, number, number][] = [['pair-beta-r', cubicPair(0.1), 'r', 0.02, 0.3], ['lakes-beta-b', threeLakes(), 'b', 0.5, 0.7]];
  const out: Record<string, unknown> = {};
  for (const [name, doc, second, from, to] of maps) {
    const m = traceMap(compileTwoParameter(doc, { second }), { secondFrom: from, secondTo: to });
    out[name] = {
      curves: m.curves.map((c) => ({ id: c.id, type: c.type, points: c.points.length, ends: c.ends, digest: digest(c) })),
      points: digest(m.points),
      regions: digest(m.regions),
      diagnostics: digest(m.diagnostics),
    };
  }
  return out;
}

/** Everything, exactly encoded. `curveCases` comes from the stored reference when checking (so the seeds are fixed). */
export function computeReference(curveCasesIn?: Record<string, CurveCase>, parts: readonly string[] = ['branches', 'diagrams', 'curves', 'maps']) {
  const cc = curveCasesIn ?? makeCurveCases();
  return exact({
    ...(parts.includes('branches') ? { branches: branchCases() } : {}),
    ...(parts.includes('diagrams') ? { diagrams: diagramCases() } : {}),
    ...(parts.includes('curves') ? { curveCases: cc, curves: curveCases(cc) } : {}),
    ...(parts.includes('maps') ? { maps: mapCases() } : {}),
  }) as Record<string, unknown>;
}

/** Decode `exact` for the stored curve cases (their seeds and options are inputs). */
export function decode(v: unknown): unknown {
  if (typeof v === 'string') {
    if (v.startsWith('f64:')) {
      const b = Buffer.from(v.slice(4), 'hex');
      return new Float64Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength));
    }
    if (v === 'num:-0') return -0;
    if (v === 'num:NaN') return Number.NaN;
    if (v === 'num:Infinity') return Number.POSITIVE_INFINITY;
    if (v === 'num:-Infinity') return Number.NEGATIVE_INFINITY;
    return v;
  }
  if (Array.isArray(v)) return v.map(decode);
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, decode(x)]));
  return v;
}
