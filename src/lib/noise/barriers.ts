import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import type { NodeState } from '../regimes/types';
import { integrateFlow } from '../regimes/flow';
import { resolveOptions, type RegimeOptions } from '../regimes/options';
import { fmt } from '../regimes/element-roles';
import type { Barrier, CancelSignal, NoiseGraph } from './types';
import { isGradient, type GradientOptions } from './gradient';
import { potentialDifference } from './potential';
import { gmam, scaledField, type GmamOptions } from './gmam';

/** Settings of barriersAt. */
export interface BarrierOptions {
  /**
   * 'auto' (default): the potential where the scaled field is a gradient at every sampled point,
   * the geometric minimum action method otherwise. 'minimum-action': always gMAM (tests, checks).
   */
  readonly method: 'auto' | 'minimum-action';
  readonly gradient: Partial<GradientOptions>;
  readonly gmam: Partial<GmamOptions>;
  /** Interior points on each straight state–saddle segment sampled by the gradient test. Default 7. */
  readonly segmentSamples: number;
  /**
   * Gradient case: the potential difference along the straight segment and along the manifold path
   * must agree to this, relative to max(|dU|, 1e-12). Default 1e-7 (both are quadratures of the
   * same exact integral; the manifold polyline has hundreds of segments).
   */
  readonly pathAgreement: number;
  /** gMAM: a measured change |S_2N - S_N| / S_2N above this gets a warning. Default 1e-3. */
  readonly discretizationWarning: number;
  /** ODE settings for the unstable-manifold branches (regimes' defaults). */
  readonly regime: Partial<RegimeOptions>;
  /** Compute only the pairs for which this returns true (from = state index, saddle = saddle index). */
  readonly pairs?: (from: number, saddle: number) => boolean;
  readonly signal?: CancelSignal;
}

export const defaultBarrierOptions: BarrierOptions = {
  method: 'auto', gradient: {}, gmam: {}, segmentSamples: 7, pathAgreement: 1e-7, discretizationWarning: 1e-3, regime: {},
};

export interface BarriersResult {
  readonly barriers: Barrier[];
  /** Whether the scaled field passed the gradient test at every sampled point. */
  readonly gradient: boolean;
  /** Largest relative asymmetry of the scaled Jacobian found (isGradient). */
  readonly gradientResidual: number;
  readonly diagnostics: Diagnostic[];
}

/**
 * Freidlin–Wentzell barriers of an escape graph: for every edge (index-1 saddle s between stable
 * states a and b) the quasi-potential of s relative to a and relative to b, in units of level^2
 * (docs/noise.md, "Exit barriers"). Both branches of the saddle's unstable manifold are integrated
 * (regimes' integrateFlow) until they enter the arrival ball of their state. The scaled field
 * y = x / w is tested for being a gradient (isGradient) at the states, the saddles, points on the
 * straight state–saddle segments and every manifold sample.
 * - Gradient: barrier = 2 (U(s) - U(a)) by the line integral of -G along the straight segment
 *   (potentialDifference), checked against the same integral along the manifold branch; the
 *   minimum-action path is the reversed manifold branch (the time reverse of the downhill flow;
 *   Freidlin & Wentzell, ch. 4, §3).
 * - Otherwise: gmam from a to s in scaled coordinates, started from the straight segment.
 * Problems (branch not reaching its state, gMAM not converged, paths disagreeing) become
 * diagnostics; the barrier is still reported with converged false. Never throws for numerical
 * trouble.
 */
export function barriersAt(
  system: CompiledSystem,
  graph: NoiseGraph,
  weights: Float64Array,
  options?: Partial<BarrierOptions>,
): BarriersResult {
  const o = { ...defaultBarrierOptions, ...(options ?? {}) };
  const settings = resolveOptions(o.regime);
  const n = system.dimension;
  const p = graph.p;
  const diagnostics: Diagnostic[] = [];
  const edges = graph.graph.saddles;
  const want = (k: number, e: number) => (o.pairs ? o.pairs(k, e) : true);

  // Manifold branches, saddle -> state, per edge and end.
  const branches: (number[][] | null)[][] = edges.map((edge, e) => {
    if (!want(edge.from, e) && !want(edge.to, e)) return [null, null];
    return manifoldBranches(system, p, graph.saddles[e].x, graph.saddles[e].unstableVector ?? edge.direction ?? null,
      graph.graph.states[edge.from].x, graph.graph.states[edge.to].x, settings);
  });
  const samples: ArrayLike<number>[] = [];
  for (const s of graph.graph.states) samples.push(s.x);
  edges.forEach((edge, e) => {
    samples.push(edge.x);
    for (const k of [edge.from, edge.to]) {
      const a = graph.graph.states[k].x;
      for (let j = 1; j <= o.segmentSamples; j++) {
        const t = j / (o.segmentSamples + 1);
        samples.push(a.map((v, i) => v + t * (edge.x[i] - v)));
      }
    }
    for (const b of branches[e]) if (b) samples.push(...b);
  });
  const test = isGradient(system, p, samples, weights, o.gradient);
  const useGradient = o.method === 'auto' && test.gradient;
  const field = scaledField(system, p, weights);

  const barriers: Barrier[] = [];
  edges.forEach((edge, e) => {
    const ends: [number, number, number][] = [[edge.from, edge.to, 0], [edge.to, edge.from, 1]];
    for (const [k, other, side] of ends) {
      if (!want(k, e)) continue;
      if (o.signal?.aborted) return;
      const state = graph.graph.states[k].x;
      const branch = branches[e][side];
      const where = `from [${state.map(fmt).join(', ')}] to the saddle at [${edge.x.map(fmt).join(', ')}] (${system.parameter} = ${fmt(p)})`;
      if (useGradient) {
        const line = potentialDifference(system, p, [state, edge.x], weights);
        let converged = line.finite;
        const detail: Record<string, number | string | boolean> = { gradientResidual: test.residual, gradientSamples: test.samples };
        let path: number[][] = [state.slice(), edge.x.slice()];
        if (branch) {
          path = [state.slice(), ...branch.slice().reverse()];
          path[path.length - 1] = edge.x.slice();
          const along = potentialDifference(system, p, path, weights);
          const gap = Math.abs(along.difference - line.difference) / Math.max(Math.abs(line.difference), 1e-12);
          detail.pathGap = gap;
          if (!(gap <= o.pathAgreement)) {
            converged = false;
            diagnostics.push({ level: 'warning', code: 'potential-path-mismatch', p,
              message: `the potential difference ${where} differs by ${gap.toExponential(2)} (relative) between the straight segment and the manifold path; the field may not be a gradient between the sampled points` });
          }
        } else {
          detail.pathGap = 'no manifold path';
          diagnostics.push({ level: 'warning', code: 'barrier-no-path', p,
            message: `the unstable-manifold branch of the saddle at [${edge.x.map(fmt).join(', ')}] did not reach [${state.map(fmt).join(', ')}] (${system.parameter} = ${fmt(p)}); the barrier is from the straight segment and the path drawn is that segment` });
        }
        barriers.push({ p, from: k, saddle: e, to: other, barrier: 2 * line.difference, method: 'potential', path, converged, detail });
      } else {
        const start = Float64Array.from(state, (v, i) => v / weights[i]);
        const end = Float64Array.from(edge.x, (v, i) => v / weights[i]);
        const r = gmam(field, start, end, { ...o.gmam, signal: o.signal });
        const path = r.path.map((q) => Array.from(q, (v, i) => v * weights[i]));
        if (!r.converged) {
          diagnostics.push({ level: 'warning', code: r.cancelled ? 'cancelled' : 'gmam-not-converged', p,
            message: `the minimum action path ${where} ${r.cancelled ? 'was cancelled' : `did not converge in ${r.iterations} iterations (last relative change of the action ${r.residual.toExponential(2)})`}; its barrier is indicative` });
        } else if (r.discretizationChange > o.discretizationWarning) {
          diagnostics.push({ level: 'warning', code: 'gmam-discretization', p,
            message: `the minimum action ${where} changed by ${r.discretizationChange.toExponential(2)} (relative) when the path points were doubled to ${r.segments + 1}; raise gmam.points` });
        }
        barriers.push({ p, from: k, saddle: e, to: other, barrier: r.action, method: 'minimum-action', path, converged: r.converged,
          detail: { iterations: r.iterations, segments: r.segments, discretizationChange: r.discretizationChange, actionFine: r.actionFine,
            actionCoarse: r.actionCoarse, residual: r.residual, gradientResidual: test.residual } });
      }
    }
  });
  return { barriers, gradient: test.gradient, gradientResidual: test.residual, diagnostics };
}

/**
 * Both branches of the unstable manifold of a saddle, as sample lists from the saddle to the state
 * [toA, toB] (null for a branch that reaches neither within the regimes' time and step caps).
 */
function manifoldBranches(
  system: CompiledSystem,
  p: number,
  saddle: readonly number[],
  direction: readonly number[] | null,
  a: readonly number[],
  b: readonly number[],
  settings: RegimeOptions,
): [number[][] | null, number[][] | null] {
  const out: [number[][] | null, number[][] | null] = [null, null];
  if (!direction) return out;
  const step = settings.manifoldOffset * (1 + maxAbs(saddle));
  const targets = [a, b];
  const radii = targets.map((x) => Math.min(settings.arrivalRadius * (1 + maxAbs(x)), settings.arrivalFraction * maxDist(a, b)));
  for (const sign of [1, -1]) {
    const x0 = saddle.map((c, i) => c + sign * step * direction[i]);
    const samples: number[][] = [saddle.slice()];
    let reached = -1;
    integrateFlow(system, p, x0, settings, (_t, x) => {
      samples.push(x.slice());
      for (let k = 0; k < 2; k++) if (maxDist(x, targets[k]) < radii[k]) { reached = k; return true; }
      return false;
    });
    if (reached >= 0 && out[reached] === null) out[reached] = samples;
  }
  return out;
}

/** Readable name of a pattern: 'all-base', 'all-tipped' or the tipped nodes, e.g. 'n1, n3 tipped'. */
export function stateLabel(pattern: readonly NodeState[], names: readonly string[]): string {
  const tipped = names.filter((_, i) => pattern[i] === 'tipped');
  if (tipped.length === 0) return 'all-base';
  if (tipped.length === names.length) return 'all-tipped';
  return `${tipped.join(', ')} tipped`;
}

/** Name of a saddle by the states its manifold joins: 'all-base -> n1 tipped' (fewer tipped first). */
export function saddleLabel(graph: NoiseGraph, saddle: number, names: readonly string[]): string {
  const e = graph.graph.saddles[saddle];
  return `${stateLabel(graph.graph.states[e.from].pattern, names)} -> ${stateLabel(graph.graph.states[e.to].pattern, names)}`;
}

function maxDist(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}
