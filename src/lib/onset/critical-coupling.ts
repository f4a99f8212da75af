import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import { defaultTraceSettings, type ResolvedTraceSettings } from '../atlas/trace-settings';
import { BorderedWorkspace, tangentAt } from '../numerics/bordered';
import { pointData } from '../numerics/branch-point-data';
import { nearZeroCount, spectralScale, unstableCount } from '../numerics/eigenvalues';
import type { ContinuationOptions } from '../numerics/pseudo-arclength';
import { newton } from '../numerics/newton';
import { normInf } from '../numerics/vector';
import { elementRoles, fmt, type NodeRoles } from '../regimes/element-roles';
import { analyseEquilibrium, isStable } from '../regimes/equilibria-at';
import { integrateFlow } from '../regimes/flow';
import { patternOf } from '../regimes/pattern';
import type { NodeState } from '../regimes/types';
import {
  OnsetInputError,
  type CriticalCouplingHooks,
  type CriticalCouplingOptions,
  type CriticalCouplingResult,
  type NodeOnset,
} from './types';
import { continueToFold } from './continue-to-fold';

export const defaultCriticalCouplingOptions: CriticalCouplingOptions = {
  trace: {},
  pastFold: 1e-5,
  scanPoints: 4001,
  rootSearchBound: 10,
  relativeTolerance: 1e-8,
  absoluteTolerance: 1e-10,
  timeCap: 1e6,
  maxSteps: 200_000,
  stateBound: 1e6,
  settledSpeed: 1e-10,
  newtonTolerance: 1e-12,
  newtonMaxIterations: 40,
  hyperbolicTolerance: 1e-9,
};

/**
 * Critical coupling per node of a network of bistable elements swept over its coupling parameter β.
 *
 * For node i the pattern "only i tipped" is built at β = from (every node at the base root of its
 * uncoupled element, node i at its tipped root; elementRoles) and refined by Newton on F(x, from) = 0.
 * Its branch of F(x, β) = 0 is followed towards `to` by pseudo-arclength continuation with the
 * engine's corrector and step rules and defaults (Keller 1977; continueToFold, which skips the
 * per-point spectrum) until the parameter component of the tangent changes sign: the first
 * saddle-node, located by Illinois regula falsi on t_β along the arc (bracket below
 * locateParameterTolerance = 1e-11 in β by default). That β is node i's critical coupling: the
 * coupling beyond which the state no longer exists. The spectrum is computed at the start and at the fold.
 * Just past it, at β_f + dir · pastFold · |to − from|, the flow dx/dt = F(x, β) is integrated from the
 * fold state (odex; it passes the fold's ghost, Strogatz §4.3, and leaves along the centre direction)
 * until max|F| < settledSpeed; Newton's method polishes the end point and its spectrum must be
 * stable. `next` = nodes tipped there (x_j above the threshold of its uncoupled element) that were
 * base at the start. Only n branches are traced, never the whole diagram.
 *
 * Assumptions: every element is bistable at `from` (three roots, stable-unstable-stable), else every
 * node fails with an error diagnostic; a fold is simple (two folds closer than one continuation step
 * in β can be stepped over, like in traceDiagram). A loss of stability before the fold (another
 * eigenvalue crossing zero) is reported in lostStabilityAt with a warning; critical stays the fold.
 * Never throws on numerical trouble (status 'failed' and a diagnostic); throws OnsetInputError when
 * the model is not a network, the swept parameter is not the coupling, or an option is invalid.
 */
export function criticalCoupling(
  system: CompiledSystem,
  options: Partial<CriticalCouplingOptions> = {},
  hooks: CriticalCouplingHooks = {},
): CriticalCouplingResult {
  const o: CriticalCouplingOptions = { ...defaultCriticalCouplingOptions, ...stripUndefined(options) };
  const net = system.network;
  if (!net) throw new OnsetInputError('format', 'critical coupling needs a network document (brinkmap/network-1); this model is a plain ODE system');
  if (!net.sweepIsCoupling) {
    throw new OnsetInputError('sweep.parameter', `critical coupling sweeps the coupling parameter, but the document sweeps '${system.parameter}' (set sweep.parameter to the coupling parameter)`);
  }
  const from = o.from ?? system.sweep.from;
  const to = o.to ?? system.sweep.to;
  checkOptions(o, from, to, system.dimension);
  const s: ResolvedTraceSettings = { ...defaultTraceSettings, from, to, ...stripUndefined(o.trace) };
  const traceKeys = ['initialStep', 'minStep', 'maxStep', 'maxParameterStep', 'maxTurn', 'maxPointsPerBranch', 'residualTolerance', 'stepTolerance', 'maxCorrectorIterations', 'locateParameterTolerance', 'locateMaxIterations', 'stateBound'] as const;
  for (const k of traceKeys) {
    const v = s[k];
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new OnsetInputError(`trace.${k}`, 'must be a positive finite number');
  }
  if (!(s.minStep <= s.initialStep && s.initialStep <= s.maxStep)) throw new OnsetInputError('trace', 'need minStep <= initialStep <= maxStep');
  const n = system.dimension;
  const ids = net.nodeIds.length === n ? [...net.nodeIds] : [...system.variables];
  const which = o.nodes ? [...o.nodes] : Array.from({ length: n }, (_, i) => i);
  const diagnostics: Diagnostic[] = [];
  const width = Math.abs(to - from);
  const dir = to > from ? 1 : -1;
  const nodes: NodeOnset[] = [];
  let iterations = 0;
  let cancelled = false;
  const isCancelled = () => {
    if (!cancelled && hooks.isCancelled?.()) cancelled = true;
    return cancelled;
  };
  const done = (converged: boolean): CriticalCouplingResult => ({ parameter: system.parameter, from, to, nodes, diagnostics, converged, iterations });
  const empty = (i: number, status: NodeOnset['status']): NodeOnset => ({
    index: i, id: ids[i], status, critical: null, next: null, recovered: null, foldState: null, located: null,
    lostStabilityAt: null, destination: null, points: 0,
  });

  const bound = o.rootSearchBound;
  const rolesResult = elementRoles(system, from, Array.from({ length: n }, () => [-bound, bound] as [number, number]), o.scanPoints);
  if (rolesResult.roles.some((r) => r === null)) {
    diagnostics.push(...rolesResult.diagnostics);
    diagnostics.push({ level: 'error', code: 'onset-undefined', p: from, message: 'critical coupling needs every uncoupled element bistable (base < threshold < tipped) at the sweep start; no node was analysed' });
    for (const i of which) nodes.push(empty(i, 'failed'));
    return done(false);
  }
  const roles = rolesResult.roles as NodeRoles[];
  const ws = new BorderedWorkspace(n);
  let allOk = true;

  for (let k = 0; k < which.length; k++) {
    const i = which[k];
    hooks.onProgress?.(k / which.length, `node ${ids[i]}`);
    if (isCancelled()) {
      nodes.push(empty(i, 'cancelled'));
      continue;
    }
    const id = ids[i];
    const guess = Float64Array.from(roles, (r) => r.base);
    guess[i] = roles[i].tipped;
    const before = patternOf(guess, roles);
    const start = newton(system, guess, from, { maxIterations: 60, stateBound: s.stateBound });
    if (!start.converged) {
      diagnostics.push({ level: 'warning', code: 'start-failed', p: from, message: `node '${id}': Newton's method from the pattern "only ${id} tipped" did not converge at ${system.parameter} = ${fmt(from)} (${start.reason ?? 'not converged'}); no critical coupling` });
      nodes.push(empty(i, 'failed'));
      allOk = false;
      continue;
    }
    const startPattern = patternOf(start.x, roles);
    if (!samePattern(startPattern, before)) {
      diagnostics.push({ level: 'warning', code: 'start-pattern-lost', p: from, message: `node '${id}': no equilibrium with only ${id} tipped at ${system.parameter} = ${fmt(from)} (Newton's method from it ends at pattern ${patternText(startPattern, ids)}); no critical coupling` });
      nodes.push(empty(i, 'failed'));
      allOk = false;
      continue;
    }

    const y0 = new Float64Array(n + 1);
    y0.set(start.x);
    y0[n] = from;
    const e = new Float64Array(n + 1);
    e[n] = dir;
    const tan = tangentAt(system, y0, e, ws);
    if (!tan.ok) {
      diagnostics.push({ level: 'warning', code: 'start-singular', p: from, message: `node '${id}': the branch tangent at the start cannot be computed (J_x singular: a special point on the sweep start); no critical coupling` });
      nodes.push(empty(i, 'failed'));
      allOk = false;
      continue;
    }
    const startPoint = pointData(system, y0, tan.tangent, tan.determinant, ws);
    if (startPoint.unstable > 0) {
      diagnostics.push({ level: 'warning', code: 'start-unstable', p: from, message: `node '${id}': the state with only ${id} tipped is unstable at ${system.parameter} = ${fmt(from)} (${startPoint.unstable} unstable eigenvalue(s)); its fold is still reported` });
    }

    // Arclength scales as in traceDiagram (steps relative to max(width, 1 + |x|)).
    const arcScale = Math.max(width, 1 + normInf(start.x));
    const copts: ContinuationOptions = {
      lo: Math.min(from, to),
      hi: Math.max(from, to),
      initialStep: s.initialStep * arcScale,
      minStep: s.minStep * arcScale,
      maxStep: s.maxStep * arcScale,
      maxParameterStep: s.maxParameterStep * width,
      maxTurn: s.maxTurn,
      maxPoints: Math.max(2, Math.floor(s.maxPointsPerBranch / 2)),
      stateBound: s.stateBound,
      residualTolerance: s.residualTolerance,
      stepTolerance: s.stepTolerance,
      maxCorrectorIterations: s.maxCorrectorIterations,
    };
    const r = continueToFold(system, y0, tan.tangent, tan.determinant, {
      ...copts,
      locateParameterTolerance: s.locateParameterTolerance,
      locateArcTolerance: 1e-10,
      locateMaxIterations: s.locateMaxIterations,
    }, isCancelled);
    iterations += r.iterations;
    if (r.end === 'cancelled') {
      nodes.push(empty(i, 'cancelled'));
      continue;
    }
    const located = r.fold;
    if (located === null) {
      const lostAt = startPoint.unstable === 0 ? r.branchPointNear : null;
      if (lostAt !== null) {
        diagnostics.push({ level: 'warning', code: 'stability-lost-before-fold', p: lostAt, message: `node '${id}': the state with only ${id} tipped loses stability near ${system.parameter} = ${fmt(lostAt)} (a real eigenvalue crosses zero: a branch point)` });
      }
      if (r.end === 'sweep-bound') {
        diagnostics.push({ level: 'info', code: 'none-in-range', message: `node '${id}': none in range: the state with only ${id} tipped exists up to the sweep end ${system.parameter} = ${fmt(to)}` });
        nodes.push({ ...empty(i, 'none-in-range'), lostStabilityAt: lostAt, points: r.iterations });
        continue;
      }
      diagnostics.push({ level: 'warning', code: `branch-${r.end}`, p: r.last.y[n], message: `node '${id}': the branch stopped (${r.end}) at ${system.parameter} = ${fmt(r.last.y[n])} before any saddle-node; no critical coupling` });
      nodes.push({ ...empty(i, 'failed'), lostStabilityAt: lostAt, points: r.iterations });
      allOk = false;
      continue;
    }
    const pf = located.point.y[n];
    const xf = Array.from(located.point.y.subarray(0, n));
    if (!located.converged && located.parameterBracket >= 1e-10) {
      diagnostics.push({ level: 'warning', code: 'locate-not-converged', p: pf, message: `node '${id}': the saddle-node location stopped with a parameter bracket of ${located.parameterBracket.toExponential(2)}` });
    }
    // The full spectrum once, at the fold: a stable branch arrives there with one eigenvalue at zero
    // and all others in the left half-plane; more in the right half-plane mean stability was lost
    // on the way (a branch point, seen by the determinant, or a Hopf point, which it cannot see).
    const foldSpectrum = pointData(system, located.point.y, located.point.t, located.point.det, ws).spectrum;
    let lostAt: number | null = null;
    if (startPoint.unstable === 0 && unstableCount(foldSpectrum, 1e-6 * spectralScale(foldSpectrum)) > 0) {
      lostAt = r.branchPointNear;
      diagnostics.push({ level: 'warning', code: 'stability-lost-before-fold', p: lostAt ?? pf, message: `node '${id}': the state with only ${id} tipped is no longer stable when it reaches its saddle-node at ${system.parameter} = ${fmt(pf)}` +
        (lostAt !== null ? ` (a real eigenvalue crossed zero near ${fmt(lostAt)}: a branch point)` : ' (a complex pair crossed: a Hopf point, not located)') });
    }
    if (nearZeroCount(foldSpectrum) >= 2) {
      diagnostics.push({ level: 'warning', code: 'degenerate-fold', p: pf, message: `node '${id}': the saddle-node at ${system.parameter} = ${fmt(pf)} has two or more eigenvalues near zero; the destination past it may depend on the perturbation` });
    }
    const base: NodeOnset = {
      index: i, id, status: 'fold', critical: pf, next: null, recovered: null, foldState: xf,
      located: { converged: located.converged, iterations: located.iterations, parameterBracket: located.parameterBracket },
      lostStabilityAt: lostAt, destination: null, points: r.iterations,
    };
    const dest = settleAfterFold(system, xf, pf + dir * o.pastFold * width, o);
    if (!dest.ok) {
      diagnostics.push({ level: 'warning', code: 'destination-unresolved', p: pf, message: `node '${id}': the flow just past the saddle-node at ${system.parameter} = ${fmt(pf)} reached no stable state (${dest.reason}); next is unknown` });
      nodes.push(base);
      allOk = false;
    } else {
      const after = patternOf(dest.x, roles);
      const next: string[] = [];
      const recovered: string[] = [];
      for (let j = 0; j < n; j++) {
        if (after[j] === 'tipped' && before[j] === 'base') next.push(ids[j]);
        if (after[j] === 'base' && before[j] === 'tipped') recovered.push(ids[j]);
      }
      nodes.push({ ...base, next, recovered, destination: { p: dest.p, x: dest.x, time: dest.time } });
    }
  }
  if (!cancelled) hooks.onProgress?.(1, 'done');
  if (cancelled) diagnostics.push({ level: 'warning', code: 'cancelled', message: 'the analysis was cancelled; nodes not reached are marked cancelled' });
  return done(allOk && !cancelled);
}

type Settle = { ok: true; p: number; x: number[]; time: number } | { ok: false; reason: string };

/** Integrates from the fold state at p until the flow settles, then polishes and checks stability. */
function settleAfterFold(system: CompiledSystem, xf: readonly number[], p: number, o: CriticalCouplingOptions): Settle {
  const n = system.dimension;
  const xx = new Float64Array(n);
  const fx = new Float64Array(n);
  // The ghost of the fold is slow (speed ≈ |F_p| · pastFold · width), far above settledSpeed, so no
  // distance condition is needed to tell it from a real equilibrium; one is kept anyway so that a
  // start exactly on an equilibrium (a fold located on the wrong side) is not taken for arrival.
  const leave = 1e-3 * (1 + maxAbs(xf));
  const flow = integrateFlow(system, p, xf, o, (_t, x) => {
    xx.set(x);
    system.rates(xx, p, fx);
    return maxAbs(fx) < o.settledSpeed && maxDist(x, xf) > leave;
  });
  if (flow.end === 'escaped' || flow.end === 'failed') {
    return { ok: false, reason: flow.end === 'escaped' ? `left the box |x| <= ${o.stateBound}` : 'the integrator failed' };
  }
  const polished = newton(system, flow.x, p, { residualTolerance: o.newtonTolerance, maxIterations: o.newtonMaxIterations });
  if (!polished.converged) return { ok: false, reason: `${flow.end}; Newton's method did not converge from the end point` };
  const e = analyseEquilibrium(system, polished.x, p, polished.residual, o.hyperbolicTolerance);
  if (!isStable(e)) return { ok: false, reason: `${flow.end}; the end point is an equilibrium with ${e.unstable} unstable and ${e.neutral} neutral eigenvalue(s)` };
  return { ok: true, p, x: e.x, time: flow.t };
}

function checkOptions(o: CriticalCouplingOptions, from: number, to: number, n: number): void {
  if (!Number.isFinite(from)) throw new OnsetInputError('from', 'must be a finite number');
  if (!Number.isFinite(to)) throw new OnsetInputError('to', 'must be a finite number');
  if (from === to) throw new OnsetInputError('to', `the sweep needs from != to (both are ${from})`);
  const positive = ['pastFold', 'scanPoints', 'rootSearchBound', 'relativeTolerance', 'absoluteTolerance', 'timeCap', 'maxSteps', 'stateBound', 'settledSpeed', 'newtonTolerance', 'newtonMaxIterations', 'hyperbolicTolerance'] as const;
  for (const k of positive) {
    const v = o[k];
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new OnsetInputError(k, 'must be a positive finite number');
  }
  if (o.nodes) {
    for (const i of o.nodes) if (!Number.isInteger(i) || i < 0 || i >= n) throw new OnsetInputError('nodes', `node index ${i} is not in 0..${n - 1}`);
  }
}

function samePattern(a: readonly NodeState[], b: readonly NodeState[]): boolean {
  return a.length === b.length && a.every((v, i) => v === b[i]);
}

function patternText(p: readonly NodeState[], ids: readonly string[]): string {
  const tipped = ids.filter((_, j) => p[j] === 'tipped');
  return tipped.length === 0 ? 'all base' : `tipped {${tipped.join(', ')}}`;
}

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}

function maxDist(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

function stripUndefined<T extends object>(v: T): Partial<T> {
  const out: Partial<T> = {};
  for (const [k, x] of Object.entries(v)) if (x !== undefined) (out as Record<string, unknown>)[k] = x;
  return out;
}
