import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram, SpecialPoint } from '../atlas/types';
import type { EdgeKind, NodeState, Regime, StartState } from './types';
import { resolveOptions, type RegimeOptions } from './options';
import { elementRoles, fmt, stateRanges, type NodeRoles } from './element-roles';
import { analyseEquilibrium, certifiedStable, equilibriaAt, sameState, type Equilibrium } from './equilibria-at';
import type { IntegrationBudget } from './escape-graph';
import { frameRolesOf, looksCooperative, progressSlope, startExits, type Exit, type ExitOrderMode } from './start-exits';
import { newtonAtFixedParameter, tangentOf } from './linear-algebra';
import { progressOf } from './pattern';
import { unstableCountAt } from './intervals';
import { listNames, patternWords } from './reason';
import { updateSaddle, type SaddleUpdateOutcome } from './saddle-update';
import { edgeExits } from './edge-exits';

const updateOutcome: { reason: SaddleUpdateOutcome } = { reason: 'accepted' };
/** Outcomes of the eigenpair updates of continued saddles in this process (for measurements). */
export const saddleUpdates: Record<SaddleUpdateOutcome, number> = { accepted: 0, 'no-reference': 0, singular: 0, 'not-converged': 0, 'not-unstable': 0, separation: 0, parity: 0 };

/** The label at one parameter value, from the exits of the start state there. */
export interface PointLabel {
  readonly p: number;
  readonly start: StartState;
  /** null: no label here; `reason` says why. */
  readonly regime: Regime | null;
  readonly reason: string;
  readonly exits: readonly Exit[];
  /**
   * What the label rests on: the regime and, per exit, its engaged nodes and its destination's
   * changed nodes. Two parameter values with the same key have the same label for the same reasons.
   */
  readonly key: string;
  /** Set when the integration budget ran out at this p (regime is null). */
  readonly truncated?: boolean;
  /**
   * Ids of the diagram's branches that hold the equilibria the label rests on: the start state, every
   * exit saddle and every exit's destination. null when one of them lies on no branch of the diagram
   * (or the label has no start state). labelRegimes uses it to pass over cuts that cannot change the
   * label (docs/regimes.md, "Cuts that cannot change a label").
   */
  readonly restsOn?: readonly string[] | null;
}

/**
 * The labelling rule (docs/regimes.md, "The rule"), in the start's frame. weak: every exit ends in a
 * state whose changed nodes are exactly the nodes engaged at the saddle, and not in the opposite
 * uniform state. strong: exactly one exit, it ends in the opposite uniform state (all-tipped for
 * tipping) and every node is engaged at that saddle. intermediate: any other case with an exit.
 */
export function regimeOfExits(exits: readonly Pick<Exit, 'engaged' | 'tipping'>[], n: number): Regime | null {
  if (exits.length === 0) return null;
  if (exits.every((e) => isContained(e, n))) return 'weak';
  if (exits.length === 1 && exits[0].tipping.length === n && exits[0].engaged.length === n) return 'strong';
  return 'intermediate';
}

function isContained(e: Pick<Exit, 'engaged' | 'tipping'>, n: number): boolean {
  return e.tipping.length < n && e.tipping.length === e.engaged.length && e.tipping.every((i, k) => e.engaged[k] === i);
}

/** Kind of one exit, for the escape graph's edges: contained, together (synchronous) or cascading. */
export function exitKind(e: Pick<Exit, 'engaged' | 'tipping'>, n: number): EdgeKind {
  if (isContained(e, n)) return 'contained';
  if (e.tipping.length === n && e.engaged.length === n) return 'synchronous';
  return 'cascading';
}

export interface Labeller {
  /**
   * The label at p for the start state (cached by p). Never throws. `span`: an interval between
   * cuts that holds p (no special point inside joins an equilibrium with fewer than two unstable
   * eigenvalues); the stable states and index-1 saddles may then be continued from another labelled
   * point of the same span instead of refined from the diagram (continueFromNeighbour). Same label.
   */
  labelAt(p: number, start?: StartState, span?: readonly [number, number]): PointLabel;
  /** Roles at p (null entries where the element is not bistable). */
  rolesAt(p: number): (NodeRoles | null)[];
  /** Refined equilibria at p (cached by p). */
  equilibriaAt(p: number): Equilibrium[];
  /**
   * The equilibrium Newton's method at fixed p reaches from `guess`, with its progress and
   * d progress / dp in the start's frame (as Exit.progress and Exit.slope); null when Newton fails or
   * the roles depend on p (then progress is not the smooth function of p the root finder assumes).
   */
  progressAt(p: number, guess: readonly number[], start: StartState): { x: number[]; progress: number[]; slope: number[] | null } | null;
  /**
   * True once a check found the order of the equilibria unreliable here (a branch ending elsewhere
   * than the order says, or at a stable state the diagram does not show). Labels decided by order
   * before that (counts.decided) should then be recomputed without it; labelRegimes does.
   */
  readonly orderBroken: boolean;
  readonly names: readonly string[];
  readonly options: RegimeOptions;
  readonly budget: IntegrationBudget;
  /** Manifold-branch integrations and saddles decided without integrating, so far. */
  /** continued: points whose equilibria were continued from a neighbour in their span; continuationFallbacks: tries that failed (refined from the diagram instead). */
  /** decided: manifold branches whose end the order of the equilibria decided without integrating (orderedLimit). */
  /** acrossCuts: of the continued points, those continued from the other side of a saddle-node cut (continueAcrossCut). */
  readonly counts: { integrations: number; skipped: number; decided: number; points: number; continued: number; acrossCuts: number; continuationFallbacks: number; edgeTracks: number };
}

/**
 * A labeller for one model and diagram: `labelAt(p)` refines the equilibria the diagram shows at p
 * (equilibriaAt), finds the exits of the start state (startExits) and applies the rule
 * (regimeOfExits). Nothing depends on a sweep range or a neighbouring parameter value: the diagram
 * only supplies starting guesses for Newton's method, so two diagrams of the same model that both
 * show the equilibria at p give the same label there. Element roles are computed once when they do
 * not depend on p (coupling sweeps, given roles), else at p. Diagnostics go to `note`.
 */
export function createLabeller(system: CompiledSystem, diagram: Diagram, options?: Partial<RegimeOptions>, note: (d: Diagnostic) => void = () => {}): Labeller {
  const o = resolveOptions(options);
  const n = system.dimension;
  const names = system.network?.nodeIds ?? system.variables;
  const ranges = stateRanges(diagram, n);
  const fixedRoles = o.roles !== undefined || system.network?.sweepIsCoupling === true;
  let roles0: (NodeRoles | null)[] | null = null;
  const budget: IntegrationBudget = { left: o.maxIntegrations };
  const counts = { integrations: 0, skipped: 0, decided: 0, points: 0, continued: 0, acrossCuts: 0, continuationFallbacks: 0, edgeTracks: 0 };
  let orderTrusted = o.orderedLimits;
  const state = { orderBroken: false };
  const eqCache = new Map<number, EquilibriumSet>();
  /** Sets continued inside a span (stable states and index-1 saddles only), and the labelled p of each span. */
  const continued = new Map<number, EquilibriumSet>();
  const spans = new Map<string, number[]>();
  const labelCache = new Map<string, PointLabel>();

  const rolesAt = (p: number) => {
    if (fixedRoles && roles0) return roles0;
    const r = elementRoles(system, fixedRoles ? system.sweep.from : p, ranges, o.scanPoints, o.roles);
    r.diagnostics.forEach(note);
    if (fixedRoles) roles0 = r.roles;
    return r.roles;
  };
  const equilibriaFor = (p: number) => {
    let hit = eqCache.get(p);
    if (!hit) {
      // A diagram traced from another start can miss the branch of the start states (the continuation
      // found other equilibria first). The uncoupled all-base and all-tipped states, and each single
      // node at its threshold with the others at their base or tipped root, are tried as guesses too,
      // so that the label does not depend on which branches the diagram happened to trace.
      const roles = rolesAt(p);
      const extra: number[][] = [];
      if (roles.every((r) => r !== null)) {
        const rs = roles as NodeRoles[];
        extra.push(rs.map((r) => r.base), rs.map((r) => r.tipped));
        for (let i = 0; i < n; i++) {
          extra.push(rs.map((r, j) => (j === i ? r.threshold : r.base)), rs.map((r, j) => (j === i ? r.threshold : r.tipped)));
        }
      }
      const eq = equilibriaAt(system, diagram, p, o, extra);
      eq.diagnostics.forEach(note);
      hit = { equilibria: eq.equilibria, monotone: o.monotoneSkip && looksCooperative(system, eq.equilibria, p), verified: false };
      eqCache.set(p, hit);
    }
    return hit;
  };

  const equilibriaInSpan = (p: number, span: readonly [number, number] | undefined): EquilibriumSet => {
    const known = eqCache.get(p) ?? continued.get(p);
    if (known) return known;
    if (!span || !fixedRoles) return equilibriaFor(p);
    const key = `${span[0]}|${span[1]}`;
    let list = spans.get(key);
    if (!list) spans.set(key, (list = []));
    // The nearest labelled points of the span first; a point next to a cut is a poor source for one
    // farther in (a saddle near its fold moves like sqrt(p - p_fold), and the tangent predictor
    // overshoots onto its partner), so up to three are tried.
    const sources = list.slice().sort((u, v) => Math.abs(u - p) - Math.abs(v - p)).slice(0, 3);
    list.push(p);
    for (const near of sources) {
      const source = eqCache.get(near) ?? continued.get(near);
      if (!source) continue;
      const next = continueFromNeighbour(system, source, near, p, o);
      if (next) {
        counts.continued++;
        continued.set(p, next);
        return next;
      }
    }
    if (sources.length > 0) counts.continuationFallbacks++;
    else {
      // First point of its span: continue across the cut from the nearest point labelled on the other
      // side of it, when the cut is made of saddle-nodes only (continueAcrossCut).
      const across = acrossCut(p, span) ?? (o.mergeCuts ? acrossFolds(p) : null);
      if (across) {
        counts.continued++;
        counts.acrossCuts++;
        continued.set(p, across);
        return across;
      }
    }
    return equilibriaFor(p);
  };

  /** Unstable counts of special points (unstableCountAt), by id. */
  const unstableAt = new Map<string, number | null>();
  const unstableOf = (sp: SpecialPoint) => {
    if (!unstableAt.has(sp.id)) unstableAt.set(sp.id, unstableCountAt(system, sp));
    return unstableAt.get(sp.id)!;
  };
  /**
   * First point of its span, far from the cuts (labelRegimes samples across cuts that cannot change
   * the label): continue from the nearest labelled point over every special point in between
   * (continueAcrossFolds).
   */
  const acrossFolds = (p: number): EquilibriumSet | null => {
    let q = Number.NaN;
    for (const l of labelledPoints) if (l.p !== p && !(Math.abs(l.p - p) >= Math.abs(q - p))) q = l.p;
    const source = Number.isNaN(q) ? undefined : eqCache.get(q) ?? continued.get(q);
    if (!source) return null;
    const lo = Math.min(p, q);
    const hi = Math.max(p, q);
    const points = diagram.bifurcations.filter((sp) => sp.p > lo && sp.p < hi);
    const next = continueAcrossFolds(system, diagram, source, q, p, points, unstableOf, o);
    if (!next) counts.continuationFallbacks++;
    return next;
  };

  /** Every labelled p with its span, for acrossCut. */
  const labelledPoints: { p: number; span: readonly [number, number] }[] = [];
  const acrossCut = (p: number, span: readonly [number, number]): EquilibriumSet | null => {
    const reach = 4 * o.cutOffset * (1 + Math.abs(p));
    for (const cut of [span[0], span[1]]) {
      if (Math.abs(p - cut) > reach) continue;
      let q = Number.NaN;
      for (const l of labelledPoints) {
        const otherSide = (l.p - cut) * (p - cut) < 0 && (l.span[0] === cut || l.span[1] === cut);
        if (otherSide && Math.abs(l.p - p) <= 2 * reach && !(Math.abs(l.p - p) >= Math.abs(q - p))) q = l.p;
      }
      const source = Number.isNaN(q) ? undefined : eqCache.get(q) ?? continued.get(q);
      if (!source) continue;
      const points = diagram.bifurcations.filter((sp) => Math.abs(sp.p - cut) <= 1e-9 * (1 + Math.abs(cut)));
      if (points.length === 0 || points.some((sp) => sp.type !== 'saddle-node')) return null;
      const next = continueAcrossCut(system, diagram, source, q, p, points, o);
      if (!next) counts.continuationFallbacks++;
      return next;
    }
    return null;
  };

  const compute = (p: number, start: StartState, span: readonly [number, number] | undefined): PointLabel => {
    const none = (reason: string, code: string, extra: Partial<PointLabel> = {}): PointLabel => ({ p, start, regime: null, reason, exits: [], key: `none:${code}`, ...extra });
    const roles = rolesAt(p);
    if (roles.some((r) => r === null)) return none('regimes undefined: an element is not bistable', 'undefined');
    const set = equilibriaInSpan(p, span);
    if (span) labelledPoints.push({ p, span });
    const { equilibria, monotone } = set;
    const diagnostics: Diagnostic[] = [];
    // Order decides branch ends only on verified sets: a set where every branch was integrated, each
    // end agreed with the order and no stable state was missing, or a set continued one-to-one from
    // such a set (the same stable states, see continueFromNeighbour). One disagreement turns it off
    // for the rest of this labeller.
    const order: ExitOrderMode = !orderTrusted ? 'off' : set.verified ? 'decide' : 'verify';
    const found = startExits(system, p, equilibria, roles as NodeRoles[], start, monotone, o, budget, diagnostics, order);
    diagnostics.forEach(note);
    counts.integrations += found.integrations;
    counts.skipped += found.skipped;
    counts.decided += found.decided;
    if (order === 'verify' && found.orderMismatches === 0 && found.discovered === 0 && !found.truncated) set.verified = true;
    if (found.discovered > 0 && orderTrusted) {
      // A stable state the diagram does not show: spans between its special points may then hide
      // folds, and a continued set may lack states that exist at its p. No order decisions from here.
      orderTrusted = false;
      state.orderBroken = true;
    }
    if (found.orderMismatches > 0) {
      orderTrusted = false;
      state.orderBroken = true;
      note({ level: 'warning', code: 'order-mismatch', p,
        message: `at ${system.parameter} = ${fmt(p)} ${found.orderMismatches === 1 ? 'a manifold branch ends' : `${found.orderMismatches} manifold branches end`} elsewhere than the order of the equilibria says (some stable state is missing from the diagram, or the system is not cooperative between its equilibria); every later branch is integrated` });
    }
    counts.points++;
    if (found.truncated) return none('integration budget used up', 'budget', { truncated: true });
    if (found.start < 0) {
      note({ level: 'warning', code: 'no-start-state', p, message: `no stable ${start} state at ${system.parameter} = ${fmt(p)}; no label there for ${start}` });
      return none(`no stable ${start} state`, 'no-start');
    }
    if (found.unresolvedExits > 0) {
      return none(`the destination of ${found.unresolvedExits === 1 ? 'an exit' : `${found.unresolvedExits} exits`} could not be resolved`, 'unresolved');
    }
    let exits: readonly Exit[] = found.exits;
    let states = found.states;
    let movingEdge = false;
    if (exits.length === 0 && o.edgeTracking && found.states.length > 1) {
      // No index-1 saddle leads out, yet the start's basin has a boundary: track its edge state.
      const edgeNotes: Diagnostic[] = [];
      const edge = edgeExits(system, p, equilibria, found, roles as NodeRoles[], start, o, budget, edgeNotes);
      counts.edgeTracks++;
      counts.integrations += edge.integrations;
      if (edge.saddles.length > 0) {
        const more = startExits(system, p, [...equilibria, ...edge.saddles], roles as NodeRoles[], start, monotone, o, budget, edgeNotes, 'off');
        counts.integrations += more.integrations;
        if (more.truncated) { edgeNotes.forEach(note); return none('integration budget used up', 'budget', { truncated: true }); }
        if (more.exits.length > 0) {
          edgeNotes.push({ level: 'info', code: 'edge-saddle', p,
            message: `at ${system.parameter} = ${fmt(p)} edge tracking found ${more.exits.length === 1 ? 'an index-1 saddle' : `${more.exits.length} index-1 saddles`} out of the ${start} state that no branch of the diagram passes through; the label rests on ${more.exits.length === 1 ? 'it' : 'them'}` });
          exits = more.exits;
          states = more.states;
        }
      }
      if (exits.length === 0 && edge.moving.length > 0) {
        exits = edge.moving;
        movingEdge = true;
        edgeNotes.push({ level: 'info', code: 'moving-edge', p,
          message: `no index-1 saddle leads out of the ${start} state at ${system.parameter} = ${fmt(p)}; the label rests on a moving state on the boundary of its basin, found by edge tracking (docs/regimes.md, "Exits through a moving edge state")` });
      }
      edgeNotes.forEach(note);
      if (exits.length === 0 && edge.truncated) return none('integration budget used up', 'budget', { truncated: true });
    }
    if (exits.length === 0) {
      note({ level: 'warning', code: 'no-escape-route', p,
        message: `no index-1 saddle leads out of the ${start} state at ${system.parameter} = ${fmt(p)}${o.edgeTracking && found.states.length > 1 ? ', and edge tracking found no way out either' : ''}; no label there for ${start}` });
      return none(`no way out of ${start} found`, 'no-exit');
    }
    const regime = regimeOfExits(exits, n)!;
    // A moving edge state's snapshot (its engaged nodes) is one point of a moving set: the key holds
    // only where it leads, so that samples differing in the snapshot alone are not bisected.
    const exitKeys = exits.map((e) => (e.via ? `moving>${e.tipping.join(',')}` : `${e.engaged.join(',')}>${e.tipping.join(',')}`)).sort();
    // The reason is read only for the labels that end up standing for a piece: built on first use.
    let reason: string | null = null;
    const shown = exits;
    return { p, start, regime, get reason() { return (reason ??= reasonFor(regime, shown, names, start)); }, exits: shown, key: `${regime}|${exitKeys.join(';')}`,
      restsOn: movingEdge ? null : restsOn(p, equilibria, found.states[found.start].x, shown, states) };
  };

  /**
   * PointLabel.restsOn: the branch of each equilibrium the label rests on, checked against the
   * diagram (the branch must pass within 1e-2 (1 + |x|) of the state at p, as continueAcrossCut's
   * nearness test), so that a state whose Newton iteration landed on another branch than its guess
   * came from does not hide a cut.
   */
  const branchById = new Map(diagram.branches.map((b) => [b.id, b]));
  const onBranch = (e: Equilibrium, p: number): boolean => {
    const b = e.branch === undefined ? undefined : branchById.get(e.branch);
    if (!b) return false;
    const scale = 1e-2 * (1 + maxNormAbs(e.x));
    const pts = b.points;
    for (let k = 0; k + 1 < pts.length; k++) {
      const u = pts[k];
      const v = pts[k + 1];
      if ((u.p - p) * (v.p - p) > 0 || u.p === v.p) continue;
      const t = (p - u.p) / (v.p - u.p);
      let d = 0;
      for (let i = 0; i < n && d <= scale; i++) d = Math.max(d, Math.abs(u.x[i] + t * (v.x[i] - u.x[i]) - e.x[i]));
      if (d <= scale) return true;
    }
    return false;
  };
  const restsOn = (p: number, equilibria: readonly Equilibrium[], start: readonly number[], exits: readonly Exit[], states: readonly { x: readonly number[]; pattern: readonly NodeState[] }[]): string[] | null => {
    const find = (x: readonly number[]) => equilibria.find((e) => e.x === x) ?? equilibria.find((e) => sameState(e.x, x, o.duplicateTolerance));
    const held: (Equilibrium | undefined)[] = [find(start)];
    for (const e of exits) {
      held.push(find(e.saddle));
      const ends = states.filter((s) => s.pattern.every((v, i) => v === e.destination[i]));
      if (ends.length === 0) return null;
      for (const d of ends) held.push(find(d.x));
    }
    const ids = new Set<string>();
    for (const e of held) {
      if (!e || !onBranch(e, p)) return null;
      ids.add(e.branch!);
    }
    return [...ids].sort();
  };

  return {
    names, options: o, budget, counts,
    get orderBroken() { return state.orderBroken; },
    rolesAt,
    equilibriaAt: (p) => equilibriaFor(p).equilibria,
    progressAt(p, guess, start) {
      if (!fixedRoles) return null;
      const roles = rolesAt(p);
      if (roles.some((r) => r === null)) return null;
      const r = newtonAtFixedParameter(system, guess, p, o.newtonTolerance, o.newtonMaxIterations);
      if (!r.converged) return null;
      const x = Array.from(r.x);
      const frame = frameRolesOf(roles as NodeRoles[], start);
      const mirrored = start === 'all-tipped';
      return { x, progress: progressOf(mirrored ? x.map((c) => -c) : x, frame), slope: progressSlope(system, x, p, frame, mirrored) };
    },
    labelAt(p, start = 'all-base', span) {
      const k = `${start}|${p}`;
      let hit = labelCache.get(k);
      if (!hit) {
        try {
          hit = compute(p, start, span);
        } catch (e) {
          note({ level: 'error', code: 'regimes-failed', p,
            message: `regime analysis failed at ${system.parameter} = ${fmt(p)}: ${e instanceof Error ? e.message : String(e)}; no label there` });
          hit = { p, start, regime: null, reason: 'analysis failed', exits: [], key: 'none:failed' };
        }
        if (!hit.truncated) labelCache.set(k, hit);
      }
      return hit;
    },
  };
}

interface EquilibriumSet {
  readonly equilibria: Equilibrium[];
  readonly monotone: boolean;
  /** Branch ends may be decided by order here (set by compute after a clean check, inherited by continuation). */
  verified: boolean;
}

/**
 * The stable states and index-1 saddles at p, continued from a set at p0 of the same span: each by
 * the tangent predictor x + (p - p0) dx/dp (dx/dp = -J_x^{-1} F_p, implicit function theorem) and
 * Newton's method at fixed p, then its spectrum (for a stable state a Gershgorin certificate first,
 * certifiedStable). Inside a span no special point joins an equilibrium
 * with fewer than two unstable eigenvalues, so their number is the same at p0 and p; when every
 * continued point converges, is distinct from the others and keeps its number of unstable
 * eigenvalues, the continued points are therefore all of them (a one-to-one map onto a set of the
 * same size). Otherwise null, and the caller refines from the diagram. Equilibria with two or more
 * unstable eigenvalues are left out: the exits need only the others (startExits uses the rest only
 * to rule branches out without integrating, so without them it integrates more, never less), and
 * arrival balls are capped by arrivalRadius anyway. The cooperative flag is the source's, checked
 * again on the continued points.
 */
function continueFromNeighbour(system: CompiledSystem, source: EquilibriumSet, p0: number, p: number, o: RegimeOptions): EquilibriumSet | null {
  const out: Equilibrium[] = [];
  for (const e of source.equilibria) {
    if (e.neutral !== 0 || e.unstable > 1) continue;
    const guess = tangentGuess(system, e, p0, p);
    if (!guess) return null;
    const next = refineContinued(system, e, guess, p, out, o);
    if (!next) return null;
    if (next.unstable !== e.unstable || next.neutral !== 0 || (next.unstable === 1 && !next.unstableVector)) return null;
    out.push(next);
  }
  return { equilibria: out, monotone: source.monotone && looksCooperative(system, out, p), verified: source.verified };
}

/**
 * The stable states and index-1 saddles at p, continued from a set at p0 on the other side of a cut
 * made only of saddle-nodes (`points`, all at the cut's parameter value; those joining equilibria
 * with two or more unstable eigenvalues are ignored, the set holds none of them). Away from those points
 * nothing happens between p0 and p (the cut is the only special point between them that joins an
 * equilibrium with fewer than two unstable eigenvalues), so every equilibrium of the source that is
 * not within 1e-2 (1 + |x|) of a saddle-node continues as in continueFromNeighbour; at each
 * saddle-node two equilibria with k and k + 1 unstable eigenvalues meet and exist on one side only
 * (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., section 3.3), so the set loses or gains
 * the ones of them with at most one unstable eigenvalue: two when k = 0, one when k = 1. Those lost
 * are the source's equilibria near a saddle-node that do not continue; those gained are refined from
 * the diagram's own points near the saddle-node (equilibriaAt on the branches through it). The
 * change must have exactly the expected size, else null and the caller refines from the whole
 * diagram. The verified flag is the source's: the stable states are the source's plus the ones born
 * at the cut, which the diagram shows.
 */
function continueAcrossCut(system: CompiledSystem, diagram: Diagram, source: EquilibriumSet, p0: number, p: number, points: readonly SpecialPoint[], o: RegimeOptions): EquilibriumSet | null {
  // Saddle-nodes with k >= 2 (one-way links fold an upstream node at the same p for every state of the
  // nodes downstream) join only equilibria that the set leaves out.
  const relevant: SpecialPoint[] = [];
  let expected = 0;
  for (const sp of points) {
    const k = unstableCountAt(system, sp);
    if (k === null) return null;
    if (k > 1) continue;
    relevant.push(sp);
    expected += k === 0 ? 2 : 1;
  }
  const nearPoint = (x: readonly number[]) => relevant.some((sp) => maxNormDist(x, sp.x) <= 1e-2 * (1 + maxNormAbs(sp.x)));
  const out: Equilibrium[] = [];
  let changed = 0;
  for (const e of source.equilibria) {
    if (e.neutral !== 0 || e.unstable > 1) continue;
    const next = refineContinued(system, e, tangentGuess(system, e, p0, p) ?? e.x.slice(), p, out, o);
    const ok = next !== null && next.unstable === e.unstable && next.neutral === 0 && (next.unstable !== 1 || next.unstableVector !== undefined)
      && maxNormDist(next.x, e.x) <= 1e-2 * (1 + maxNormAbs(e.x));
    if (ok) { out.push(next); continue; }
    if (!nearPoint(e.x)) return null;
    changed++;
  }
  const ids = new Set(relevant.flatMap((sp) => sp.branches));
  const local: Diagram = {
    ...diagram,
    bifurcations: [],
    branches: diagram.branches.filter((b) => ids.has(b.id)).map((b) => ({ ...b, points: b.points.filter((q) => nearPoint(q.x)) })),
  };
  for (const e of equilibriaAt(system, local, p, o).equilibria) {
    if (e.neutral !== 0 || e.unstable > 1 || (e.unstable === 1 && !e.unstableVector)) continue;
    if (out.some((f) => sameState(f.x, e.x, o.duplicateTolerance))) continue;
    if (!nearPoint(e.x)) return null;
    out.push(e);
    changed++;
  }
  if (changed !== expected) return null;
  return { equilibria: out, monotone: source.monotone && looksCooperative(system, out, p), verified: source.verified };
}

/** continueAcrossFolds gives up beyond this many saddle-nodes between the two parameter values (common practice, no source: the chance that every fold's pair is matched falls with their number). */
const MAX_FOLDS_ACROSS = 8;

/**
 * The stable states and index-1 saddles at p, continued from a set at p0 over the special points
 * between them (`points`), when those that join an equilibrium with fewer than two unstable
 * eigenvalues are all saddle-nodes (at most MAX_FOLDS_ACROSS of them; else null). The rule of
 * continueAcrossCut, with the diagram's branches instead of nearness to the fold telling which
 * equilibria a fold takes away or brings: every equilibrium of the source is continued (tangent
 * predictor and Newton's method at p); one that does not continue with the same number of unstable
 * eigenvalues must lie on a branch through one of the folds (else null), and the equilibria the
 * branches through the folds show at p (equilibriaAt on those branches alone) that the continued
 * ones do not hold are added. Each fold with k = 0 takes away or brings two of them, with k = 1 one
 * (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., section 3.3); the change must have
 * exactly that size, else null and the caller refines from the whole diagram.
 */
function continueAcrossFolds(system: CompiledSystem, diagram: Diagram, source: EquilibriumSet, p0: number, p: number, points: readonly SpecialPoint[], unstableOf: (sp: SpecialPoint) => number | null, o: RegimeOptions): EquilibriumSet | null {
  const folds: SpecialPoint[] = [];
  let expected = 0;
  for (const sp of points) {
    const k = unstableOf(sp);
    if (k === null) return null;
    if (k > 1) continue;
    if (sp.type !== 'saddle-node' || folds.length === MAX_FOLDS_ACROSS) return null;
    folds.push(sp);
    expected += k === 0 ? 2 : 1;
  }
  const through = new Set(folds.flatMap((sp) => sp.branches));
  const out: Equilibrium[] = [];
  let changed = 0;
  for (const e of source.equilibria) {
    if (e.neutral !== 0 || e.unstable > 1) continue;
    const next = refineContinued(system, e, tangentGuess(system, e, p0, p) ?? e.x.slice(), p, out, o);
    if (next !== null && next.unstable === e.unstable && next.neutral === 0 && (next.unstable !== 1 || next.unstableVector !== undefined)) {
      out.push(next);
      continue;
    }
    if (e.branch === undefined || !through.has(e.branch) || ++changed > expected) return null;
  }
  if (folds.length > 0) {
    const local: Diagram = { ...diagram, bifurcations: [], branches: diagram.branches.filter((b) => through.has(b.id)) };
    for (const e of equilibriaAt(system, local, p, o).equilibria) {
      if (e.neutral !== 0 || e.unstable > 1 || (e.unstable === 1 && !e.unstableVector)) continue;
      if (out.some((f) => sameState(f.x, e.x, o.duplicateTolerance))) continue;
      out.push(e);
      changed++;
    }
  }
  if (changed !== expected) return null;
  return { equilibria: out, monotone: source.monotone && looksCooperative(system, out, p), verified: source.verified };
}

/** Tangent predictor x + (p - p0) dx/dp with dx/dp = -J_x^{-1} F_p at (x, p0) (tangentOf); null when J_x is singular. */
function tangentGuess(system: CompiledSystem, e: Equilibrium, p0: number, p: number): number[] | null {
  const dx = tangentOf(system, e, p0);
  if (!dx) return null;
  const out = new Array<number>(dx.length);
  for (let i = 0; i < dx.length; i++) out[i] = e.x[i] + (p - p0) * dx[i];
  return out;
}

/**
 * Newton's method at fixed p from `guess`, then the spectrum (a Gershgorin certificate first for a
 * continued stable state); null when Newton fails or lands on an equilibrium already in `out`.
 */
function refineContinued(system: CompiledSystem, e: Equilibrium, guess: readonly number[], p: number, out: readonly Equilibrium[], o: RegimeOptions): Equilibrium | null {
  const r = newtonAtFixedParameter(system, guess, p, o.newtonTolerance, o.newtonMaxIterations);
  if (!r.converged || out.some((f) => sameState(f.x, r.x, o.duplicateTolerance))) return null;
  if (e.unstable === 0) return certifiedStable(system, r.x, p, r.residual, o.hyperbolicTolerance, e.branch);
  if (e.unstable === 1 && o.saddleUpdate) {
    const u = updateSaddle(system, r.x, p, r.residual, o.hyperbolicTolerance, e, updateOutcome);
    saddleUpdates[updateOutcome.reason]++;
    if (u) return u;
  }
  return analyseEquilibrium(system, r.x, p, r.residual, o.hyperbolicTolerance, e.branch);
}

const maxNormAbs = (x: readonly number[]) => { let m = 0; for (const v of x) m = Math.max(m, Math.abs(v)); return m; };
const maxNormDist = (a: readonly number[], b: readonly number[]) => { let m = 0; for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i])); return m; };

/**
 * The label at one parameter value: createLabeller(system, diagram, options).labelAt(p, start).
 * For many values use one labeller, which caches the equilibria and labels by p.
 */
export function labelAt(system: CompiledSystem, diagram: Diagram, p: number, options?: Partial<RegimeOptions>, start: StartState = 'all-base'): PointLabel {
  return createLabeller(system, diagram, options).labelAt(p, start);
}

/** Name of an exit for texts: "the exit over a and b" (its engaged nodes, else the node furthest along). */
export function exitName(e: Pick<Exit, 'engaged' | 'progress'>, names: readonly string[]): string {
  if (e.engaged.length > 0) return `the exit over ${listNames(e.engaged.map((i) => names[i]))}`;
  let best = 0;
  for (let i = 1; i < e.progress.length; i++) if (e.progress[i] > e.progress[best]) best = i;
  return `the exit nearest ${names[best]}`;
}

function reasonFor(regime: Regime, exits: readonly Exit[], names: readonly string[], start: StartState): string {
  const recovery = start === 'all-tipped';
  const partial = recovery ? 'partially recovered' : 'partially tipped';
  const verb = recovery ? 'recovering' : 'tipping';
  const verbPlural = recovery ? 'recover' : 'tip';
  const n = names.length;
  const uniq = (xs: string[]) => [...new Set(xs)];
  const contained = uniq(exits.filter((e) => isContained(e, n)).map((e) => patternWords(e.destination as NodeState[], names)));
  const containedText = `stable ${partial} state${contained.length > 1 ? 's' : ''} reached from ${start}: ${contained.join('; ')}`;
  if (regime === 'weak') return containedText;
  if (regime === 'strong') {
    return exits[0].via
      ? `one way out of ${start}: ${listNames(names.slice())} ${verbPlural} together (no saddle leads out; every node is engaged at once on the state moving along the basin boundary)`
      : `one way out of ${start}: ${listNames(names.slice())} ${verbPlural} together (every node engaged at the one exit saddle)`;
  }
  const others = exits.filter((e) => !isContained(e, n));
  const texts = uniq(others.map((e) => {
    const target = patternWords(e.destination as NodeState[], names);
    if (e.via) {
      const most = e.engaged.length === 0 ? 'no node' : `at most ${e.engaged.length} of ${n} nodes (${listNames(e.engaged.map((i) => names[i]))} in one snapshot)`;
      return `no saddle leads out: a state moving along the basin boundary (edge tracking) has ${most} engaged at once, and leaving it ends in ${target}`;
    }
    const committed = e.tipping.filter((i) => !e.engaged.includes(i));
    const pulledBack = e.engaged.filter((i) => !e.tipping.includes(i));
    if (committed.length > 0) {
      const lead = e.engaged.length > 0 ? listNames(e.engaged.map((i) => names[i])) : exitName(e, names).replace('the exit nearest ', '');
      return `${lead} ${verb} first commits ${listNames(committed.map((i) => names[i]))}, reaching ${target}`;
    }
    if (pulledBack.length > 0) {
      return `${listNames(pulledBack.map((i) => names[i]))} engaged at ${exitName(e, names)} but pulled back, reaching ${target}`;
    }
    return `${listNames(e.tipping.map((i) => names[i]))} ${verbPlural} together through one of ${exits.length} ways out, reaching ${target}`;
  }));
  const parts = [`${exits.length === 1 ? 'one way' : `${exits.length} ways`} out of ${start}, not all contained: ${texts.join('; or ')}`];
  if (contained.length > 0) parts.push(`still contained: ${contained.join('; ')}`);
  return parts.join('; ');
}
