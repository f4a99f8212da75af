import type { RegimeBand } from './types';

/** What a band's edge is, read from its `bounds` text (see RegimeBand.bounds). */
export type BandEdgeKind = 'special point' | 'saddle connection' | 'engagement crossover' | 'label undefined' | 'sweep bound';

const LOCATED = ['saddle connection', 'engagement crossover', 'label undefined'] as const;

/** 'sweep-bound' -> sweep bound; 'saddle connection: ...' -> saddle connection; special-point types -> special point. */
export function bandEdgeKind(bound: string): BandEdgeKind {
  if (bound === 'sweep-bound') return 'sweep bound';
  const colon = bound.indexOf(':');
  const head = colon > 0 ? bound.slice(0, colon) : '';
  return (LOCATED as readonly string[]).includes(head) ? (head as BandEdgeKind) : 'special point';
}

/** Whether the edge was located by bisection (a crossover), not a special point or a sweep end. */
export const isLocatedEdge = (bound: string): boolean => {
  const k = bandEdgeKind(bound);
  return k === 'saddle connection' || k === 'engagement crossover';
};

/** The located crossovers at band edges, from the bands alone: p, kind and the words of `bounds`. */
export function locatedBandEdges(bands: readonly RegimeBand[]): { p: number; kind: BandEdgeKind; text: string }[] {
  const out: { p: number; kind: BandEdgeKind; text: string }[] = [];
  const seen = new Set<string>();
  for (const b of bands) {
    for (const [p, bound] of [[b.from, b.bounds[0]], [b.to, b.bounds[1]]] as const) {
      if (bound === undefined || !isLocatedEdge(bound)) continue;
      const key = `${p}|${bound}`;
      if (seen.has(key)) continue;
      seen.add(key);
      out.push({ p, kind: bandEdgeKind(bound), text: bound });
    }
  }
  return out.sort((u, v) => u.p - v.p);
}
