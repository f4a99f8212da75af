import type { Diagram } from '../atlas/types';

/** A cut of the parameter range: a special-point parameter value (or a sweep end) and the types there. */
export interface Cut { readonly p: number; readonly types: string[] }

/**
 * Cuts of [from, to]: both ends (type 'sweep-bound') and every special point of the diagram strictly
 * inside. Special points whose parameters differ by at most tolerance (1 + |p|) are one cut (mirror
 * images in a symmetric network share their parameter value); the cut keeps the smallest p and the
 * sorted set of types. A special point within tolerance of an end replaces 'sweep-bound' there.
 */
export function cutPoints(diagram: Diagram, from: number, to: number, tolerance = 1e-9): Cut[] {
  const lo = Math.min(from, to);
  const hi = Math.max(from, to);
  const near = (a: number, b: number) => Math.abs(a - b) <= tolerance * (1 + Math.abs(a));
  const pts = diagram.bifurcations
    .filter((s) => Number.isFinite(s.p) && s.p >= lo - tolerance * (1 + Math.abs(lo)) && s.p <= hi + tolerance * (1 + Math.abs(hi)))
    .map((s) => ({ p: s.p, type: s.type as string }))
    .sort((a, b) => a.p - b.p);
  const cuts: { p: number; types: Set<string> }[] = [{ p: lo, types: new Set(['sweep-bound']) }];
  for (const s of pts) {
    const last = cuts[cuts.length - 1];
    if (near(last.p, s.p)) {
      if (last.types.has('sweep-bound')) last.types.delete('sweep-bound');
      last.types.add(s.type);
    } else cuts.push({ p: s.p, types: new Set([s.type]) });
  }
  const last = cuts[cuts.length - 1];
  if (near(last.p, hi) && cuts.length > 1) last.p = hi;
  else cuts.push({ p: hi, types: new Set(['sweep-bound']) });
  return cuts.map((c) => ({ p: c.p, types: [...c.types].sort() }));
}

/** Name of a cut for RegimeBand.bounds: its types joined by ' + '. */
export function cutName(c: Cut): string {
  return c.types.join(' + ');
}
