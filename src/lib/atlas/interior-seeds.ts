import type { CompiledSystem } from '../model/compiled-system.js';
import { BorderedWorkspace, nullSpace, tangentAt } from '../numerics/bordered.js';
import { newton } from '../numerics/newton.js';
import { distInf, normInf } from '../numerics/vector.js';
import { branchPolylines, polylineIndex } from './diagram-agreement.js';
import type { ResolvedTraceSettings } from './trace-settings.js';
import type { Branch } from './types.js';

/**
 * Seeds inside the sweep (docs/numerics.md, "Branches that do not reach the sweep's start"). The
 * starting equilibria at p = from lie on every branch that reaches p = from, but a branch can lie
 * wholly inside the sweep: a pair born at a saddle-node at p1 > from (e.g. a lake chain whose
 * downstream elements are not bistable alone, where coupling creates a tipped pair; docs/maps.md
 * §5) or a closed loop (isola). Such branches are found only from an equilibrium on them. So at
 * `interiorSeedValues` parameter values — the far end p = to and values evenly inside (from, to) —
 * Newton's method runs from the document's start guesses and `multiStartCount` quasi-random guesses
 * (Halton sequence, as for a coupled start) in [-multiStartBox, multiStartBox]^n; every converged,
 * finite, distinct equilibrium is a seed (y = [x, p]). Seeds on a branch already traced are skipped by
 * the trace like any start, so the cost is the Newton solves, plus the branches that were missing.
 * There is no guarantee: a branch that no guess converges to at any of the values stays missing.
 */
export function interiorSeeds(system: CompiledSystem, s: ResolvedTraceSettings): Float64Array[] {
  const count = s.interiorSeedValues;
  if (!(count > 0) || s.multiStartCount <= 0) return [];
  const n = system.dimension;
  const values: number[] = [s.to];
  for (let k = 1; k < count; k++) values.push(s.to + ((s.from - s.to) * k) / count);
  const primes = firstPrimes(n);
  const guesses: Float64Array[] = [];
  for (const g of system.start) if (g.length === n) guesses.push(Float64Array.from(g));
  for (let k = 1; k <= s.multiStartCount; k++) guesses.push(Float64Array.from(primes, (b) => (2 * halton(k, b) - 1) * s.multiStartBox));
  const out: Float64Array[] = [];
  for (const p of values) {
    const seen: Float64Array[] = [];
    for (const g of guesses) {
      const r = newton(system, g, p, { maxIterations: 60, stateBound: s.stateBound });
      if (!r.converged || !r.x.every(Number.isFinite) || normInf(r.x) > s.stateBound) continue;
      if (seen.some((q) => distInf(q, r.x) < 1e-7 * (1 + normInf(q)))) continue;
      seen.push(r.x);
      const y = new Float64Array(n + 1);
      y.set(r.x);
      y[n] = p;
      out.push(y);
    }
  }
  return out;
}

/**
 * The seeds that lie on none of `branches`: for each, the tangent of the equilibrium curve through it
 * (null vector of [J_x | F_p]) and BranchIndex.findParallel against the branches' polylines with the
 * trace's merge tolerance 1e-7 (1 + |y|) + 0.05 maxStep (a seed between two traced points is on the
 * branch; a seed where another branch crosses it has a tangent that is not parallel). In seed order.
 */
export function untracedSeeds(system: CompiledSystem, seeds: readonly Float64Array[], branches: readonly Branch[], o: { cellWidth: number; maxStep: number }): Float64Array[] {
  if (seeds.length === 0) return [];
  const n = system.dimension;
  const { index } = polylineIndex(branchPolylines(branches, n), n, o.cellWidth, o.maxStep);
  const ws = new BorderedWorkspace(n);
  const out: Float64Array[] = [];
  for (const y of seeds) {
    const ns = nullSpace(system, y, ws);
    if (ns.vectors.length === 0) continue;
    const tan = tangentAt(system, y, ns.vectors[0], ws);
    const t = tan.ok ? tan.tangent : ns.vectors[0];
    if (index.findParallel(y, t, 1e-7 * (1 + normInf(y)) + 0.05 * o.maxStep, () => false)) continue;
    out.push(y);
  }
  return out;
}

/** k-th element of the van der Corput sequence in base b (Halton 1960), in (0, 1). */
export function halton(k: number, b: number): number {
  let f = 1;
  let r = 0;
  let i = k;
  while (i > 0) {
    f /= b;
    r += f * (i % b);
    i = Math.floor(i / b);
  }
  return r;
}

export function firstPrimes(count: number): number[] {
  const out: number[] = [];
  for (let c = 2; out.length < count; c++) if (out.every((q) => c % q !== 0)) out.push(c);
  return out;
}
