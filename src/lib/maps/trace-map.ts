/**
 * The two-parameter map of a model (docs/maps.md): saddle-node and pitchfork curves in (a, b) =
 * (swept parameter, second parameter), continued from the special points of one-parameter diagrams
 * at a few values of b, cusp points on the saddle-node curves, and the coupling-regime regions they
 * bound. Pure and synchronous; never throws on numerical trouble (the map is then partial and
 * `diagnostics` says why).
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { traceDiagram } from '../atlas/trace-diagram.js';
import type { Diagnostic, Diagram, SpecialPoint } from '../atlas/types.js';
import type { CompiledSystem } from '../model/compiled-system.js';
import { labelAt } from '../regimes/label-at.js';
import type { Regime } from '../regimes/types.js';
import { dot } from '../numerics/vector.js';
import { findSymmetry, SymmetricBranchPointSystem } from './branch-point-curve.js';
import { continueCurve, correctOn, startTangent, type CurveDirection, type CurveEnd, type CurveHooks, type CurveOptions, type CurvePoint, type ExtendedSystem } from './curve-continuation.js';
import { HopfSystem } from './hopf-curve.js';
import { SaddleNodeSystem } from './saddle-node-curve.js';
import type { TwoParameterSystem } from './two-parameter-system.js';

export interface MapSettings {
  /** Range of the swept (first) parameter; default the system's sweep. */
  from?: number;
  to?: number;
  /** Range of the second parameter (required). */
  secondFrom: number;
  secondTo: number;
  /** One-parameter diagrams are traced at this many evenly spaced values of the second parameter (ends included) to seed curves (default 5). */
  seeds: number;
  /** One-parameter diagrams in the second parameter at this many evenly spaced values of the first (ends included) also seed curves, e.g. folds that do not depend on the first parameter (default 3; 0: none). */
  crossSeeds: number;
  /** Regime sampling grid: columns in the first parameter x rows in the second (default 9 x 5); 0 x 0 skips the regions. */
  regionColumns: number;
  regionRows: number;
  /** Point cap per curve, both directions together (default 4000). */
  maxPointsPerCurve: number;
  /** Cap on curves (default 64). */
  maxCurves: number;
  /** Arclength steps as fractions of max(width a, width b, 1 + max|x|) (defaults as the one-parameter trace: 2e-3, 1e-9, 2e-2). */
  initialStep: number;
  minStep: number;
  maxStep: number;
  /** Largest change of either parameter per step, as a fraction of its range (default 1/400). */
  maxParameterStep: number;
  maxTurn: number;
  residualTolerance: number;
  stepTolerance: number;
  maxCorrectorIterations: number;
  stateBound: number;
}

export const defaultMapSettings = Object.freeze({
  seeds: 5,
  crossSeeds: 3,
  regionColumns: 9,
  regionRows: 5,
  maxPointsPerCurve: 4000,
  maxCurves: 64,
  initialStep: 2e-3,
  minStep: 1e-9,
  maxStep: 2e-2,
  maxParameterStep: 1 / 400,
  maxTurn: 0.15,
  residualTolerance: 1e-10,
  stepTolerance: 1e-10,
  maxCorrectorIterations: 8,
  stateBound: 1e6,
});

export type MapCurveType = 'saddle-node' | 'pitchfork' | 'hopf';

export interface MapCurvePoint {
  /** [first, second] parameter values. */
  readonly p: [number, number];
  readonly x: number[];
  /** Hopf curves: the imaginary part ω of the critical pair ±iω. */
  readonly frequency?: number;
}

export interface MapCurve {
  readonly id: string;
  readonly type: MapCurveType;
  readonly points: MapCurvePoint[];
  readonly ends: [CurveEnd, CurveEnd];
  /** The one-parameter special point it was continued from (at first = p, second = second), and which parameter that diagram swept. */
  readonly seed: { readonly second: number; readonly p: number; readonly x: number[]; readonly swept: 'first' | 'second' };
}

export type MapPointType = 'cusp' | 'bogdanov-takens' | 'saddle-node-meets-pitchfork';

export interface MapPoint {
  readonly id: string;
  readonly type: MapPointType;
  readonly p: [number, number];
  readonly x: number[];
  /** The curves it was found on (a Bogdanov-Takens point lies on a saddle-node and a Hopf curve). */
  readonly curves: string[];
  readonly evidence: { readonly reason: string; readonly [key: string]: unknown };
  /** Set for doubtful or degenerate cases. */
  note?: string;
}

export interface MapRegion {
  readonly id: string;
  /** The coupling regime of the samples in the region (null: no label there, see reason). */
  readonly regime: Regime | null;
  readonly reason: string;
  /** Grid samples [first, second] in the region. */
  readonly samples: [number, number][];
  /** Curves crossed between a sample of this region and a neighbouring sample of another region. */
  readonly boundedBy: string[];
  /** Neighbouring pairs with different labels and no located curve between them (e.g. a saddle connection or crossover, not continued here). */
  readonly unlocatedEdges: number;
}

export interface TwoParameterMap {
  readonly parameters: [string, string];
  readonly ranges: { readonly first: [number, number]; readonly second: [number, number] };
  readonly curves: MapCurve[];
  readonly points: MapPoint[];
  readonly regions: MapRegion[];
  readonly diagnostics: Diagnostic[];
  readonly settings: Record<string, unknown>;
}

export interface MapHooks {
  onProgress?: (fraction: number, phrase: string) => void;
  isCancelled?: () => boolean;
}

interface Traced {
  readonly curve: MapCurve;
  /** Extended-space points (for the cusp test and the seed de-duplication). */
  readonly ys: Float64Array[];
}

const linspace = (lo: number, hi: number, k: number) => (k <= 1 ? [(lo + hi) / 2] : Array.from({ length: k }, (_, i) => lo + ((hi - lo) * i) / (k - 1)));

export function traceMap(sys: TwoParameterSystem, settings: Partial<MapSettings> & { secondFrom: number; secondTo: number }, hooks: MapHooks = {}): TwoParameterMap {
  const s = { ...defaultMapSettings, from: sys.sweep.from, to: sys.sweep.to, ...Object.fromEntries(Object.entries(settings).filter(([, v]) => v !== undefined)) } as Required<MapSettings>;
  const n = sys.dimension;
  const diagnostics: Diagnostic[] = [];
  const traced: Traced[] = [];
  const points: MapPoint[] = [];
  const loA = Math.min(s.from, s.to);
  const hiA = Math.max(s.from, s.to);
  const loB = Math.min(s.secondFrom, s.secondTo);
  const hiB = Math.max(s.secondFrom, s.secondTo);
  const result = (regions: MapRegion[]): TwoParameterMap => ({
    parameters: [sys.parameters[0], sys.parameters[1]],
    ranges: { first: [s.from, s.to], second: [s.secondFrom, s.secondTo] },
    curves: traced.map((t) => t.curve),
    points,
    regions,
    diagnostics,
    settings: { ...s },
  });
  const bad = checkSettings(s);
  if (bad) {
    diagnostics.push({ level: 'error', code: 'invalid-settings', message: bad });
    return result([]);
  }
  let cancelled = false;
  const isCancelled = () => (cancelled ||= Boolean(hooks.isCancelled?.()));

  // 1. One-parameter diagrams at the seed values (and at the region rows: the same diagrams are reused).
  const rows = s.regionRows > 0 && s.regionColumns > 0 ? linspace(loB, hiB, s.regionRows) : [];
  const seedValues = [...new Set([...linspace(loB, hiB, s.seeds), ...rows, ...(sys.secondValue >= loB && sys.secondValue <= hiB ? [sys.secondValue] : [])])].sort((x, y) => x - y);
  const diagrams = new Map<number, { system: CompiledSystem; diagram: Diagram }>();
  seedValues.forEach((b, i) => {
    if (isCancelled()) return;
    hooks.onProgress?.((0.4 * i) / seedValues.length, `one-parameter diagram at ${sys.parameters[1]} = ${b}`);
    const system = sys.atSecond(b, { from: s.from, to: s.to });
    const diagram = traceDiagram(system, {}, { isCancelled });
    for (const d of diagram.diagnostics) if (d.level !== 'info') diagnostics.push({ ...d, message: `${sys.parameters[1]} = ${b}: ${d.message}` });
    diagrams.set(b, { system, diagram });
  });

  // Cross seeds: diagrams in the second parameter at a few values of the first.
  const crossValues = s.crossSeeds > 0 ? linspace(loA, hiA, s.crossSeeds) : [];
  const crossDiagrams: { a: number; diagram: Diagram }[] = [];
  crossValues.forEach((a, i) => {
    if (isCancelled()) return;
    hooks.onProgress?.(0.3 + (0.1 * i) / crossValues.length, `one-parameter diagram in ${sys.parameters[1]} at ${sys.parameters[0]} = ${a}`);
    // The engine starts its branches at `from`; with no equilibrium there, sweep the other way.
    // Cross seeds only add seeds, so their trouble is reported as info.
    let diagram: Diagram | null = null;
    for (const [from, to] of [[s.secondFrom, s.secondTo], [s.secondTo, s.secondFrom]]) {
      try {
        diagram = traceDiagram(sys.atFirst(a, { from, to }), {}, { isCancelled });
      } catch (e) {
        diagram = null;
        diagnostics.push({ level: 'info', code: 'cross-seed-failed', message: `${sys.parameters[0]} = ${a}: no diagram in ${sys.parameters[1]} (${e instanceof Error ? e.message : String(e)})` });
        break;
      }
      if (diagram.branches.length > 0) break;
    }
    if (!diagram) return;
    for (const d of diagram.diagnostics) if (d.level !== 'info') diagnostics.push({ ...d, level: 'info', message: `${sys.parameters[0]} = ${a} (seed diagram in ${sys.parameters[1]}): ${d.message}` });
    crossDiagrams.push({ a, diagram });
  });
  // Every seed as (special point at first = sp.p, second = b), and which parameter its diagram swept.
  const seedList: { sp: SpecialPoint; b: number; swept: 'first' | 'second' }[] = [];
  for (const [b, { diagram }] of diagrams) for (const sp of diagram.bifurcations) seedList.push({ sp, b, swept: 'first' });
  for (const { a, diagram } of crossDiagrams) for (const sp of diagram.bifurcations) seedList.push({ sp: { ...sp, p: a }, b: sp.p, swept: 'second' });

  // 2. Curves from every saddle-node and branch point of those diagrams.
  const width = Math.max(hiA - loA, hiB - loB);
  let scale = width;
  for (const { diagram } of diagrams.values()) for (const bp of diagram.bifurcations) for (const v of bp.x) scale = Math.max(scale, 1 + Math.abs(v));
  const o: CurveOptions = {
    lo: [loA, loB],
    hi: [hiA, hiB],
    initialStep: s.initialStep * scale,
    minStep: s.minStep * scale,
    maxStep: s.maxStep * scale,
    maxParameterStep: [s.maxParameterStep * (hiA - loA), s.maxParameterStep * (hiB - loB)],
    maxTurn: s.maxTurn,
    maxPoints: Math.max(2, Math.floor(s.maxPointsPerCurve / 2)),
    stateBound: s.stateBound,
    residualTolerance: s.residualTolerance,
    stepTolerance: s.stepTolerance,
    maxCorrectorIterations: s.maxCorrectorIterations,
  };
  let noSymmetry = 0;
  {
    for (const [k, { sp, b, swept }] of seedList.entries()) {
      if (isCancelled()) break;
      hooks.onProgress?.(0.4 + (0.4 * k) / seedList.length, 'continuing curves');
      const type: MapCurveType | null = sp.type === 'saddle-node' ? 'saddle-node' : sp.type === 'hopf' ? 'hopf' : sp.type === 'pitchfork' || sp.type === 'transcritical' ? 'pitchfork' : null;
      if (type === null) continue;
      if (onTraced(traced, type, sp.x, sp.p, b)) continue;
      if (traced.length >= s.maxCurves) {
        diagnostics.push({ level: 'warning', code: 'curve-cap', message: `stopped at ${s.maxCurves} curves (maxCurves); special points of the seed diagrams were left out` });
        break;
      }
      const t = type === 'saddle-node' ? saddleNodeCurve(sys, sp, b, swept, o, traced.length, diagnostics, isCancelled)
        : type === 'hopf' ? hopfCurve(sys, sp, b, swept, o, traced.length, diagnostics, isCancelled)
          : branchPointCurve(sys, sp, b, swept, o, traced.length, diagnostics, isCancelled);
      if (t === 'no-symmetry') noSymmetry++;
      else if (t) {
        traced.push(t.traced);
        for (const c of t.found) addPoint(points, c);
      }
    }
  }
  // A saddle-node curve through a point found on a pitchfork curve is listed with it.
  for (const q of points) {
    if (q.type !== 'saddle-node-meets-pitchfork') continue;
    for (const t of traced) {
      if (t.curve.type === 'saddle-node' && !q.curves.includes(t.curve.id) && onTraced([t], 'saddle-node', q.x, q.p[0], q.p[1])) q.curves.push(t.curve.id);
    }
  }
  // A cusp at the same place as a Bogdanov-Takens point is not a cusp: at a double zero the cusp test
  // p.B(v,v)/2 and the test p.v can vanish together (e.g. a triangular Jacobian, where both carry the
  // same factor); a2 = (p.B/2)/(p.v) is then 0/0. The cusp is dropped and the point says so.
  for (let i = points.length - 1; i >= 0; i--) {
    const q = points[i];
    if (q.type !== 'cusp') continue;
    const bt = points.find((o) => o.type === 'bogdanov-takens' && Math.max(Math.abs(o.p[0] - q.p[0]), Math.abs(o.p[1] - q.p[1])) < 1e-6 * (1 + Math.abs(q.p[0]) + Math.abs(q.p[1])) && o.x.every((v, k) => Math.abs(v - q.x[k]) < 1e-5));
    if (!bt) continue;
    (bt.evidence as Record<string, unknown>).cuspTestAlsoVanishes = q.evidence;
    points.splice(i, 1);
  }
  // A double zero eigenvalue with no Hopf curve ending there: the generic Bogdanov-Takens unfolding
  // (Kuznetsov §8.4) has one; without it the point may be degenerate (e.g. two folds of a one-way
  // chain, whose triangular Jacobian has only real eigenvalues) or its Hopf curve was not seeded.
  for (const q of points) {
    if (q.type !== 'bogdanov-takens') continue;
    const hopf = q.curves.some((id) => traced.find((t) => t.curve.id === id)?.curve.type === 'hopf');
    if (!hopf) q.note = 'double zero eigenvalue, but no Hopf curve of this map ends here: either degenerate (e.g. a triangular Jacobian with real eigenvalues only) or the Hopf curve was not seeded';
  }
  if (noSymmetry > 0) {
    diagnostics.push({ level: 'info', code: 'branch-point-not-continued', message: `${noSymmetry} branch point(s) of the seed diagrams were not continued: no permutation symmetry of the variables explains them (only symmetry-breaking pitchforks are continued as curves)` });
  }
  if (cancelled) diagnostics.push({ level: 'warning', code: 'cancelled', message: 'the map was cancelled; curves and regions are partial' });

  // 3. Regions.
  hooks.onProgress?.(0.8, 'regime regions');
  const regions = cancelled || rows.length === 0 ? [] : regimeRegions(diagrams, rows, linspace(loA, hiA, s.regionColumns), traced.map((t) => t.curve), diagnostics, isCancelled);
  hooks.onProgress?.(1, 'done');
  return result(regions);
}

function checkSettings(s: Required<MapSettings>): string | null {
  if (!Number.isFinite(s.from) || !Number.isFinite(s.to) || s.from === s.to) return `from/to: expected two different finite numbers (got ${s.from}, ${s.to})`;
  if (!Number.isFinite(s.secondFrom) || !Number.isFinite(s.secondTo) || s.secondFrom === s.secondTo) return `secondFrom/secondTo: expected two different finite numbers (got ${s.secondFrom}, ${s.secondTo})`;
  if (!Number.isInteger(s.crossSeeds) || s.crossSeeds < 0 || s.crossSeeds > 100) return 'crossSeeds: expected an integer from 0 to 100';
  for (const key of ['seeds', 'maxPointsPerCurve', 'maxCurves'] as const) if (!Number.isInteger(s[key]) || s[key] < 1 || s[key] > 100_000) return `${key}: expected an integer from 1 to 100000`;
  for (const key of ['regionColumns', 'regionRows'] as const) if (!Number.isInteger(s[key]) || s[key] < 0 || s[key] > 200) return `${key}: expected an integer from 0 to 200`;
  return null;
}

/** Smallest right singular vector of J_x (unit), by ml-matrix SVD. */
function nullVector(j: Float64Array, n: number): Float64Array {
  const svd = new SingularValueDecomposition(Matrix.from1DArray(n, n, j), { computeLeftSingularVectors: false });
  const d = svd.diagonal;
  let imin = 0;
  for (let i = 1; i < n; i++) if (d[i] < d[imin]) imin = i;
  const v = new Float64Array(n);
  for (let r = 0; r < n; r++) v[r] = svd.rightSingularVectors.get(r, imin);
  return v;
}

/** Is (x, a, b) within 1e-6 (1 + |y|) + 0.05 |segment| of a traced curve of this type (state and parameters)? */
function onTraced(traced: readonly Traced[], type: MapCurveType, x: readonly number[], a: number, b: number): boolean {
  const q = [...x, a, b];
  let size = 0;
  for (const v of q) size = Math.max(size, Math.abs(v));
  for (const t of traced) {
    if (t.curve.type !== type) continue;
    const pts = t.curve.points;
    for (let i = 0; i + 1 < pts.length; i++) {
      const u = [...pts[i].x, ...pts[i].p];
      const w = [...pts[i + 1].x, ...pts[i + 1].p];
      let uw = 0;
      let uq = 0;
      for (let k = 0; k < q.length; k++) {
        uw += (w[k] - u[k]) ** 2;
        uq += (q[k] - u[k]) * (w[k] - u[k]);
      }
      const lam = uw > 0 ? Math.min(1, Math.max(0, uq / uw)) : 0;
      let d2 = 0;
      for (let k = 0; k < q.length; k++) d2 += (q[k] - u[k] - lam * (w[k] - u[k])) ** 2;
      if (Math.sqrt(d2) <= 1e-6 * (1 + size) + 0.05 * Math.sqrt(uw)) return true;
    }
  }
  return false;
}

/** Trace a curve both ways from y0 and join the halves: [minus reversed, y0, plus]. */
function bothWays(
  ext: ExtendedSystem & { c: Float64Array }, y0: Float64Array, t0: Float64Array, o: CurveOptions, hooks: CurveHooks,
): { pts: CurvePoint[]; ends: [CurveEnd, CurveEnd] } {
  const c0 = Float64Array.from(ext.c);
  const plus = continueCurve(ext, y0, t0, o, hooks);
  let minus: CurveDirection;
  if (plus.end === 'closed-loop') minus = { points: [plus.points[0]], end: 'closed-loop', rejectedSteps: 0, newtonIterations: 0 };
  else {
    ext.c.set(c0);
    minus = continueCurve(ext, y0, Float64Array.from(t0, (v) => -v), o, hooks);
  }
  return { pts: [...minus.points.slice(1).reverse(), ...plus.points], ends: [minus.end, plus.end] };
}

function noteEnd(end: CurveEnd, id: string, diagnostics: Diagnostic[]): void {
  if (end === 'parameter-bound' || end === 'closed-loop' || end === 'cancelled' || end === 'bogdanov-takens') return;
  diagnostics.push({ level: 'warning', code: end, message: `curve ${id} ended early (${end}); it may continue beyond the last point shown` });
}

/** Polish a seed on an extended system with the parameter its diagram did not sweep fixed, then its tangent; null (with a diagnostic) when singular. */
function startOn(
  ext: ExtendedSystem, y0: Float64Array, b: number, swept: 'first' | 'second', what: string, diagnostics: Diagnostic[], sp: SpecialPoint, sys: TwoParameterSystem,
): { y: Float64Array; t: Float64Array } | null {
  const N = ext.size;
  // Fix the parameter the seed diagram did not sweep (the last two entries of y are a, b).
  const fixed = swept === 'first' ? N - 1 : N - 2;
  const e = new Float64Array(N);
  e[fixed] = 1;
  const polished = correctOn(ext, y0, e, y0[fixed], { residualTolerance: 1e-12, stepTolerance: 1e-12, maxIterations: 20, earlyStep: 1e-12 });
  const start = polished.converged || polished.residual < 1e-10 ? polished.y : null;
  const tangent = start ? startTangent(ext, start) : null;
  if (!start || !tangent || !(tangent.next > 1e-8 * tangent.largest)) {
    diagnostics.push({ level: 'warning', code: 'curve-start-failed', p: sp.p, message: `${what} at ${sys.parameters[0]} = ${sp.p}, ${sys.parameters[1]} = ${b}: its extended system is ${start ? 'singular there (a degenerate point)' : 'not solved there'}; no curve continued` });
    return null;
  }
  // Orient the first direction towards increasing second parameter (then first), for reproducible output.
  const t = tangent.t;
  if (t[N - 1] < 0 || (t[N - 1] === 0 && t[N - 2] < 0)) for (let i = 0; i < N; i++) t[i] = -t[i];
  return { y: start, t };
}

interface Located {
  readonly y: Float64Array;
  readonly value: number;
  readonly converged: boolean;
}

/**
 * Zero of a test function between two consecutive curve points ya, yb (values fa, fb of opposite
 * sign): the Illinois variant of regula falsi (Dahlquist & Björck, Numerical Methods, §6.2) on the
 * chord parameter u in [0, 1]; the trial point solves the extended system with
 * d . (y - (ya + u (yb - ya))) = 0, d the unit chord (residual 1e-12). Stops when the bracket is
 * shorter than 1e-13 (1 + |y|) along the chord or the value is exactly 0; cap 100 iterations.
 */
function locateOnChord(ext: ExtendedSystem, ya: Float64Array, yb: Float64Array, fa: number, fb: number, test: (y: Float64Array) => number): Located | null {
  const N = ya.length;
  const chord = new Float64Array(N);
  let len = 0;
  for (let k = 0; k < N; k++) {
    chord[k] = yb[k] - ya[k];
    len += chord[k] ** 2;
  }
  len = Math.sqrt(len);
  if (!(len > 0)) return null;
  for (let k = 0; k < N; k++) chord[k] /= len;
  let size = 1;
  for (let k = 0; k < N; k++) size = Math.max(size, 1 + Math.abs(ya[k]));
  let lo = 0;
  let hi = 1;
  let flo = fa;
  let fhi = fb;
  let side = 0;
  let best: Located | null = null;
  for (let it = 0; it < 100; it++) {
    const u = (lo * fhi - hi * flo) / (fhi - flo);
    const g = new Float64Array(N);
    for (let k = 0; k < N; k++) g[k] = ya[k] + u * (yb[k] - ya[k]);
    const r = correctOn(ext, g, chord, dot(chord, g), { residualTolerance: 1e-12, stepTolerance: 1e-13, maxIterations: 20, earlyStep: 1e-13, maxDisplacement: len });
    if (!r.converged && !(r.residual < 1e-11)) break;
    const value = test(r.y);
    if (!Number.isFinite(value)) break;
    best = { y: r.y, value, converged: false };
    if (value === 0 || (hi - lo) * len < 1e-13 * size) return { ...best, converged: true };
    if (Math.sign(value) === Math.sign(flo)) {
      lo = u;
      flo = value;
      if (side === -1) fhi /= 2;
      side = -1;
    } else {
      hi = u;
      fhi = value;
      if (side === 1) flo /= 2;
      side = 1;
    }
  }
  return best;
}

/** Add a codimension-two point, or merge it into one of the same type at the same place (|Δp| < 1e-6 (1 + |p|), |Δx| < 1e-5). */
function addPoint(points: MapPoint[], c: Omit<MapPoint, 'id'>): void {
  const same = points.find((q) => q.type === c.type
    && Math.max(Math.abs(q.p[0] - c.p[0]), Math.abs(q.p[1] - c.p[1])) < 1e-6 * (1 + Math.abs(c.p[0]) + Math.abs(c.p[1]))
    && q.x.every((v, i) => Math.abs(v - c.x[i]) < 1e-5));
  if (same) {
    for (const id of c.curves) if (!same.curves.includes(id)) same.curves.push(id);
    const ev = same.evidence as Record<string, unknown>;
    const also = (ev.alsoOn as unknown[] | undefined) ?? [];
    ev.alsoOn = [...also, { curves: c.curves, ...c.evidence }];
    return;
  }
  const prefix = c.type === 'cusp' ? 'cusp' : c.type === 'bogdanov-takens' ? 'bt' : 'snp';
  points.push({ id: `${prefix}${points.filter((q) => q.type === c.type).length + 1}`, ...c });
}

/** Left null vector of J (unit), from the SVD of J^T. */
function leftNullVector(j: Float64Array, n: number): Float64Array {
  const t = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) t[k * n + i] = j[i * n + k];
  return nullVector(t, n);
}

function saddleNodeCurve(
  sys: TwoParameterSystem, sp: SpecialPoint, b: number, swept: 'first' | 'second', o: CurveOptions, index: number, diagnostics: Diagnostic[], isCancelled: () => boolean,
): { traced: Traced; found: Omit<MapPoint, 'id'>[] } | null {
  const n = sys.dimension;
  const x = Float64Array.from(sp.x);
  const j = sys.jacobian(x, sp.p, b, new Float64Array(n * n));
  const v0 = nullVector(j, n);
  const ext = new SaddleNodeSystem(sys, v0);
  const y0 = new Float64Array(2 * n + 2);
  y0.set(x, 0);
  y0.set(v0, n);
  y0[2 * n] = sp.p;
  y0[2 * n + 1] = b;
  const start = startOn(ext, y0, b, swept, 'saddle-node', diagnostics, sp, sys);
  if (!start) return null;
  const { pts, ends } = bothWays(ext, start.y, start.t, o, { isCancelled });
  const id = `sn${index + 1}`;
  const ys = pts.map((p) => p.y);
  const curve: MapCurve = {
    id,
    type: 'saddle-node',
    points: ys.map((y) => ({ p: [y[2 * n], y[2 * n + 1]], x: Array.from(y.subarray(0, n)) })),
    ends,
    seed: { second: b, p: sp.p, x: [...sp.x], swept },
  };
  for (const end of ends) noteEnd(end, id, diagnostics);
  return { traced: { curve, ys }, found: foldPoints(ext, ys, id, diagnostics) };
}

/**
 * Cusp and Bogdanov-Takens points on a saddle-node curve: sign changes of the two test functions of
 * SaddleNodeSystem.foldTests between consecutive points (evaluated in curve order, carrying the
 * border w0 along so that their signs are continuous), located by locateOnChord.
 */
function foldPoints(ext: SaddleNodeSystem, ys: readonly Float64Array[], curve: string, diagnostics: Diagnostic[]): Omit<MapPoint, 'id'>[] {
  const n = ext.n;
  if (ys.length < 2) return [];
  const found: Omit<MapPoint, 'id'>[] = [];
  const j0 = ext.sys.jacobian(ys[0].slice(0, n), ys[0][2 * n], ys[0][2 * n + 1], new Float64Array(n * n));
  let w0 = leftNullVector(j0, n);
  const tests: ({ cusp: number; bt: number; a2: number } | null)[] = [];
  const borders: Float64Array[] = [];
  for (const y of ys) {
    borders.push(w0);
    const t = ext.foldTests(y, w0);
    tests.push(t);
    if (t) {
      const norm = Math.hypot(...t.p);
      w0 = Float64Array.from(t.p, (v) => v / norm);
    }
  }
  for (let i = 0; i + 1 < ys.length; i++) {
    const ta = tests[i];
    const tb = tests[i + 1];
    if (!ta || !tb) continue;
    for (const kind of ['cusp', 'bt'] as const) {
      if (ta[kind] === 0 || Math.sign(ta[kind]) === Math.sign(tb[kind])) continue;
      // c on the first point's null vector so that both ends satisfy c . v ~ 1.
      const ya = Float64Array.from(ys[i]);
      let sq = 0;
      for (let k = 0; k < n; k++) sq += ya[n + k] * ya[n + k];
      for (let k = 0; k < n; k++) ext.c[k] = ya[n + k] / sq;
      const w = borders[i];
      const hit = locateOnChord(ext, ya, ys[i + 1], ta[kind], tb[kind], (y) => ext.foldTests(y, w)?.[kind] ?? Number.NaN);
      if (!hit) {
        diagnostics.push({ level: 'warning', code: 'locate-failed', message: `curve ${curve}: a ${kind === 'cusp' ? 'cusp' : 'Bogdanov–Takens'} test function changes sign between two points but no point between them could be computed; not reported` });
        continue;
      }
      if (!hit.converged) diagnostics.push({ level: 'warning', code: 'locate-not-converged', message: `curve ${curve}: the location stopped before the bracket was below tolerance` });
      const y = hit.y;
      found.push(kind === 'cusp'
        ? {
          type: 'cusp', p: [y[2 * n], y[2 * n + 1]], x: Array.from(y.subarray(0, n)), curves: [curve],
          evidence: {
            reason: `the fold's quadratic coefficient a2 = w·B(v,v)/2 changes sign along the saddle-node curve (${ta.a2.toPrecision(3)} before, ${tb.a2.toPrecision(3)} after): the curve turns back in the parameter plane, where two fold branches meet`,
            testFunction: 'p·B(v,v)/2 with J v = 0, |v| = 1, Jᵀp = 0 (a2 = that / p·v)',
            before: ta.a2, after: tb.a2, atPoint: hit.value, converged: hit.converged,
          },
        }
        : {
          type: 'bogdanov-takens', p: [y[2 * n], y[2 * n + 1]], x: Array.from(y.subarray(0, n)), curves: [curve],
          evidence: {
            reason: `the left and right null vectors of the Jacobian become orthogonal along the saddle-node curve (w·v = ${ta.bt.toPrecision(3)} before, ${tb.bt.toPrecision(3)} after): the zero eigenvalue becomes double (a Jordan block), where a Hopf curve ends on the fold curve`,
            testFunction: 'w·v with J v = 0, Jᵀw = 0, |v| = 1',
            before: ta.bt, after: tb.bt, atPoint: hit.value, converged: hit.converged,
          },
        });
    }
  }
  return found;
}

/**
 * Hopf curve from a Hopf point of a seed diagram (frequency ω): v and c span the null space of
 * J² + ω² I (the two smallest right singular vectors, ml-matrix SVD), κ = ω². Each direction stops
 * where κ changes sign (the Hopf curve ends in a Bogdanov-Takens point and goes on as neutral
 * saddles, which are not Hopf points); that point is located (test κ) and the κ < 0 end point dropped.
 */
function hopfCurve(
  sys: TwoParameterSystem, sp: SpecialPoint, b: number, swept: 'first' | 'second', o: CurveOptions, index: number, diagnostics: Diagnostic[], isCancelled: () => boolean,
): { traced: Traced; found: Omit<MapPoint, 'id'>[] } | null {
  const n = sys.dimension;
  const omega = sp.frequency;
  if (omega === undefined || !(omega > 0)) return null;
  const x = Float64Array.from(sp.x);
  const j = sys.jacobian(x, sp.p, b, new Float64Array(n * n));
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) {
      let s = 0;
      for (let l = 0; l < n; l++) s += j[i * n + l] * j[l * n + k];
      m[i * n + k] = s + (i === k ? omega * omega : 0);
    }
  }
  const svd = new SingularValueDecomposition(Matrix.from1DArray(n, n, m), { computeLeftSingularVectors: false });
  const order = svd.diagonal.map((_, i) => i).sort((p, q) => svd.diagonal[p] - svd.diagonal[q]);
  const v0 = Float64Array.from({ length: n }, (_, r) => svd.rightSingularVectors.get(r, order[0]));
  const c0 = Float64Array.from({ length: n }, (_, r) => svd.rightSingularVectors.get(r, order[1]));
  const ext = new HopfSystem(sys, c0);
  const y0 = new Float64Array(2 * n + 3);
  y0.set(x, 0);
  y0.set(v0, n);
  y0[2 * n] = omega * omega;
  y0[2 * n + 1] = sp.p;
  y0[2 * n + 2] = b;
  ext.rebase(y0);
  const start = startOn(ext, y0, b, swept, 'Hopf point', diagnostics, sp, sys);
  if (!start) return null;
  const stopAfter = (pa: CurvePoint, pb: CurvePoint) => pa.y[2 * n] > 0 && !(pb.y[2 * n] > 0);
  const { pts, ends } = bothWays(ext, start.y, start.t, o, { isCancelled, stopAfter });
  const id = `h${index + 1}`;
  const found: Omit<MapPoint, 'id'>[] = [];
  const ys = pts.map((p) => p.y);
  // Replace each stopped end (κ <= 0) by the located Bogdanov-Takens point.
  for (const [side, end] of ends.entries()) {
    if (end !== 'bogdanov-takens') continue;
    const outer = side === 0 ? 0 : ys.length - 1;
    const inner = side === 0 ? 1 : ys.length - 2;
    const ya = ys[inner];
    const yb = ys[outer];
    ext.rebase(ya);
    const hit = locateOnChord(ext, ya, yb, ya[2 * n], yb[2 * n], (y) => y[2 * n]);
    if (hit) {
      ys[outer] = hit.y;
      found.push({
        type: 'bogdanov-takens', p: [hit.y[2 * n + 1], hit.y[2 * n + 2]], x: Array.from(hit.y.subarray(0, n)), curves: [id],
        evidence: {
          reason: `ω² of the critical pair reaches zero along the Hopf curve (${ya[2 * n].toPrecision(3)} before, ${yb[2 * n].toPrecision(3)} after): the pair ±iω merges into a double zero eigenvalue, where the Hopf curve ends on a saddle-node curve`,
          testFunction: 'κ = ω² in (J² + κ I) v = 0',
          before: ya[2 * n], after: yb[2 * n], atPoint: hit.value, converged: hit.converged,
        },
      });
    } else {
      ys.splice(outer, 1);
      diagnostics.push({ level: 'warning', code: 'locate-failed', message: `curve ${id}: ω² changes sign at its end but the Bogdanov–Takens point could not be computed; not reported` });
    }
  }
  const curve: MapCurve = {
    id,
    type: 'hopf',
    points: ys.map((y) => ({ p: [y[2 * n + 1], y[2 * n + 2]], x: Array.from(y.subarray(0, n)), frequency: Math.sqrt(Math.max(0, y[2 * n])) })),
    ends,
    seed: { second: b, p: sp.p, x: [...sp.x], swept },
  };
  for (const end of ends) noteEnd(end, id, diagnostics);
  return { traced: { curve, ys }, found };
}

function branchPointCurve(
  sys: TwoParameterSystem, sp: SpecialPoint, b: number, swept: 'first' | 'second', o: CurveOptions, index: number, diagnostics: Diagnostic[], isCancelled: () => boolean,
): { traced: Traced; found: Omit<MapPoint, 'id'>[] } | 'no-symmetry' | null {
  const n = sys.dimension;
  const x = Float64Array.from(sp.x);
  const j = sys.jacobian(x, sp.p, b, new Float64Array(n * n));
  const phi = nullVector(j, n);
  const symmetry = findSymmetry(sys, x, phi, sp.p, b);
  if (!symmetry) return 'no-symmetry';
  const m = symmetry.pairs.length;
  const u0 = new Float64Array(m);
  symmetry.pairs.forEach(([i], q) => (u0[q] = phi[i]));
  let nu = 0;
  for (const v of u0) nu += v * v;
  nu = Math.sqrt(nu);
  for (let q = 0; q < m; q++) u0[q] /= nu;
  const ext = new SymmetricBranchPointSystem(sys, symmetry, u0);
  const y0 = ext.reduce(x, phi.map((v) => v / nu), sp.p, b);
  const N = ext.size;
  const start = startOn(ext, y0, b, swept, 'branch point (restricted to the symmetric subspace)', diagnostics, sp, sys);
  if (!start) return null;
  const { pts, ends } = bothWays(ext, start.y, start.t, o, { isCancelled });
  const id = `bp${index + 1}`;
  const ys = pts.map((p) => p.y);
  const curve: MapCurve = {
    id,
    type: 'pitchfork',
    points: ys.map((y) => ({ p: [y[N - 2], y[N - 1]], x: Array.from(ext.stateOf(y)) })),
    ends,
    seed: { second: b, p: sp.p, x: [...sp.x], swept },
  };
  for (const end of ends) noteEnd(end, id, diagnostics);
  // Where a saddle-node curve of the symmetric branch meets this curve: det of J on Fix changes sign.
  const found: Omit<MapPoint, 'id'>[] = [];
  const dets = ys.map((y) => ext.symmetricDeterminant(y));
  for (let i = 0; i + 1 < ys.length; i++) {
    if (!(Number.isFinite(dets[i]) && Number.isFinite(dets[i + 1])) || dets[i] === 0 || Math.sign(dets[i]) === Math.sign(dets[i + 1])) continue;
    ext.rebase(ys[i]);
    const hit = locateOnChord(ext, ys[i], ys[i + 1], dets[i], dets[i + 1], (y) => ext.symmetricDeterminant(y));
    if (!hit) {
      diagnostics.push({ level: 'warning', code: 'locate-failed', message: `curve ${id}: the symmetric block's determinant changes sign between two points but no point between them could be computed; not reported` });
      continue;
    }
    found.push({
      type: 'saddle-node-meets-pitchfork', p: [hit.y[N - 2], hit.y[N - 1]], x: Array.from(ext.stateOf(hit.y)), curves: [id],
      evidence: {
        reason: `the Jacobian restricted to the symmetric states changes the sign of its determinant along the pitchfork curve (${dets[i].toPrecision(3)} before, ${dets[i + 1].toPrecision(3)} after): the symmetric branch has a saddle-node here, so a saddle-node curve meets the pitchfork curve (a double zero eigenvalue, one symmetric and one antisymmetric null vector)`,
        testFunction: 'det of J_x on the symmetric subspace',
        before: dets[i], after: dets[i + 1], atPoint: hit.value, converged: hit.converged,
      },
    });
  }
  return { traced: { curve, ys }, found };
}

/** Does the polyline of a curve cross the segment u-w in the parameter plane? */
function crosses(curve: MapCurve, u: [number, number], w: [number, number]): boolean {
  const pts = curve.points;
  const orient = (p: readonly number[], q: readonly number[], r: readonly number[]) => (q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]);
  for (let i = 0; i + 1 < pts.length; i++) {
    const p = pts[i].p;
    const q = pts[i + 1].p;
    const d1 = orient(u, w, p);
    const d2 = orient(u, w, q);
    const d3 = orient(p, q, u);
    const d4 = orient(p, q, w);
    // Touching counts (curves end exactly on the range bounds, where grid rows lie); collinear does not.
    const apart = (e1: number, e2: number) => (e1 <= 0 && e2 >= 0) || (e1 >= 0 && e2 <= 0);
    if (!(d1 === 0 && d2 === 0) && apart(d1, d2) && apart(d3, d4)) return true;
  }
  return false;
}

/**
 * Regime regions (docs/maps.md §5): the label of `labelAt` (src/lib/regimes) at every grid sample
 * (columns in the first parameter x rows in the second, each row on the one-parameter diagram at that
 * second value), grouped into 4-connected components of equal label; for every pair of neighbouring
 * samples with different labels, the curves crossing the segment between them are the region's
 * bounding curves (no curve there: an unlocated edge, e.g. a saddle connection).
 */
function regimeRegions(
  diagrams: ReadonlyMap<number, { system: CompiledSystem; diagram: Diagram }>,
  rows: readonly number[], cols: readonly number[], curves: readonly MapCurve[], diagnostics: Diagnostic[], isCancelled: () => boolean,
): MapRegion[] {
  const R = rows.length;
  const C = cols.length;
  const label: { regime: Regime | null; reason: string }[] = [];
  for (let r = 0; r < R; r++) {
    const entry = diagrams.get(rows[r])!;
    for (let c = 0; c < C; c++) {
      if (isCancelled()) return [];
      try {
        const l = labelAt(entry.system, entry.diagram, cols[c]);
        label.push({ regime: l.regime, reason: l.reason });
      } catch (e) {
        label.push({ regime: null, reason: `label failed: ${e instanceof Error ? e.message : String(e)}` });
      }
    }
  }
  const key = (i: number) => label[i].regime ?? `none:${label[i].reason}`;
  const comp = new Array<number>(R * C).fill(-1);
  const regions: { regime: Regime | null; reason: string; cells: number[]; bounded: Set<string>; unlocated: number }[] = [];
  for (let i = 0; i < R * C; i++) {
    if (comp[i] >= 0) continue;
    const id = regions.length;
    const cells: number[] = [];
    const stack = [i];
    comp[i] = id;
    while (stack.length > 0) {
      const cur = stack.pop()!;
      cells.push(cur);
      const r = Math.floor(cur / C);
      const c = cur % C;
      for (const [dr, dc] of [[1, 0], [-1, 0], [0, 1], [0, -1]]) {
        const r2 = r + dr;
        const c2 = c + dc;
        if (r2 < 0 || r2 >= R || c2 < 0 || c2 >= C) continue;
        const nb = r2 * C + c2;
        if (comp[nb] < 0 && key(nb) === key(i)) {
          comp[nb] = id;
          stack.push(nb);
        }
      }
    }
    regions.push({ regime: label[i].regime, reason: label[i].reason, cells: cells.sort((x, y) => x - y), bounded: new Set(), unlocated: 0 });
  }
  for (let i = 0; i < R * C; i++) {
    const r = Math.floor(i / C);
    const c = i % C;
    for (const nb of [c + 1 < C ? i + 1 : -1, r + 1 < R ? i + C : -1]) {
      if (nb < 0 || comp[nb] === comp[i]) continue;
      const u: [number, number] = [cols[c], rows[r]];
      const w: [number, number] = [cols[nb % C], rows[Math.floor(nb / C)]];
      const hit = curves.filter((cv) => crosses(cv, u, w)).map((cv) => cv.id);
      for (const side of [comp[i], comp[nb]]) {
        for (const h of hit) regions[side].bounded.add(h);
        if (hit.length === 0) regions[side].unlocated++;
      }
    }
  }
  if (regions.length > 1 && regions.some((g) => g.unlocated > 0)) {
    diagnostics.push({ level: 'info', code: 'region-edge-unlocated', message: 'some neighbouring grid samples differ in regime with no continued curve between them (a saddle connection or crossover of the regime rule, which this map does not continue; or a curve outside the seeds)' });
  }
  return regions.map((g, k) => ({
    id: `r${k + 1}`,
    regime: g.regime,
    reason: g.reason,
    samples: g.cells.map((i) => [cols[i % C], rows[Math.floor(i / C)]] as [number, number]),
    boundedBy: [...g.bounded].sort(),
    unlocatedEdges: g.unlocated,
  }));
}

