import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import type { NodeState, StableState, StartState } from './types';
import type { NodeRoles } from './element-roles';
import type { RegimeOptions } from './options';
import { isIndexOneSaddle, sameState, type Equilibrium } from './equilibria-at';
import { branchTargets, followBranch, type GraphSettings, type IntegrationBudget, type ManifoldBranch } from './escape-graph';
import { isAll, progressOf } from './pattern';
import { jacobianOf, solveLinear, tangentOf } from './linear-algebra';
import { fmt } from './element-roles';

/** d progress_i / dp at an equilibrium: dx/dp = -J_x^{-1} F_p (or the given `tangent`, tangentOf), divided by the frame's threshold - base. */
export function progressSlope(system: CompiledSystem, x: readonly number[], p: number, frameRoles: readonly NodeRoles[], mirrored: boolean, tangent?: Float64Array | null): number[] | null {
  const n = system.dimension;
  let dx = tangent;
  if (dx === undefined) {
    const xf = Float64Array.from(x);
    const jac = system.jacobian(xf, p, new Float64Array(n * n));
    const fp = system.parameterDerivative(xf, p, new Float64Array(n));
    dx = solveLinear(jac, n, Array.from(fp, (v) => -v));
  }
  if (!dx) return null;
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const d = (mirrored ? -dx[i] : dx[i]) / (frameRoles[i].threshold - frameRoles[i].base);
    if (!Number.isFinite(d)) return null;
    out.push(d);
  }
  return out;
}

/**
 * Roles in the start's frame: unchanged for all-base; for recovery from all-tipped mirrored x -> -x,
 * so that progress runs from the tipped root (0) to the threshold (1).
 */
export function frameRolesOf(roles: readonly NodeRoles[], start: StartState): readonly NodeRoles[] {
  return start === 'all-tipped' ? roles.map((r) => ({ base: -r.tipped, threshold: -r.threshold, tipped: -r.base })) : roles;
}

/**
 * One exit of a start state: an index-1 saddle one of whose unstable-manifold branches ends at the
 * start state; its destination is where the other branch ends. Node indices, progress and `tipping`
 * are in the start's frame (for recovery from all-tipped the problem is mirrored x -> -x, so
 * "tipping" means recovering and progress runs from the tipped root to the threshold).
 */
export interface Exit {
  readonly saddle: readonly number[];
  /** Pattern of the destination state, in the model's own terms. */
  readonly destination: readonly NodeState[];
  /** Progress of every node at the saddle (0 at the start's root, 1 at the threshold). */
  readonly progress: readonly number[];
  /** Nodes with progress >= engagedProgress at the saddle. */
  readonly engaged: readonly number[];
  /** Nodes that leave the start's level at the destination (tipped nodes; recovered ones for recovery). */
  readonly tipping: readonly number[];
  /** Integration times of the branch to the start and of the branch to the destination (NaN for a branch decided by order). */
  readonly travelTimes: readonly [number, number];
  /**
   * d progress / dp along the saddle's branch of equilibria, from dx/dp = -J_x^{-1} F_p (implicit
   * function theorem; roles held fixed); null when J_x is singular.
   */
  readonly slope: readonly number[] | null;
  /**
   * 'moving-edge': no saddle but a moving state on the start's basin boundary, found by edge tracking
   * (edge-exits.ts); `saddle` is then the snapshot of it with the most nodes engaged at once, and
   * travel times and slopes are not defined. Absent for index-1 saddles.
   */
  readonly via?: 'moving-edge';
}

export interface StartExits {
  /** Index of the start state among `states`, -1 when there is no stable start state. */
  readonly start: number;
  readonly states: readonly StableState[];
  readonly exits: Exit[];
  /** Saddles whose branch reached the start while the other branch reached no stable state. */
  readonly unresolvedExits: number;
  /** Saddles where the branch that could reach the start reached no stable state (left out). */
  readonly unresolvedSaddles: number;
  /** Saddles decided without any integration (order argument, see startExits). */
  readonly skipped: number;
  readonly integrations: number;
  /** Branches whose end the order decided without integrating (order 'decide', see orderedLimit). */
  readonly decided: number;
  /** Branches integrated where the order also decided and the two disagree (order 'verify'). */
  readonly orderMismatches: number;
  /** Stable states that integrated branches reached and `equilibria` did not hold (added with a warning). */
  readonly discovered: number;
  /** True when the integration budget ran out (the list is incomplete). */
  readonly truncated: boolean;
}

/**
 * Whether dx/dt = F(x, p) looks cooperative (every off-diagonal entry of J_x >= 0) at all the given
 * equilibria. For a cooperative system the flow preserves the componentwise order x <= y
 * (Kamke's condition; H. L. Smith, Monotone Dynamical Systems, AMS 1995, ch. 3). Only equilibria are
 * checked, so this is an assumption about the region between them, not a proof; diffusive coupling
 * `source - target` with non-negative weights and coupling strength satisfies it everywhere.
 */
export function looksCooperative(system: CompiledSystem, equilibria: readonly Equilibrium[], p: number): boolean {
  const n = system.dimension;
  for (const e of equilibria) {
    const jac = jacobianOf(system, e, p);
    let scale = 0;
    for (let k = 0; k < n * n; k++) scale = Math.max(scale, Math.abs(jac[k]));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      if (i !== j && jac[i * n + j] < -1e-12 * Math.max(1, scale)) return false;
    }
  }
  return true;
}

/**
 * a <= b componentwise, up to 1e-10 (1 + |b_i|): equilibria are refined to a residual of 1e-12, and
 * nodes that do not feel each other (one-way links) have truly equal components that differ in the last bits.
 */
const leq = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  for (let i = 0; i < a.length; i++) if (a[i] > b[i] + 1e-10 * (1 + Math.abs(b[i]))) return false;
  return true;
};

/**
 * Where a branch of the unstable manifold of an index-1 saddle x_s ends, decided by order alone, for
 * a cooperative system whose unstable eigenvector v is non-negative. The branch leaving along -v
 * (sign -1) is a decreasing orbit; every equilibrium y <= x_s other than x_s stays below it (order
 * preservation, Kamke's condition), and it converges (a bounded monotone orbit), so its limit is the
 * greatest equilibrium below x_s; the branch along +v ends at the least equilibrium above x_s
 * (H. L. Smith, Monotone Dynamical Systems, AMS 1995, Prop. 3.2.1 and ch. 2, the order-interval
 * argument of Dancer & Hess, J. reine angew. Math. 419, 1991 (from memory)). Among `all` (the known
 * equilibria) that extremal element must exist and be a stable state of `states`; the limit is an
 * equilibrium of the full set, and an unstable limit (the branch lying in another saddle's stable
 * manifold) is a saddle connection, which happens at isolated parameter values only, so a stable
 * extremal element of the known set is the limit whenever the known set holds every stable state.
 * Returns the index into `states`, or -1 when the order does not decide (no extremal element, or an
 * unstable one): the caller integrates then. Comparisons use `leq` (1e-10 relative), equality with
 * x_s by `sameState`.
 */
export function orderedLimit(xs: readonly number[], v: readonly number[], sign: 1 | -1, all: readonly (readonly number[])[], states: readonly StableState[], duplicateTolerance: number): number {
  const n = xs.length;
  // y lies on the branch's side when sign (y - x_s) >= 0 in every component and > 0 wherever v_i > 0
  // (x_s + sign eps v moves those components off x_s; components with v_i = 0, nodes upstream of the
  // saddle's unstable direction, stay exactly at x_s). A difference within the 1e-10 relative
  // tolerance is equality: equilibria that share an upstream node's value with x_s (one-way links)
  // do so exactly. On a component the branch moves clearly (v_i >= 1e-3) such a y is off the side; on
  // one it barely moves (1e-12 < v_i < 1e-3) equality cannot be told from a small difference, and the
  // order does not decide.
  const side: (readonly number[])[] = [];
  for (const y of all) {
    if (sameState(y, xs, duplicateTolerance)) continue;
    let on = true;
    for (let i = 0; i < n && on; i++) {
      const d = sign * (y[i] - xs[i]);
      const tol = 1e-10 * (1 + Math.abs(xs[i]));
      if (v[i] > 1e-12) {
        if (Math.abs(d) <= tol) {
          if (v[i] < 1e-3) return -1;
          on = false;
        } else if (d < 0) on = false;
      } else if (d < -tol) on = false;
    }
    if (on) side.push(y);
  }
  if (side.length === 0) return -1;
  // The extremal element: the greatest of `side` for the decreasing branch, the least for the increasing one.
  let best = side[0];
  for (const y of side) if (beyond(sign, best, y)) best = y;
  for (const y of side) if (!beyond(sign, y, best)) return -1;
  return states.findIndex((st) => sameState(st.x, best, duplicateTolerance));
}

/**
 * Whether the branch of an ordered saddle x_s leaving along sign × v can end at the start state (see
 * startExits): the start must lie below (above) x_s, and every equilibrium y below (above)
 * x0 = x_s + sign × step × v must lie below (above) the start. A module-level function rather than a
 * closure per saddle (one allocation less in the hottest loop of the labeller).
 */
function canReach(sign: 1 | -1, xs: readonly number[], v: readonly number[], step: number, xStart: readonly number[], all: readonly (readonly number[])[]): boolean {
  const x0 = xs.map((c, i) => c + sign * step * v[i]);
  if (sign < 0) {
    if (!leq(xStart, xs)) return false;
    for (const y of all) if (leq(y, x0) && !leq(y, xStart)) return false;
    return true;
  }
  if (!leq(xs, xStart)) return false;
  for (const y of all) if (leq(x0, y) && !leq(xStart, y)) return false;
  return true;
}

/** b is at least as extreme as a: b >= a for the decreasing branch (sign -1, its limit is the greatest element), b <= a for the increasing one. */
function beyond(sign: 1 | -1, a: readonly number[], b: readonly number[]): boolean {
  return sign < 0 ? leq(a, b) : leq(b, a);
}

/**
 * How startExits uses orderedLimit on ordered saddles (cooperative system, v >= 0): 'decide' takes its
 * answer instead of integrating wherever it decides; 'verify' integrates as always and counts the
 * branches where the two disagree (StartExits.orderMismatches); 'off' ignores it.
 */
export type ExitOrderMode = 'decide' | 'verify' | 'off';

/**
 * Exits of the start state (all-base, or all-tipped for recovery) at parameter p, integrating only
 * what an exit needs. For every index-1 saddle the branch that can reach the start is integrated
 * first; only when it ends at the start is the other branch followed (to its destination).
 *
 * When the system is cooperative (looksCooperative, `monotone`) and the unstable eigenvector v has one
 * sign, the branch from x0 = x_s - eps v decreases and the one from x_s + eps v increases: the first
 * stays below x_s and above every equilibrium y <= x0, the second the other way round (order
 * preservation, Smith 1995, ch. 3; v >= 0 is the Perron vector of a cooperative Jacobian). Such a
 * branch cannot end at the start when the start is not below (above) x_s, or when an equilibrium
 * y <= x0 (y >= x0) is not below (above) the start. Branches ruled out that way are not integrated;
 * a saddle with both ruled out costs nothing. Without `monotone` both branches of a saddle may be
 * needed: the one pointing towards the start (v . (x_start - x_s)) goes first. With `order` 'decide'
 * an ordered branch that is not ruled out ends where orderedLimit says, without integrating, whenever
 * it decides; with 'verify' every branch is integrated and disagreements are counted.
 */
export function startExits(
  system: CompiledSystem,
  p: number,
  equilibria: readonly Equilibrium[],
  roles: readonly NodeRoles[],
  start: StartState,
  monotone: boolean,
  settings: GraphSettings & Pick<RegimeOptions, 'engagedProgress'>,
  budget: IntegrationBudget,
  diagnostics: Diagnostic[],
  order: ExitOrderMode = 'off',
): StartExits {
  const targets = branchTargets(system, equilibria, roles, settings);
  const level: NodeState = start === 'all-tipped' ? 'tipped' : 'base';
  const s0 = targets.states.findIndex((s) => isAll(s.pattern, level));
  const empty = { states: targets.states, exits: [], unresolvedExits: 0, unresolvedSaddles: 0, skipped: 0, integrations: 0, decided: 0, orderMismatches: 0, discovered: 0, truncated: false };
  const knownStates = targets.states.length;
  if (s0 < 0) return { start: -1, ...empty };
  const xStart = targets.states[s0].x;
  const recovery = start === 'all-tipped';
  const frameRoles = frameRolesOf(roles, start);
  const exits: Exit[] = [];
  let unresolvedExits = 0;
  let unresolvedSaddles = 0;
  let skipped = 0;
  let integrations = 0;
  let truncated = false;
  const all = equilibria.map((e) => e.x);

  let decided = 0;
  let orderMismatches = 0;
  const follow = (saddle: Equilibrium, sign: 1 | -1, ordered: boolean): ManifoldBranch | null => {
    const limit = ordered && order !== 'off' ? orderedLimit(saddle.x, saddle.unstableVector!, sign, all, targets.states, settings.duplicateTolerance) : -1;
    if (order === 'decide' && limit >= 0) {
      decided++;
      return { reached: limit, time: Number.NaN, slowTime: Number.NaN };
    }
    if (budget.left < 1) { truncated = true; return null; }
    budget.left -= 1;
    integrations++;
    const b = followBranch(system, p, saddle, sign, targets, settings, diagnostics);
    if (limit >= 0 && b.reached >= 0 && b.reached !== limit) orderMismatches++;
    return b;
  };

  for (const saddle of equilibria.filter(isIndexOneSaddle)) {
    const v = saddle.unstableVector!;
    const xs = saddle.x;
    const step = settings.manifoldOffset * (1 + Math.max(...xs.map(Math.abs)));
    let toward: 1 | -1 = 1;
    let dot = 0;
    for (let i = 0; i < xs.length; i++) dot += v[i] * (xStart[i] - xs[i]);
    if (dot < 0) toward = -1;
    const ordered = monotone && v.every((c) => c >= -1e-12);
    const first: 1 | -1 = ordered ? (canReach(-1, xs, v, step, xStart, all) ? -1 : 1) : toward;
    const second: 1 | -1 = first === 1 ? -1 : 1;
    const firstCan = !ordered || canReach(first, xs, v, step, xStart, all);
    const secondCan = !ordered || canReach(second, xs, v, step, xStart, all);
    if (!firstCan && !secondCan) { skipped++; continue; }
    const a = firstCan ? follow(saddle, first, ordered) : null;
    if (truncated) break;
    let toStart: ManifoldBranch | null = null;
    let other: ManifoldBranch | null = null;
    if (a && a.reached === s0) {
      toStart = a;
      other = follow(saddle, second, ordered);
    } else {
      if (firstCan && a && a.reached < 0 && !secondCan) { unresolvedSaddles++; continue; }
      if (!secondCan) continue;
      const b = follow(saddle, second, ordered);
      if (truncated) break;
      if (!b) continue;
      if (b.reached !== s0) { if (b.reached < 0 || (a && a.reached < 0)) unresolvedSaddles++; continue; }
      toStart = b;
      other = firstCan ? a : follow(saddle, first, ordered);
    }
    if (truncated) break;
    if (!other || other.reached < 0) { unresolvedExits++; continue; }
    if (other.reached === s0) {
      diagnostics.push({ level: 'warning', code: 'manifold-same-end', p,
        message: `both branches of the unstable manifold of the saddle at [${xs.map(fmt).join(', ')}] (${system.parameter} = ${fmt(p)}) reach the ${start} state; it is not counted as an exit` });
      continue;
    }
    const frameX = recovery ? xs.map((c) => -c) : xs;
    const progress = progressOf(frameX, frameRoles);
    const destination = targets.states[other.reached].pattern;
    const engaged: number[] = [];
    const tipping: number[] = [];
    for (let i = 0; i < progress.length; i++) {
      if (progress[i] >= settings.engagedProgress) engaged.push(i);
      if (destination[i] !== level) tipping.push(i);
    }
    exits.push({ saddle: xs.slice(), destination: destination.slice(), progress, engaged, tipping, travelTimes: [toStart.time, other.time],
      slope: progressSlope(system, xs, p, frameRoles, recovery, tangentOf(system, saddle, p)) });
  }
  return { start: s0, states: targets.states, exits, unresolvedExits, unresolvedSaddles, skipped, integrations, decided, orderMismatches,
    discovered: targets.states.length - knownStates, truncated };
}
