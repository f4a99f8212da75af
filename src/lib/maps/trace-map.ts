/**
 * The two-parameter map of a model (docs/maps.md): saddle-node, Hopf and pitchfork curves in (a, b) =
 * (swept parameter, second parameter), continued from the special points of one-parameter diagrams
 * at a few values of b (and of a), codimension-two points on the curves, and the coupling-regime
 * regions they bound. Pure and synchronous; never throws on numerical trouble (the map is then
 * partial and `diagnostics` says why).
 */
import { traceDiagram } from '../atlas/trace-diagram.js';
import type { Diagnostic, Diagram, SpecialPoint } from '../atlas/types.js';
import type { CompiledSystem } from '../model/compiled-system.js';
import type { CurveOptions } from '../numerics/continue-curve.js';
import { defaultMapSettings, type MapCurveType, type MapHooks, type MapPoint, type MapRegion, type MapSettings, type TwoParameterMap } from './map-types.js';
import { regimeRegions } from './regime-regions.js';
import { branchPointCurve, hopfCurve, saddleNodeCurve, type Traced } from './seeded-curves.js';
import type { TwoParameterSystem } from './two-parameter-system.js';

export * from './map-types.js';

const linspace = (lo: number, hi: number, k: number) => (k <= 1 ? [(lo + hi) / 2] : Array.from({ length: k }, (_, i) => lo + ((hi - lo) * i) / (k - 1)));

export function traceMap(sys: TwoParameterSystem, settings: Partial<MapSettings> & { secondFrom: number; secondTo: number }, hooks: MapHooks = {}): TwoParameterMap {
  const s = { ...defaultMapSettings, from: sys.sweep.from, to: sys.sweep.to, ...Object.fromEntries(Object.entries(settings).filter(([, v]) => v !== undefined)) } as Required<MapSettings>;
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
  // A saddle-node curve of asymmetric states that ends on a pitchfork curve passes, as one curve in
  // (x, a, b), through the symmetric state at the degenerate pitchfork, where its fold system is
  // singular: the step across it can flip the null vector and fake a cusp (its location then does not
  // converge). Such a cusp within 1e-3 (1 + |p|) of a degenerate pitchfork is dropped and its curve
  // listed with the degenerate pitchfork.
  for (let i = points.length - 1; i >= 0; i--) {
    const q = points[i];
    if (q.type !== 'cusp' || q.evidence.converged !== false) continue;
    const dpf = points.find((o) => o.type === 'degenerate-pitchfork' && Math.max(Math.abs(o.p[0] - q.p[0]), Math.abs(o.p[1] - q.p[1])) < 1e-3 * (1 + Math.abs(q.p[0]) + Math.abs(q.p[1])));
    if (!dpf) continue;
    for (const id of q.curves) if (!dpf.curves.includes(id)) dpf.curves.push(id);
    points.splice(i, 1);
    const stale = diagnostics.findIndex((d) => d.code === 'locate-not-converged' && q.curves.some((id) => d.message.startsWith(`curve ${id}:`)));
    if (stale >= 0) diagnostics.splice(stale, 1);
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
  const prefix = c.type === 'cusp' ? 'cusp' : c.type === 'bogdanov-takens' ? 'bt' : c.type === 'degenerate-pitchfork' ? 'dpf' : 'snp';
  points.push({ id: `${prefix}${points.filter((q) => q.type === c.type).length + 1}`, ...c });
}
