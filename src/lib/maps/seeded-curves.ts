/**
 * Curves of a map continued from the special points of one-parameter seed diagrams (docs/maps.md
 * §2-§5): saddle-node curves with their cusp and Bogdanov-Takens points, Hopf curves ending in
 * Bogdanov-Takens points, and symmetry-breaking pitchfork curves with the points where a saddle-node
 * curve of symmetric states meets them.
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { Diagnostic, SpecialPoint } from '../atlas/types.js';
import { findSymmetry, SymmetricBranchPointSystem } from './branch-point-curve.js';
import { continueCurve, type CurveDirection, type CurveHooks, type CurveOptions } from '../numerics/continue-curve.js';
import { correctExtended, startTangent, type CurvePoint, type ExtendedSystem } from '../numerics/extended-system.js';
import { HopfSystem } from './hopf-curve.js';
import { locateOnChord } from './locate-on-curve.js';
import type { MapCurve, MapCurveEnd, MapPoint } from './map-types.js';
import { SaddleNodeSystem } from './saddle-node-curve.js';
import type { TwoParameterSystem } from './two-parameter-system.js';

export interface Traced {
  readonly curve: MapCurve;
  /** Extended-space points (for the cusp test and the seed de-duplication). */
  readonly ys: Float64Array[];
}

/** Smallest right singular vector of J_x (unit), by ml-matrix SVD. */
export function nullVector(j: Float64Array, n: number): Float64Array {
  const svd = new SingularValueDecomposition(Matrix.from1DArray(n, n, j), { computeLeftSingularVectors: false });
  const d = svd.diagonal;
  let imin = 0;
  for (let i = 1; i < n; i++) if (d[i] < d[imin]) imin = i;
  const v = new Float64Array(n);
  for (let r = 0; r < n; r++) v[r] = svd.rightSingularVectors.get(r, imin);
  return v;
}

/**
 * Trace a curve both ways from y0 with the one pseudo-arclength driver (numerics/continue-curve.ts, its
 * default policies: a new factorization for each tangent, ends inside the box when a bound cannot be
 * solved, closed loops detected) and join the halves: [minus reversed, y0, plus].
 */
function bothWays(
  ext: ExtendedSystem & { c: Float64Array }, y0: Float64Array, t0: Float64Array, o: CurveOptions, hooks: CurveHooks<CurvePoint, 'bogdanov-takens'>,
): { pts: CurvePoint[]; ends: [MapCurveEnd, MapCurveEnd] } {
  const c0 = Float64Array.from(ext.c);
  const plus = continueCurve(ext, Float64Array.from(y0), Float64Array.from(t0), o, hooks);
  let minus: CurveDirection<CurvePoint, 'bogdanov-takens'>;
  if (plus.end === 'closed-loop') minus = { points: [plus.points[0]], end: 'closed-loop', rejectedSteps: 0, newtonIterations: 0 };
  else {
    ext.c.set(c0);
    minus = continueCurve(ext, Float64Array.from(y0), Float64Array.from(t0, (v) => -v), o, hooks);
  }
  return { pts: [...minus.points.slice(1).reverse(), ...plus.points], ends: [minus.end, plus.end] };
}

function noteEnd(end: MapCurveEnd, id: string, diagnostics: Diagnostic[]): void {
  if (end === 'parameter-bound' || end === 'closed-loop' || end === 'cancelled' || end === 'bogdanov-takens') return;
  diagnostics.push({ level: 'warning', code: end, message: `curve ${id} ended early (${end}); it may continue beyond the last point shown` });
}

/** The curve as stored in the map (points in (a, b) with their states), its ends noted as diagnostics. */
function asMapCurve(
  id: string, type: MapCurve['type'], ys: readonly Float64Array[], ends: [MapCurveEnd, MapCurveEnd], pointOf: (y: Float64Array) => MapCurve['points'][number],
  seed: { sp: SpecialPoint; b: number; swept: 'first' | 'second' }, diagnostics: Diagnostic[],
): MapCurve {
  for (const end of ends) noteEnd(end, id, diagnostics);
  return { id, type, points: ys.map(pointOf), ends, seed: { second: seed.b, p: seed.sp.p, x: [...seed.sp.x], swept: seed.swept } };
}

/**
 * Sign changes of a test function along a curve (values at its points), each located by
 * locateOnChord after rebasing the system on the first point; `found` turns a hit into a map point.
 */
function locateSignChanges(
  ext: ExtendedSystem & { rebase(y: Float64Array): boolean }, ys: readonly Float64Array[], values: readonly number[], test: (y: Float64Array) => number,
  found: (hit: { y: Float64Array; value: number; converged: boolean }, i: number) => Omit<MapPoint, 'id'>, failed: string, out: Omit<MapPoint, 'id'>[], diagnostics: Diagnostic[],
): void {
  for (let i = 0; i + 1 < ys.length; i++) {
    if (!(Number.isFinite(values[i]) && Number.isFinite(values[i + 1])) || values[i] === 0 || Math.sign(values[i]) === Math.sign(values[i + 1])) continue;
    ext.rebase(ys[i]);
    const hit = locateOnChord(ext, ys[i], ys[i + 1], values[i], values[i + 1], test);
    if (!hit) {
      diagnostics.push({ level: 'warning', code: 'locate-failed', message: failed });
      continue;
    }
    out.push(found(hit, i));
  }
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
  const polished = correctExtended(ext, y0, e, y0[fixed], { residualTolerance: 1e-12, stepTolerance: 1e-12, maxIterations: 20, earlyStepTolerance: 1e-12 });
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

/** Left null vector of J (unit), from the SVD of J^T. */
function leftNullVector(j: Float64Array, n: number): Float64Array {
  const t = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) t[k * n + i] = j[i * n + k];
  return nullVector(t, n);
}

export function saddleNodeCurve(
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
  const curve = asMapCurve(id, 'saddle-node', ys, ends, (y) => ({ p: [y[2 * n], y[2 * n + 1]], x: Array.from(y.subarray(0, n)) }), { sp, b, swept }, diagnostics);
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
            reason: `the left and right null vectors of the Jacobian become orthogonal along the saddle-node curve (w·v = ${ta.bt.toPrecision(3)} before, ${tb.bt.toPrecision(3)} after): the zero eigenvalue becomes double (a Jordan block), where generically a Hopf curve ends on the fold curve (Kuznetsov §8.4; see the note when this map has none there)`,
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
export function hopfCurve(
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
  // Stop where κ leaves (0, ∞): a Bogdanov-Takens point, beyond which the system describes neutral saddles.
  const stop = (pa: CurvePoint, pb: CurvePoint) => (pa.y[2 * n] > 0 && !(pb.y[2 * n] > 0) ? 'bogdanov-takens' as const : null);
  const { pts, ends } = bothWays(ext, start.y, start.t, o, { isCancelled, stop });
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
  const curve = asMapCurve(id, 'hopf', ys, ends, (y) => ({ p: [y[2 * n + 1], y[2 * n + 2]], x: Array.from(y.subarray(0, n)), frequency: Math.sqrt(Math.max(0, y[2 * n])) }), { sp, b, swept }, diagnostics);
  return { traced: { curve, ys }, found };
}

export function branchPointCurve(
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
  const curve = asMapCurve(id, 'pitchfork', ys, ends, (y) => ({ p: [y[N - 2], y[N - 1]], x: Array.from(ext.stateOf(y)) }), { sp, b, swept }, diagnostics);
  // Where a saddle-node curve of the symmetric branch meets this curve: det of J on Fix changes sign.
  const found: Omit<MapPoint, 'id'>[] = [];
  const dets = ys.map((y) => ext.symmetricDeterminant(y));
  locateSignChanges(ext, ys, dets, (y) => ext.symmetricDeterminant(y), (hit, i) => ({
    type: 'saddle-node-meets-pitchfork', p: [hit.y[N - 2], hit.y[N - 1]], x: Array.from(ext.stateOf(hit.y)), curves: [id],
    evidence: {
      reason: `the Jacobian restricted to the symmetric states changes the sign of its determinant along the pitchfork curve (${dets[i].toPrecision(3)} before, ${dets[i + 1].toPrecision(3)} after): the symmetric branch has a saddle-node here, so a saddle-node curve meets the pitchfork curve (a double zero eigenvalue, one symmetric and one antisymmetric null vector)`,
      testFunction: 'det of J_x on the symmetric subspace',
      before: dets[i], after: dets[i + 1], atPoint: hit.value, converged: hit.converged,
    },
  }), `curve ${id}: the symmetric block's determinant changes sign between two points but no point between them could be computed; not reported`, found, diagnostics);
  // Degenerate pitchfork: the cubic coefficient changes sign (a saddle-node curve of asymmetric states ends here).
  const cubic = ys.map((y) => ext.cubicCoefficient(y));
  locateSignChanges(ext, ys, cubic, (y) => ext.cubicCoefficient(y), (hit, i) => ({
    type: 'degenerate-pitchfork', p: [hit.y[N - 2], hit.y[N - 1]], x: Array.from(ext.stateOf(hit.y)), curves: [id],
    evidence: {
      reason: `the pitchfork's cubic coefficient changes sign along the pitchfork curve (${cubic[i].toPrecision(3)} before, ${cubic[i + 1].toPrecision(3)} after): the asymmetric branches switch sides, and a saddle-node curve of asymmetric states ends on the pitchfork curve here`,
      testFunction: 'c3 = p·C(v,v,v)/6 − p·B(v, J⁻¹B(v,v))/2 (J⁻¹ on the symmetric subspace, C by a central difference)',
      before: cubic[i], after: cubic[i + 1], atPoint: hit.value, converged: hit.converged,
    },
  }), `curve ${id}: the pitchfork's cubic coefficient changes sign between two points but no point between them could be computed; not reported`, found, diagnostics);
  return { traced: { curve, ys }, found };
}
