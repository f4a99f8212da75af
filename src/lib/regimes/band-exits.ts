import type { BandExit, EdgeKind, RegimeBand } from './types';
import { listNames, patternWords } from './reason';

/** Words for the kind of an exit, as in the escape-graph drawing's legend. */
export const EXIT_KIND_WORDS: Record<EdgeKind, string> = {
  contained: 'contained',
  cascading: 'cascading',
  synchronous: 'together',
};

/** One row of a band's exit table, in words a modeler reads (node ids, not indices). */
export interface BandExitRow {
  /** "over lake1 and lake2", or "saddle 3" when no node is engaged there; for a moving edge state (BandExit.via) words saying so. */
  readonly exit: string;
  /** Engaged nodes ("none" when no node reaches the engagement threshold); for a moving edge state, those of its snapshot with the most engaged at once. */
  readonly engaged: string;
  /** What happens beyond the engaged nodes: "lake2 and lake3 follow", "lake1 pulled back", or "—". */
  readonly then: string;
  /** The destination state: "lake1 tipped, lake2 and lake3 base", "all tipped". */
  readonly leadsTo: string;
  readonly kind: EdgeKind;
  readonly kindWords: string;
}

/** Rows of the exit table of a band (empty for results stored without exits), ordered by engaged nodes. */
export function bandExitRows(band: Pick<RegimeBand, 'exits'>, names: readonly string[]): BandExitRow[] {
  const exits = [...(band.exits ?? [])].sort(byEngaged);
  return exits.map((e, k) => {
    const engaged = e.engaged.map((i) => names[i] ?? `#${i}`);
    const follow = e.tipping.filter((i) => !e.engaged.includes(i)).map((i) => names[i] ?? `#${i}`);
    const back = e.engaged.filter((i) => !e.tipping.includes(i)).map((i) => names[i] ?? `#${i}`);
    const then = [follow.length > 0 ? `${listNames(follow)} follow${follow.length === 1 ? 's' : ''}` : '', back.length > 0 ? `${listNames(back)} pulled back` : '']
      .filter(Boolean).join('; ');
    return {
      exit: e.via ? 'a state moving along the basin boundary (no saddle; edge tracking)' : engaged.length > 0 ? `over ${listNames(engaged)}` : `saddle ${k + 1}`,
      engaged: engaged.length > 0 ? listNames(engaged) : 'none',
      then: then || '—',
      leadsTo: patternWords(e.destination, names),
      kind: e.kind,
      kindWords: EXIT_KIND_WORDS[e.kind],
    };
  });
}

/**
 * The one-line summary above the table: "2 ways out of all-base, both contained";
 * "3 ways out of all-base: 1 contained, 2 cascading"; "one way out of all-base: all nodes together".
 * Null for results stored without exits (the panel then shows the reason text alone).
 */
export function bandExitSummary(band: Pick<RegimeBand, 'exits' | 'start'>): string | null {
  const exits = band.exits;
  if (!exits || exits.length === 0) return null;
  const start = band.start ?? 'all-base';
  const counts = new Map<EdgeKind, number>();
  for (const e of exits) counts.set(e.kind, (counts.get(e.kind) ?? 0) + 1);
  const ways = exits.length === 1 ? `one way out of ${start}` : `${exits.length} ways out of ${start}`;
  if (counts.size === 1) {
    const kind = exits[0].kind;
    if (exits.length === 1) return `${ways}: ${kind === 'synchronous' ? 'all nodes together' : EXIT_KIND_WORDS[kind]}`;
    return `${ways}, ${exits.length === 2 ? 'both' : 'all'} ${EXIT_KIND_WORDS[kind]}`;
  }
  const order: EdgeKind[] = ['contained', 'cascading', 'synchronous'];
  return `${ways}: ${order.filter((k) => counts.has(k)).map((k) => `${counts.get(k)} ${EXIT_KIND_WORDS[k]}`).join(', ')}`;
}

function byEngaged(a: BandExit, b: BandExit): number {
  if (a.engaged.length !== b.engaged.length) return a.engaged.length - b.engaged.length;
  for (let i = 0; i < a.engaged.length; i++) if (a.engaged[i] !== b.engaged[i]) return a.engaged[i] - b.engaged[i];
  return a.tipping.length - b.tipping.length;
}
