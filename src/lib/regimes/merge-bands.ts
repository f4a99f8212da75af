import type { BandExit, Regime, RegimeBand, StartState } from './types';

/** The label of one interval between consecutive cuts; regime null when it could not be labelled. */
export interface IntervalLabel {
  readonly from: number;
  readonly to: number;
  readonly fromBound: string;
  readonly toBound: string;
  readonly regime: Regime | null;
  readonly reason: string;
  readonly start: StartState;
  /** The exits behind the reason and where they were taken (see RegimeBand.exits). */
  readonly exits?: BandExit[];
  readonly exitsAt?: number;
}

/**
 * Bands from interval labels (in increasing p): adjacent intervals of the same start with the same
 * regime become one band from the first interval's lower edge to the last one's upper edge; bounds
 * are the cut types at those two edges. Unlabelled intervals end a band and give none. The band's
 * reason (and exits) is its first interval's, with a count of how often the reason changes inside the band.
 */
export function mergeBands(labels: readonly IntervalLabel[]): RegimeBand[] {
  const bands: RegimeBand[] = [];
  let cur: { from: number; to: number; fromBound: string; toBound: string; regime: Regime; reasons: string[]; start: StartState; exits?: BandExit[]; exitsAt?: number } | null = null;
  const flush = () => {
    if (!cur) return;
    const band: RegimeBand = {
      from: cur.from, to: cur.to, regime: cur.regime, bounds: [cur.fromBound, cur.toBound],
      reason: cur.reasons.length === 1 ? cur.reasons[0]
        : `${cur.reasons[0]} (the ways out change ${cur.reasons.length === 2 ? 'once' : `${cur.reasons.length - 1} times`} inside the band without changing the label; see the escape graphs)`,
      ...(cur.start === 'all-base' ? {} : { start: cur.start }),
      ...(cur.exits ? { exits: cur.exits, exitsAt: cur.exitsAt } : {}),
    };
    bands.push(band);
    cur = null;
  };
  for (const l of labels) {
    if (l.regime === null) { flush(); continue; }
    if (cur && cur.regime === l.regime && cur.start === l.start && cur.to === l.from) {
      cur.to = l.to;
      cur.toBound = l.toBound;
      if (!cur.reasons.includes(l.reason)) cur.reasons.push(l.reason);
    } else {
      flush();
      cur = { from: l.from, to: l.to, fromBound: l.fromBound, toBound: l.toBound, regime: l.regime, reasons: [l.reason], start: l.start, exits: l.exits, exitsAt: l.exitsAt };
    }
  }
  flush();
  return bands;
}
