/**
 * The weak-noise Markov chain of escape sequences over an escape graph (docs/noise.md,
 * "Weak-noise prediction").
 *
 * Model. At weak noise a path spends an exponentially distributed time in the basin of a stable
 * state i, with the total exit rate q_i = sum_e k_e, then crosses saddle e with probability k_e / q_i
 * and relaxes to the state on the other side; the relaxation (transit) time is O(|log level|) and is
 * neglected against 1 / q_i (Freidlin & Wentzell, Random Perturbations of Dynamical Systems, ch. 6;
 * Berglund 2013). Every transition carries the nodes that cross their escape thresholds along it, in
 * crossing order. The augmented chain has states (stable state, order of the nodes escaped so far,
 * returned-to-start flag); it only moves to longer orders, so it is solved block by block: within a
 * block (fixed order) the stable states form a continuous-time chain whose exits are the transitions
 * that add new escapes (and, before the first return, a visit to the start state). For a block with
 * entry distribution pi, the expected visits u solve (I - P)^T u = pi on the states that can reach an
 * exit (P the embedded jump matrix of the block's internal transitions), the expected time in the
 * block is sum_i u_i / q_i and the flow out of transition e from i is u_i k_e / q_i (Norris, Markov
 * Chains, 1997, Thm. 1.3.2 and 3.3.3, first-step analysis). States that cannot reach an exit trap
 * their mass ("stuck"). Dense LU (flat Float64Array, numerics/flat-lu.ts) per (escaped set, mode), so the work is about 2^n (states^3) plus
 * one solve per visited order prefix.
 */
import { FlatLu } from '../numerics/flat-lu';
import type { Diagnostic } from '../atlas/types';
import type { CancelSignal } from './types';

/** One directed transition of the chain. */
export interface ChainTransition {
  readonly from: number;
  readonly to: number;
  /** Natural log of the rate (1 / time unit); -Infinity for rate zero. Logs keep weak-noise rates from underflowing. */
  readonly logRate: number;
  /**
   * Nodes (indices) that pass their escape thresholds along the transition, in crossing order; the
   * nodes of one group cross together (a tie, e.g. by symmetry) and their orders share the group's
   * probability equally. Nodes that already escaped are ignored.
   */
  readonly crossings: readonly (readonly number[])[];
}

export interface EscapeChain {
  /** Number of stable states. */
  readonly states: number;
  /** Number of nodes (at most 30). */
  readonly nodes: number;
  /** Index of the start state. */
  readonly start: number;
  readonly transitions: readonly ChainTransition[];
}

export interface EscapeChainOptions {
  /** Cap on augmented states visited (blocks x stable states); default 2_000_000. Past it the remaining mass is dropped with a diagnostic. */
  readonly maxAugmentedStates: number;
  /** Probability below which missing mass (stuck or dropped) is not reported as a warning; default 1e-12. */
  readonly massTolerance: number;
  /** Checked before every block; when aborted the remaining mass is dropped with a 'prediction-cancelled' diagnostic. */
  readonly signal?: CancelSignal;
}

export const defaultEscapeChainOptions: EscapeChainOptions = { maxAugmentedStates: 2_000_000, massTolerance: 1e-12 };

export interface EscapeChainResult {
  /** Complete escape orders (node indices) and their probabilities, most likely first. */
  readonly sequences: { readonly order: number[]; readonly probability: number }[];
  /** Index k - 1: mean time to the k-th escape; Infinity where some mass never reaches k escapes. */
  readonly meanKthEscape: number[];
  /** Index k - 1: probability of ever reaching k escapes. */
  readonly reachProbability: number[];
  /** Probability of visiting the start state after a partial escape (0 < escaped < all), before completing. */
  readonly returnProbability: number;
  /** Probability mass that never completes: trapped in states without a way to further escapes, or dropped at the cap. */
  readonly incomplete: number;
  readonly augmentedStates: number;
  /** False when the cap was hit or the run was cancelled. */
  readonly complete: boolean;
  readonly diagnostics: Diagnostic[];
}

type Mode = 'free' | 'watch';

interface BlockSystem {
  /** Solvable states (can reach an exit) and their position in the LU. */
  readonly index: Int32Array;
  readonly members: number[];
  readonly lu: FlatLu | null;
  /** Per state: 1 / q_i (mean holding time). */
  readonly hold: Float64Array;
  /** Ways out of the block (transitions that add escapes), grouped by the order they append: (from, to, k / q_from * weight). */
  readonly exits: { readonly order: number[]; readonly mask: number; readonly moves: { from: number; to: number; jump: number }[] }[];
  /** Internal transitions with their jump probabilities. */
  readonly internal: { readonly t: ChainTransition; readonly jump: number }[];
}

/**
 * Probabilities of escape orders, mean k-th escape times and the return probability of the weak-noise
 * chain `chain` (method in the file head). Assumptions: rates are constant in time (exponential
 * holding times), transit times are negligible, escapes are counted at the transition. Never throws
 * for a well-formed chain; bad indices or more than 30 nodes throw a RangeError naming the field.
 */
export function solveEscapeChain(chain: EscapeChain, options?: Partial<EscapeChainOptions>): EscapeChainResult {
  const o = { ...defaultEscapeChainOptions, ...(options ?? {}) };
  const { states: ns, nodes, start } = chain;
  if (!(Number.isInteger(ns) && ns > 0)) throw new RangeError(`states: must be a positive integer, got ${ns}`);
  if (!(Number.isInteger(nodes) && nodes > 0 && nodes <= 30)) throw new RangeError(`nodes: must be an integer in 1..30, got ${nodes}`);
  if (!(Number.isInteger(start) && start >= 0 && start < ns)) throw new RangeError(`start: must be a state index, got ${start}`);
  if (!(Number.isInteger(o.maxAugmentedStates) && o.maxAugmentedStates > 0)) throw new RangeError(`maxAugmentedStates: must be a positive integer, got ${o.maxAugmentedStates}`);
  if (!(o.massTolerance >= 0 && o.massTolerance < 1)) throw new RangeError(`massTolerance: must be in [0, 1), got ${o.massTolerance}`);
  chain.transitions.forEach((t, k) => {
    if (!(t.from >= 0 && t.from < ns && t.to >= 0 && t.to < ns && Number.isInteger(t.from) && Number.isInteger(t.to))) {
      throw new RangeError(`transitions[${k}]: from/to must be state indices`);
    }
    if (Number.isNaN(t.logRate) || t.logRate === Infinity) throw new RangeError(`transitions[${k}].logRate: must be finite or -Infinity, got ${t.logRate}`);
    for (const g of t.crossings) for (const v of g) if (!(Number.isInteger(v) && v >= 0 && v < nodes)) throw new RangeError(`transitions[${k}].crossings: node ${v} out of range`);
  });
  const full = nodes === 30 ? 0x3fffffff : (1 << nodes) - 1;
  const diagnostics: Diagnostic[] = [];
  const cache = new Map<string, BlockSystem>();
  const live = chain.transitions.filter((t) => t.logRate > -Infinity);

  const systemFor = (mask: number, mode: Mode): BlockSystem => {
    const key = `${mode}:${mask}`;
    const hit = cache.get(key);
    if (hit) return hit;
    const logQ = new Float64Array(ns).fill(-Infinity);
    for (const t of live) logQ[t.from] = logAdd(logQ[t.from], t.logRate);
    const jumpOf = (t: ChainTransition) => Math.exp(t.logRate - logQ[t.from]);
    const exits: BlockSystem['exits'] = [];
    const internal: BlockSystem['internal'] = [];
    const exitByOrder = new Map<string, BlockSystem['exits'][number]>();
    for (const t of live) {
      const groups: number[][] = [];
      let seen = mask;
      for (const g of t.crossings) {
        const fresh = [...new Set(g)].filter((v) => !(seen & (1 << v)));
        for (const v of fresh) seen |= 1 << v;
        if (fresh.length > 0) groups.push(fresh);
      }
      if (groups.length > 0) {
        for (const tail of orderings(groups)) {
          const key = tail.order.join(',');
          let e = exitByOrder.get(key);
          if (!e) exitByOrder.set(key, (e = { order: tail.order, mask: tail.order.reduce((a, v) => a | (1 << v), 0), moves: [] }));
          e.moves.push({ from: t.from, to: t.to, jump: jumpOf(t) * tail.weight });
        }
      } else internal.push({ t, jump: jumpOf(t) });
    }
    exits.push(...exitByOrder.values());
    // Backward reachability of the exit events over internal transitions.
    const good = new Uint8Array(ns);
    for (const e of exits) for (const mv of e.moves) good[mv.from] = 1;
    const watchStart = mode === 'watch';
    let changed = true;
    while (changed) {
      changed = false;
      for (const { t } of internal) {
        if (watchStart && t.from === start) continue;
        if (!good[t.from] && (good[t.to] || (watchStart && t.to === start))) { good[t.from] = 1; changed = true; }
      }
    }
    if (watchStart) good[start] = 0;
    const members: number[] = [];
    const index = new Int32Array(ns).fill(-1);
    for (let i = 0; i < ns; i++) if (good[i]) { index[i] = members.length; members.push(i); }
    const m = members.length;
    let lu: FlatLu | null = null;
    if (m > 0) {
      // A^T with A = I - P restricted to the members: (A^T)[j][i] = delta_ij - P_ij.
      const at = new Float64Array(m * m);
      for (let k = 0; k < m; k++) at[k * m + k] = 1;
      for (const { t, jump } of internal) {
        const i = index[t.from];
        const j = index[t.to];
        if (i < 0 || j < 0) continue;
        at[j * m + i] -= jump;
      }
      lu = new FlatLu(m).factor(at);
    }
    const hold = logQ.map((v) => Math.exp(-v));
    const s: BlockSystem = { index, members, lu, hold, exits, internal };
    cache.set(key, s);
    return s;
  };

  interface Block { readonly order: number[]; readonly mask: number; readonly free: Float64Array; readonly watch: Float64Array }
  const levels: Map<string, Block>[] = Array.from({ length: nodes + 1 }, () => new Map());
  const entry = (order: number[], mask: number): Block => {
    const level = popcount(mask);
    const key = order.join(',');
    let b = levels[level].get(key);
    if (!b) levels[level].set(key, (b = { order, mask, free: new Float64Array(ns), watch: new Float64Array(ns) }));
    return b;
  };
  entry([], 0).free[start] = 1;

  const timeByLevel = new Float64Array(nodes + 1);
  const lostByLevel = new Float64Array(nodes + 1);
  const sequences: { order: number[]; probability: number }[] = [];
  let returned = 0;
  let augmented = 0;
  let capped = false;
  let cancelled = false;
  let solveFailures = 0;

  // Runs entry mass `pi` through the block system; sends exits on, returns mass that reached the start (watch mode).
  const run = (b: Block, pi: Float64Array, mode: Mode, level: number): { toStart: number } => {
    const sys = systemFor(b.mask, mode);
    let toStart = 0;
    let lost = 0;
    const m = sys.members.length;
    const rhs = new Float64Array(m);
    for (let i = 0; i < ns; i++) {
      if (pi[i] === 0) continue;
      if (mode === 'watch' && i === start) toStart += pi[i];
      else if (sys.index[i] >= 0) rhs[sys.index[i]] = pi[i];
      else lost += pi[i];
    }
    const u = m > 0 && rhs.some((v) => v !== 0) ? sys.lu!.solve(rhs) : new Float64Array(m);
    if (u === null) {
      solveFailures++;
      lostByLevel[level] += lost + rhs.reduce((a, v) => a + v, 0);
      return { toStart };
    }
    for (let k = 0; k < m; k++) timeByLevel[level] += u[k] * sys.hold[sys.members[k]];
    for (const { t, jump } of sys.internal) {
      const i = sys.index[t.from];
      if (i < 0 || u[i] === 0) continue;
      const flow = u[i] * jump;
      if (mode === 'watch' && t.to === start) toStart += flow;
      else if (sys.index[t.to] < 0) lost += flow;
    }
    for (const e of sys.exits) {
      const mask = b.mask | e.mask;
      // Level 0 has nothing escaped yet, so its visits to the start are no returns and its exits are not yet returned.
      const notReturned = (mode === 'watch' || level === 0) && mask !== full;
      let next: Block | null = null;
      for (const mv of e.moves) {
        const i = sys.index[mv.from];
        if (i < 0 || u[i] === 0) continue;
        next ??= entry([...b.order, ...e.order], mask);
        (notReturned ? next.watch : next.free)[mv.to] += u[i] * mv.jump;
      }
    }
    lostByLevel[level] += lost;
    return { toStart };
  };

  for (let level = 0; level <= nodes; level++) {
    for (const b of levels[level].values()) {
      if (level === nodes || b.mask === full) {
        let mass = 0;
        for (let i = 0; i < ns; i++) mass += b.free[i] + b.watch[i];
        sequences.push({ order: b.order, probability: mass });
        continue;
      }
      if (!cancelled && o.signal?.aborted) cancelled = true;
      if (cancelled || capped || augmented + ns > o.maxAugmentedStates) {
        if (!cancelled) capped = true;
        let mass = 0;
        for (let i = 0; i < ns; i++) mass += b.free[i] + b.watch[i];
        lostByLevel[level] += mass;
        continue;
      }
      augmented += ns;
      if (level > 0 && b.watch.some((v) => v !== 0)) {
        const { toStart } = run(b, b.watch, 'watch', level);
        returned += toStart;
        b.free[start] += toStart;
      }
      if (b.free.some((v) => v !== 0)) {
        run(b, b.free, 'free', level);
      }
    }
  }

  sequences.sort((a, b) => b.probability - a.probability || a.order.join(',').localeCompare(b.order.join(',')));
  const meanKthEscape: number[] = [];
  const reachProbability: number[] = [];
  let lostSoFar = 0;
  let timeSoFar = 0;
  for (let k = 1; k <= nodes; k++) {
    lostSoFar += lostByLevel[k - 1];
    timeSoFar += timeByLevel[k - 1];
    const reach = Math.max(0, 1 - lostSoFar);
    reachProbability.push(reach);
    meanKthEscape.push(lostSoFar > o.massTolerance ? Infinity : timeSoFar);
  }
  const incomplete = lostSoFar + lostByLevel[nodes];
  if (cancelled) {
    diagnostics.push({ level: 'warning', code: 'prediction-cancelled',
      message: `the escape chain was cancelled; probability ${fmtP(incomplete)} was not followed to the end` });
  } else if (capped) {
    diagnostics.push({ level: 'warning', code: 'prediction-chain-cap',
      message: `the escape chain reached its cap of ${o.maxAugmentedStates} augmented states; probability ${fmtP(incomplete)} was not followed to the end` });
  } else if (incomplete > o.massTolerance) {
    diagnostics.push({ level: 'warning', code: 'prediction-incomplete',
      message: `with probability ${fmtP(incomplete)} the chain never completes an escape sequence (it ends in states with no way to further escapes); mean times past that point are infinite` });
  }
  if (meanKthEscape.some((v, k) => v === Infinity && reachProbability[k] >= 1 - o.massTolerance)) {
    diagnostics.push({ level: 'warning', code: 'prediction-time-overflow',
      message: 'a predicted mean escape time exceeds the floating-point range (about 1e308 time units); it is reported as infinite' });
  }
  if (solveFailures > 0) {
    diagnostics.push({ level: 'error', code: 'prediction-singular',
      message: `${solveFailures} block systems of the escape chain were singular; their mass is counted as incomplete` });
  }
  return { sequences, meanKthEscape, reachProbability, returnProbability: returned, incomplete, augmentedStates: augmented, complete: !capped && !cancelled, diagnostics };
}

/** All orders of a list of tied groups, with weight 1 / prod |g|!. */
function orderings(groups: readonly number[][]): { order: number[]; weight: number }[] {
  let out: { order: number[]; weight: number }[] = [{ order: [], weight: 1 }];
  for (const g of groups) {
    const perms = permutations(g);
    const w = 1 / perms.length;
    out = out.flatMap((o) => perms.map((q) => ({ order: [...o.order, ...q], weight: o.weight * w })));
  }
  return out;
}

function permutations(a: readonly number[]): number[][] {
  if (a.length <= 1) return [a.slice()];
  return a.flatMap((v, i) => permutations([...a.slice(0, i), ...a.slice(i + 1)]).map((r) => [v, ...r]));
}

function logAdd(a: number, b: number): number {
  if (a === -Infinity) return b;
  if (b === -Infinity) return a;
  const m = Math.max(a, b);
  return m + Math.log(Math.exp(a - m) + Math.exp(b - m));
}

function popcount(m: number): number {
  let c = 0;
  for (let v = m; v; v &= v - 1) c++;
  return c;
}

function fmtP(v: number): string {
  return Number(v.toPrecision(3)).toString();
}
