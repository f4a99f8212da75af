import type { CompiledSystem } from '../model/compiled-system.js';
import { findScalarRoots } from '../numerics/scalar-roots.js';
import { newton } from '../numerics/newton.js';
import { distInf, normInf } from '../numerics/vector.js';
import type { Diagnostic } from './types.js';
import type { ResolvedTraceSettings } from './trace-settings.js';
import { patternCount, patternSpace, selectRestricted, type RestrictedCounts } from './start-selection.js';
import { firstPrimes, halton } from './interior-seeds.js';

/** How the combinations of element equilibria were restricted (absent: all were used). */
export interface StartRestriction {
  readonly maxOffBase: number;
  readonly counts: RestrictedCounts;
  /** Patterns used (the restricted set, capped at the budget). */
  readonly patterns: number;
  /** The budget of starts k was chosen for: min(startBudget, maxBranches). */
  readonly budget: number;
  /** Roots per node of the uncoupled elements at p = from, and the pattern space they span ("3^20"). */
  readonly rootCounts: readonly number[];
  readonly of: string;
  readonly ofCount: number;
}

export interface StartingEquilibria {
  readonly points: Float64Array[];
  /**
   * Restricted starts only: equilibria at the far end of the sweep (p = to) from near-uniform
   * guesses (farEndSeeds), traced like the others from there.
   */
  readonly farEnd?: Float64Array[];
  /** 'uncoupled' when built from per-node element equilibria, else 'multi-start'. */
  readonly method: 'uncoupled' | 'multi-start';
  readonly diagnostics: Diagnostic[];
  /** Set when the patterns were restricted (docs/numerics.md §12). */
  readonly restriction?: StartRestriction;
}

/** True when the network's coupling term vanishes at p = from (or the network has no links). */
export function isUncoupledAt(system: CompiledSystem, from: number): boolean {
  const net = system.network;
  if (!net) return false;
  if (net.links.length === 0) return true;
  return net.sweepIsCoupling ? from === 0 : net.couplingValue === 0;
}

/**
 * Starting equilibria at p = from.
 * Uncoupled network: node i's element equilibria are the roots of f_i(x; from) on
 * [-rootSearchBound, rootSearchBound] (sign-change scan, Newton with bisection fallback); every
 * combination is an equilibrium of the whole system because the coupling term vanishes. All
 * combinations are used up to maxStartCombinations (3^8); beyond that (or with startSelection
 * 'restricted') the restricted set of start-selection.ts for a budget of min(startBudget, maxBranches)
 * starts, with a diagnostic.
 * Coupled network (a sweep that starts at nonzero coupling): the same combinations as Newton guesses,
 * plus the multi-start guesses below. Otherwise: damped Newton from the document's start guesses,
 * the origin and multiStartCount quasi-random guesses (Halton sequence) in [-box, box]^n. Every
 * candidate is polished by Newton on the full system and duplicates (max-norm distance below 1e-7 (1 + |x|)) are dropped.
 */
export function findStartingEquilibria(system: CompiledSystem, from: number, s: ResolvedTraceSettings): StartingEquilibria {
  const n = system.dimension;
  const diagnostics: Diagnostic[] = [];
  const guesses: Float64Array[] = [];
  const uncoupled = isUncoupledAt(system, from);
  const method: StartingEquilibria['method'] = uncoupled ? 'uncoupled' : 'multi-start';
  let restriction: StartRestriction | undefined;
  if (system.network) {
    const c = elementCombinations(system, from, s, uncoupled, diagnostics);
    guesses.push(...c.guesses);
    restriction = c.restriction;
  }
  if (!uncoupled) {
    guesses.push(new Float64Array(n));
    const primes = firstPrimes(n);
    for (let k = 1; k <= s.multiStartCount; k++) {
      guesses.push(Float64Array.from(primes, (b) => (2 * halton(k, b) - 1) * s.multiStartBox));
    }
  }
  for (const g of system.start) if (g.length === n) guesses.unshift(Float64Array.from(g));
  const points: Float64Array[] = [];
  const seen = new DuplicateIndex();
  let failed = 0;
  for (const g of guesses) {
    const r = newton(system, g, from, { maxIterations: 60, stateBound: s.stateBound });
    if (!r.converged || !r.x.every(Number.isFinite)) {
      failed++;
      continue;
    }
    if (normInf(r.x) > s.stateBound) continue;
    if (seen.has(r.x)) continue;
    seen.add(r.x);
    points.push(r.x);
  }
  if (points.length === 0) {
    diagnostics.push({ level: 'warning', code: 'no-starting-equilibrium', message: `no equilibrium found at ${system.parameter} = ${from} (${guesses.length} guesses, ${failed} did not converge)`, p: from });
  }
  if (points.length > s.maxStartingPoints) {
    diagnostics.push({ level: 'warning', code: 'starting-points-capped', message: `${points.length} starting equilibria found; only the first ${s.maxStartingPoints} (maxStartingPoints) are traced` });
    points.length = s.maxStartingPoints;
  }
  // The far-end seeds count against the budget and against maxStartingPoints like every start.
  const farEnd = restriction ? farEndSeeds(system, s, Math.min(restriction.budget, s.maxStartingPoints) - points.length) : [];
  return { points, method, diagnostics, ...(restriction ? { restriction, farEnd } : {}) };
}

/**
 * Seeds at the far end of the sweep for a restricted trace (docs/numerics.md §12): under strong
 * diffusive coupling the network moves like one element, its equilibria near the uniform states
 * x = c (1, ..., 1) with c a root of the mean element rate (1/n) sum_i f_i(c; to) (the coupling term
 * vanishes on a uniform state; for unequal elements the states are only near uniform). The one
 * between the base-like and tipped-like roots is the synchronous saddle, the all-base state's only
 * exit in the strong regime, and its branch reaches p = from at a pattern with several threshold
 * nodes that the restricted set need not hold. Newton's method at p = to from each uniform guess;
 * converged, finite, distinct states, at most `room`.
 */
export function farEndSeeds(system: CompiledSystem, s: ResolvedTraceSettings, room: number): Float64Array[] {
  const net = system.network;
  if (!net || room <= 0) return [];
  const n = system.dimension;
  const p = s.to;
  const mean = (x: number) => {
    let v = 0;
    for (let i = 0; i < n; i++) v += net.elementRate(i, x, p);
    return v / n;
  };
  const slope = (x: number) => {
    let v = 0;
    for (let i = 0; i < n; i++) v += net.elementDerivative(i, x, p);
    return v / n;
  };
  const roots = [...findScalarRoots(mean, slope, -s.rootSearchBound, s.rootSearchBound, { cells: s.rootSearchCells }).roots].sort((a, b) => a - b);
  const out: Float64Array[] = [];
  const seen = new DuplicateIndex();
  for (const c of roots) {
    if (out.length >= room) break;
    const r = newton(system, new Float64Array(n).fill(c), p, { maxIterations: 60, stateBound: s.stateBound });
    if (!r.converged || !r.x.every(Number.isFinite) || normInf(r.x) > s.stateBound || seen.has(r.x)) continue;
    seen.add(r.x);
    out.push(r.x);
  }
  return out;
}

/**
 * The duplicate test of the starting equilibria, "some kept q with |q - x|_inf < 1e-7 (1 + |q|_inf)",
 * answered from buckets of the first coordinate instead of a scan of every kept point: a scan made
 * the 6,561 starts of an 8-node network quadratic (~21 million distances, half of that trace's time;
 * docs/numerics.md §11). Only buckets within the largest tolerance of any kept point are visited,
 * and every point there is tested by the same inequality, so the answer is the scan's.
 */
class DuplicateIndex {
  private static readonly width = 1e-3;
  private readonly buckets = new Map<number, Float64Array[]>();
  private maxTol = 0;

  private static cell(v: number): number {
    return Math.floor(v / DuplicateIndex.width);
  }

  has(x: Float64Array): boolean {
    if (this.buckets.size === 0) return false;
    const lo = DuplicateIndex.cell(x[0] - this.maxTol);
    const hi = DuplicateIndex.cell(x[0] + this.maxTol);
    if (!(hi - lo < 1e6)) {
      for (const list of this.buckets.values()) for (const q of list) if (distInf(q, x) < 1e-7 * (1 + normInf(q))) return true;
      return false;
    }
    for (let c = lo; c <= hi; c++) {
      const list = this.buckets.get(c);
      if (!list) continue;
      for (const q of list) if (distInf(q, x) < 1e-7 * (1 + normInf(q))) return true;
    }
    return false;
  }

  add(x: Float64Array): void {
    this.maxTol = Math.max(this.maxTol, 1e-7 * (1 + normInf(x)));
    const c = DuplicateIndex.cell(x[0]);
    const list = this.buckets.get(c);
    if (list) list.push(x);
    else this.buckets.set(c, [x]);
  }
}

/**
 * Every combination of per-node element equilibria at p = from (the roots of f_i(x; from) alone,
 * coupling left out), up to maxStartCombinations; beyond that, or with startSelection 'restricted',
 * the restricted set for startBudget (start-selection.ts), with a diagnostic. Exact equilibria of the network when the coupling
 * vanishes; when it does not, Newton guesses that converge for weak coupling, because a hyperbolic
 * equilibrium of the uncoupled system persists under small perturbation (implicit function theorem)
 * — without them, a sweep starting at a coupling of 1e-300 relied on quasi-random guesses alone and
 * could miss equilibria the sweep from 0 finds. Root-finding warnings only when `report` is set.
 */
function elementCombinations(system: CompiledSystem, from: number, s: ResolvedTraceSettings, report: boolean, diagnostics: Diagnostic[]): { guesses: Float64Array[]; restriction?: StartRestriction } {
  const net = system.network!;
  const n = system.dimension;
  const perNode: number[][] = [];
  for (let i = 0; i < n; i++) {
    const r = findScalarRoots(
      (x) => net.elementRate(i, x, from),
      (x) => net.elementDerivative(i, x, from),
      -s.rootSearchBound,
      s.rootSearchBound,
      { cells: s.rootSearchCells },
    );
    const roots = [...r.roots].sort((a, b) => a - b);
    perNode.push(roots);
    if (!report) continue;
    if (roots.length === 0) {
      diagnostics.push({ level: 'warning', code: 'no-element-equilibrium', message: `node ${net.nodeIds[i] ?? i} has no equilibrium in [-${s.rootSearchBound}, ${s.rootSearchBound}] at ${system.parameter} = ${from}` });
    }
    if (r.doubtful > 0) {
      diagnostics.push({ level: 'warning', code: 'element-root-doubtful', message: `node ${net.nodeIds[i] ?? i}: ${r.doubtful} element equilibria not refined to tolerance` });
    }
  }
  if (!perNode.every((r) => r.length > 0)) return { guesses: [] };
  let combos = 1;
  for (const r of perNode) combos *= r.length;
  const guesses: Float64Array[] = [];
  if (combos <= s.maxStartCombinations && s.startSelection !== 'restricted') {
    const idx = new Array<number>(n).fill(0);
    for (let c = 0; c < combos; c++) {
      guesses.push(Float64Array.from(perNode.map((r, i) => r[idx[i]])));
      for (let i = n - 1; i >= 0; i--) {
        idx[i]++;
        if (idx[i] < perNode[i].length) break;
        idx[i] = 0;
      }
    }
    return { guesses };
  }
  const rootCounts = perNode.map((r) => r.length);
  // Room for up to n states grown from the start state's escape graph (trace-diagram.ts).
  // Every start may become a branch: a budget above the branch cap would only be cut by it, and the
  // cut would fall on the patterns with the most nodes off base without k saying so.
  const budget = Math.max(2, Math.min(s.startBudget, s.maxBranches));
  const sel = selectRestricted(rootCounts, budget, n);
  for (const pat of sel.patterns) guesses.push(Float64Array.from(pat, (j, i) => perNode[i][j]));
  const of = patternSpace(rootCounts);
  if (report) diagnostics.push({
    level: 'info',
    code: 'start-patterns-limited',
    message: `${combos <= s.maxStartCombinations ? `startSelection 'restricted'` : `${formatCount(combos)} combinations of element equilibria (${of}) exceed the limit of ${s.maxStartCombinations} (maxStartCombinations)`}; starting from the ${sel.patterns.length} patterns with at most ${sel.maxOffBase} node${sel.maxOffBase === 1 ? '' : 's'} off base (tipped or at a threshold), all-tipped and its neighbouring saddles (a budget of ${budget} starts: ${budget < s.startBudget ? `maxBranches ${s.maxBranches}, below startBudget ${s.startBudget}` : `startBudget ${s.startBudget}`}), plus the document's start list`,
  });
  return {
    guesses,
    restriction: { maxOffBase: sel.maxOffBase, counts: sel.counts, patterns: sel.patterns.length, budget, rootCounts, of, ofCount: patternCount(rootCounts) },
  };
}

/** A count in words for messages: grouped digits up to 10^15, else scientific. */
export function formatCount(c: number): string {
  if (!(c < 1e15)) return c.toExponential(3);
  return String(Math.round(c)).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}
