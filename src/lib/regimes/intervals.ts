import type { Diagram, SpecialPoint } from '../atlas/types';
import type { CompiledSystem } from '../model/compiled-system';
import { eigenvalues, spectralScale } from '../numerics/index';

/** A cut of the parameter range: a special-point parameter value (or a sweep end) and the types there. */
export interface Cut {
  readonly p: number;
  readonly types: string[];
  /** The special points of the diagram that make this cut (none at a sweep bound). */
  readonly points: readonly SpecialPoint[];
}

/**
 * Cuts of [from, to]: both ends (type 'sweep-bound') and every special point of the diagram strictly
 * inside. Special points whose parameters differ by at most tolerance (1 + |p|) are one cut (mirror
 * images in a symmetric network share their parameter value); the cut keeps the smallest p and the
 * sorted set of types. A special point within tolerance of an end replaces 'sweep-bound' there.
 */
export function cutPoints(diagram: Diagram, from: number, to: number, tolerance = 1e-9, keep: (s: SpecialPoint) => boolean = () => true): Cut[] {
  const lo = Math.min(from, to);
  const hi = Math.max(from, to);
  const near = (a: number, b: number) => Math.abs(a - b) <= tolerance * (1 + Math.abs(a));
  const pts = diagram.bifurcations
    .filter((s) => keep(s) && Number.isFinite(s.p) && s.p >= lo - tolerance * (1 + Math.abs(lo)) && s.p <= hi + tolerance * (1 + Math.abs(hi)))
    .sort((a, b) => a.p - b.p);
  const cuts: { p: number; types: Set<string>; points: SpecialPoint[] }[] = [{ p: lo, types: new Set(['sweep-bound']), points: [] }];
  for (const s of pts) {
    const last = cuts[cuts.length - 1];
    if (near(last.p, s.p)) {
      if (last.types.has('sweep-bound')) last.types.delete('sweep-bound');
      last.types.add(s.type);
      last.points.push(s);
    } else cuts.push({ p: s.p, types: new Set([s.type]), points: [s] });
  }
  const last = cuts[cuts.length - 1];
  if (near(last.p, hi) && cuts.length > 1) last.p = hi;
  else cuts.push({ p: hi, types: new Set(['sweep-bound']), points: [] });
  return cuts.map((c) => ({ p: c.p, types: [...c.types].sort(), points: c.points }));
}

/** Name of a cut for RegimeBand.bounds: its types joined by ' + '. */
export function cutName(c: Cut): string {
  return c.types.join(' + ');
}

/**
 * Whether a special point can change the escape graph: the equilibria meeting there have k and k + 1
 * (fold, pitchfork, transcritical) or k and k + 2 (Hopf) unstable eigenvalues, where k counts the
 * eigenvalues of J_x at the point with Re > 1e-6 × max(1, max |lambda|) (the critical ones sit at
 * Re = 0). The graph only holds stable equilibria and index-1 saddles, so a point with k >= 2 changes
 * neither and is no cut. Degenerate points and points whose spectrum cannot be computed always count.
 */
export function changesEscapeGraph(system: CompiledSystem, s: SpecialPoint): boolean {
  if (s.type === 'degenerate') return true;
  const k = unstableCountAt(system, s);
  return k === null || k <= 1;
}

/**
 * k of changesEscapeGraph: the eigenvalues of J_x at the special point with Re > 1e-6 × max(1, max
 * |lambda|), not counting the critical ones; null when the state does not fit or the spectrum fails.
 */
export function unstableCountAt(system: CompiledSystem, s: SpecialPoint): number | null {
  const n = system.dimension;
  if (s.x.length !== n) return null;
  const jac = system.jacobian(Float64Array.from(s.x), s.p, new Float64Array(n * n));
  const spec = eigenvalues(jac, n);
  if (!spec.ok) return null;
  const eps = 1e-6 * spectralScale(spec);
  let k = 0;
  for (let i = 0; i < n; i++) if (spec.re[i] > eps) k++;
  return k;
}
