import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import type { EscapeGraph, NodeState, SaddleEdge, StableState } from './types';
import type { NodeRoles } from './element-roles';
import type { RegimeOptions } from './options';
import { analyseEquilibrium, isIndexOneSaddle, isStable, sameState, type Equilibrium } from './equilibria-at';
import { integrateFlow } from './flow';
import { newtonAtFixedParameter } from './linear-algebra';
import { countTipped, patternOf } from './pattern';
import { fmt } from './element-roles';

/** What the integration of one manifold branch found. */
export interface ManifoldBranch {
  /** Index into the graph's states, or -1 when unresolved. */
  readonly reached: number;
  readonly time: number;
  /** Slow-passage time (see slowPassageTime). */
  readonly slowTime: number;
}

/** An escape graph plus, per saddle, the saddle's equilibrium data and both branches (to `from`, to `to`). */
export interface EscapeGraphResult {
  readonly graph: EscapeGraph;
  readonly saddles: readonly { readonly equilibrium: Equilibrium; readonly branches: readonly [ManifoldBranch, ManifoldBranch] }[];
  readonly diagnostics: Diagnostic[];
  /** True when the integration budget ran out before every saddle was followed (the graph is partial). */
  readonly truncated: boolean;
}

/** Integrations still allowed; decremented by buildEscapeGraph. */
export interface IntegrationBudget { left: number }

export type GraphSettings = Pick<RegimeOptions,
  'manifoldOffset' | 'settledSpeed' | 'relativeTolerance' | 'absoluteTolerance' | 'timeCap' | 'maxSteps' | 'stateBound' |
  'arrivalFraction' | 'arrivalRadius' | 'slowSpeedFraction' | 'slowExclusion' |
  'newtonTolerance' | 'newtonMaxIterations' | 'duplicateTolerance' | 'hyperbolicTolerance'>;

/**
 * Escape graph at parameter p. Vertices: the stable equilibria among `equilibria`. Edges: every
 * index-1 saddle (one real eigenvalue with Re > 0, none with |Re| <= hyperbolicTolerance) whose two
 * unstable-manifold branches both reach a stable state. Each branch is integrated forward from
 * x_s ± manifoldOffset (1 + |x_s|_inf) v (v the unit unstable eigenvector) until it enters the arrival
 * ball of a stable state: radius min(arrivalRadius (1 + |x_k|_inf), arrivalFraction × distance from x_k
 * to the nearest other equilibrium), max norm, while moving towards it ((x - x_k) . F(x) < 0). A branch that settles elsewhere (max|F| < settledSpeed
 * farther than 100 offsets from the saddle) or stops at the time or step cap is polished by Newton's method; if it lands on a stable equilibrium not yet known, that state is added
 * with a warning, otherwise the saddle is left out with a "manifold-unresolved" diagnostic.
 * `from` is the end with fewer tipped nodes (ties: lower index). Each saddle costs two integrations
 * from `budget`; when it runs out the remaining saddles are skipped and `truncated` is set. Patterns use `roles`; without roles
 * every node counts as base.
 */
export function buildEscapeGraph(
  system: CompiledSystem,
  p: number,
  equilibria: readonly Equilibrium[],
  roles: readonly NodeRoles[] | null,
  settings: GraphSettings,
  budget: IntegrationBudget = { left: Infinity },
): EscapeGraphResult {
  const diagnostics: Diagnostic[] = [];
  const targets = branchTargets(system, equilibria, roles, settings);
  const { states } = targets;

  const neutral = equilibria.filter((e) => e.neutral > 0);
  if (neutral.length > 0) {
    diagnostics.push({ level: 'warning', code: 'non-hyperbolic', p,
      message: `${neutral.length} equilibri${neutral.length === 1 ? 'um' : 'a'} at ${system.parameter} = ${fmt(p)} ha${neutral.length === 1 ? 's' : 've'} an eigenvalue with |Re| <= ${settings.hyperbolicTolerance} and ${neutral.length === 1 ? 'was' : 'were'} left out of the escape graph` });
  }

  const edges: SaddleEdge[] = [];
  const saddleData: { equilibrium: Equilibrium; branches: [ManifoldBranch, ManifoldBranch] }[] = [];
  let truncated = false;
  for (const saddle of equilibria.filter(isIndexOneSaddle)) {
    if (budget.left < 2) { truncated = true; break; }
    budget.left -= 2;
    const v = saddle.unstableVector!;
    const found: ManifoldBranch[] = [];
    let failed = false;
    for (const sign of [1, -1] as const) {
      const b = followBranch(system, p, saddle, sign, targets, settings, diagnostics);
      if (b.reached < 0) { failed = true; break; }
      found.push(b);
    }
    if (failed) continue;
    let [a, b] = found;
    if (a.reached === b.reached) {
      diagnostics.push({ level: 'warning', code: 'manifold-same-end', p,
        message: `both branches of the unstable manifold of the saddle at [${saddle.x.map(fmt).join(', ')}] (${system.parameter} = ${fmt(p)}) reach the same stable state; the saddle is left out of the escape graph` });
      continue;
    }
    const ta = countTipped(states[a.reached].pattern);
    const tb = countTipped(states[b.reached].pattern);
    if (tb < ta || (tb === ta && b.reached < a.reached)) [a, b] = [b, a];
    edges.push({
      x: saddle.x.slice(), pattern: targets.pattern(saddle.x), from: a.reached, to: b.reached,
      eigenvalue: saddle.unstableValue, direction: v.slice(), travelTimes: [a.time, b.time],
    });
    saddleData.push({ equilibrium: saddle, branches: [a, b] });
  }
  return { graph: { p, states, saddles: edges }, saddles: saddleData, diagnostics, truncated };
}

/** The stable states a manifold branch can arrive at, with their arrival radii (filled by followBranch); followBranch adds states it discovers. */
export interface BranchTargets {
  readonly states: StableState[];
  readonly radii: number[];
  readonly everyPoint: number[][];
  readonly pattern: (x: ArrayLike<number>) => NodeState[];
}

type TargetSettings = Pick<RegimeOptions, 'arrivalRadius' | 'arrivalFraction'>;

/** Targets for followBranch: the stable equilibria among `equilibria` and their arrival balls (see buildEscapeGraph). */
export function branchTargets(system: CompiledSystem, equilibria: readonly Equilibrium[], roles: readonly NodeRoles[] | null, settings: TargetSettings): BranchTargets {
  const n = system.dimension;
  const pattern = (x: ArrayLike<number>): NodeState[] => roles ? patternOf(x, roles) : Array.from({ length: n }, () => 'base' as const);
  const states: StableState[] = equilibria.filter(isStable).map((e) => ({ x: e.x.slice(), pattern: pattern(e.x) }));
  const everyPoint = equilibria.map((e) => e.x);
  // The radii are filled by followBranch on first use: labels whose branch ends the order decides
  // (startExits) never integrate, and the nearest-neighbour search is quadratic in the equilibria.
  return { states, radii: [], everyPoint, pattern };
}

function arrivalRadiusOf(x: readonly number[], everyPoint: readonly number[][], settings: TargetSettings): number {
  let nearest = Infinity;
  for (const y of everyPoint) {
    const d = maxDist(x, y);
    if (d > 0 && d < nearest) nearest = d;
  }
  return Math.min(settings.arrivalRadius * (1 + maxAbs(x)), settings.arrivalFraction * nearest);
}

/**
 * One branch of the unstable manifold of an index-1 saddle: integrated forward from
 * x_s + sign × manifoldOffset (1 + |x_s|_inf) v until it enters the arrival ball of a target state while
 * moving towards it, settles, escapes or hits a cap (the rules of buildEscapeGraph). A settled or capped
 * run is polished by Newton's method; a stable state not yet among the targets is added (warning
 * state-not-in-diagram). `reached` is -1 when no stable state was reached (warning manifold-unresolved).
 */
export function followBranch(
  system: CompiledSystem,
  p: number,
  saddle: Equilibrium,
  sign: 1 | -1,
  targets: BranchTargets,
  settings: GraphSettings,
  diagnostics: Diagnostic[],
): ManifoldBranch {
  const n = system.dimension;
  const { states, radii, everyPoint } = targets;
  for (let k = radii.length; k < states.length; k++) radii.push(arrivalRadiusOf(states[k].x, everyPoint, settings));
  const v = saddle.unstableVector!;
  const step = settings.manifoldOffset * (1 + maxAbs(saddle.x));
  const x0 = saddle.x.map((c, i) => c + sign * step * v[i]);
  const samples: { t: number; x: number[] }[] = [];
  let reached = -1;
  let settled = false;
  const fx = new Float64Array(n);
  const xx = new Float64Array(n);
  const flow = integrateFlow(system, p, x0, settings, (t, x) => {
    samples.push({ t, x: x.slice() });
    xx.set(x);
    system.rates(xx, p, fx);
    for (let k = 0; k < states.length; k++) {
      if (maxDist(x, states[k].x) < radii[k] && approaching(x, states[k].x, fx)) { reached = k; return true; }
    }
    if (maxAbs(fx) < settings.settledSpeed && maxDist(x, saddle.x) > 100 * step) { settled = true; return true; }
    return false;
  });
  if (reached < 0 && (settled || flow.end === 'time-cap' || flow.end === 'step-cap')) {
    const polished = newtonAtFixedParameter(system, flow.x, p, settings.newtonTolerance, settings.newtonMaxIterations);
    if (polished.converged) {
      const known = states.findIndex((s) => sameState(s.x, polished.x, settings.duplicateTolerance));
      if (known >= 0) reached = known;
      else {
        const e = analyseEquilibrium(system, polished.x, p, polished.residual, settings.hyperbolicTolerance);
        if (isStable(e)) {
          states.push({ x: e.x, pattern: targets.pattern(e.x) });
          everyPoint.push(e.x);
          radii.push(arrivalRadiusOf(e.x, everyPoint, settings));
          reached = states.length - 1;
          diagnostics.push({ level: 'warning', code: 'state-not-in-diagram', p,
            message: `the unstable manifold of the saddle at [${saddle.x.map(fmt).join(', ')}] reached a stable state [${e.x.map(fmt).join(', ')}] that no branch of the diagram passes through at ${system.parameter} = ${fmt(p)}; it was added to the escape graph` });
        }
      }
    }
  }
  if (reached < 0) {
    diagnostics.push({ level: 'warning', code: 'manifold-unresolved', p,
      message: `the ${sign > 0 ? '+' : '-'} branch of the unstable manifold of the saddle at [${saddle.x.map(fmt).join(', ')}] (${system.parameter} = ${fmt(p)}) reached no stable state ` +
        `(${flow.end === 'escaped' ? `left the box |x| <= ${settings.stateBound}` : flow.end === 'failed' ? 'the integrator failed' : flow.end === 'step-cap' ? `step cap ${settings.maxSteps} hit` : `time cap ${settings.timeCap} hit`} at t = ${fmt(flow.t)}); the saddle is left out of the escape graph` });
    return { reached: -1, time: flow.t, slowTime: 0 };
  }
  return { reached, time: samples.length ? samples[samples.length - 1].t : 0,
    slowTime: slowPassageTime(system, p, saddle.x, states[reached].x, samples, settings) };
}

/**
 * Slow passage of a manifold branch from saddle x_s to stable state x_T: the time it spends with
 * speed |F(x)|_2 below slowSpeedFraction × its peak speed, leaving out the parts within slowExclusion
 * × |x_T - x_s|_inf of either end (there every trajectory is slow). A trajectory that passes a ghost
 * of a vanished equilibrium (a bottleneck after a saddle-node; Strogatz, Nonlinear Dynamics and
 * Chaos, section 4.3) spends a long time there; a direct one gives about 0. Left-point sum over the
 * integrator's step ends.
 */
export function slowPassageTime(
  system: CompiledSystem,
  p: number,
  xs: readonly number[],
  xt: readonly number[],
  samples: readonly { t: number; x: number[] }[],
  settings: Pick<RegimeOptions, 'slowSpeedFraction' | 'slowExclusion'>,
): number {
  if (samples.length < 2) return 0;
  const n = system.dimension;
  const f = new Float64Array(n);
  const span = maxDist(xs, xt);
  const speeds = samples.map((s) => {
    system.rates(Float64Array.from(s.x), p, f);
    let q = 0;
    for (let i = 0; i < n; i++) q += f[i] * f[i];
    return Math.sqrt(q);
  });
  const peak = Math.max(...speeds);
  let slow = 0;
  for (let j = 0; j + 1 < samples.length; j++) {
    const x = samples[j].x;
    if (maxDist(x, xs) < settings.slowExclusion * span || maxDist(x, xt) < settings.slowExclusion * span) continue;
    if (speeds[j] < settings.slowSpeedFraction * peak) slow += samples[j + 1].t - samples[j].t;
  }
  return slow;
}

function approaching(x: ArrayLike<number>, target: ArrayLike<number>, f: ArrayLike<number>): boolean {
  let d = 0;
  for (let i = 0; i < x.length; i++) d += (x[i] - target[i]) * f[i];
  return d < 0;
}

export function maxDist(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}
