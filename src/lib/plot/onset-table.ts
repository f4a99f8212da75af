/**
 * Rows, order and colour of the critical-coupling table and network drawing on the run page
 * (components/runs/OnsetPanel.tsx). Pure: the stored onset result in, plain values out.
 */
import type { CriticalCouplingResult, NodeOnsetStatus } from '../onset/types';

/** What the run page needs of a stored CriticalCouplingResult. */
export type OnsetInput = Pick<CriticalCouplingResult, 'parameter'> & {
  readonly nodes: readonly { readonly index: number; readonly id: string; readonly status: NodeOnsetStatus; readonly critical: number | null; readonly next: readonly string[] | null }[];
};

export interface OnsetRow {
  readonly index: number;
  readonly id: string;
  readonly status: NodeOnsetStatus;
  readonly critical: number | null;
  readonly next: readonly string[] | null;
}

export interface OnsetSort { readonly key: 'critical' | 'node'; readonly descending: boolean }

export function onsetRows(onset: OnsetInput): OnsetRow[] {
  return onset.nodes.map((n) => ({ index: n.index, id: n.id, status: n.status, critical: n.status === 'fold' ? n.critical : null, next: n.next }));
}

/**
 * Sorted copy. By critical coupling: nodes without one (no fold in range, failed) always last, in node
 * order; ties by node order. By node: the document's node order (descending reverses it).
 */
export function sortOnsetRows(rows: readonly OnsetRow[], sort: OnsetSort): OnsetRow[] {
  const sign = sort.descending ? -1 : 1;
  return [...rows].sort((a, b) => {
    if (sort.key === 'node') return sign * (a.index - b.index);
    if (a.critical === null || b.critical === null) {
      if (a.critical === b.critical) return a.index - b.index;
      return a.critical === null ? 1 : -1;
    }
    return sign * (a.critical - b.critical) || a.index - b.index;
  });
}

/** Ends of the ramp (our own): deep rust at the lowest critical coupling, pale sand at the highest. */
export const RAMP_LOW = '#8c2d10';
export const RAMP_HIGH = '#f3e4c4';

/**
 * Colour of a critical coupling v on [lo, hi]: linear in sRGB from RAMP_LOW (v = lo) to RAMP_HIGH
 * (v = hi); RAMP_LOW when lo = hi. v outside is clamped.
 */
export function rampColour(v: number, lo: number, hi: number): string {
  const t = hi > lo ? Math.min(1, Math.max(0, (v - lo) / (hi - lo))) : 0;
  const a = hex(RAMP_LOW), b = hex(RAMP_HIGH);
  const mix = a.map((c, i) => Math.round(c + t * (b[i] - c)));
  return `#${mix.map((c) => c.toString(16).padStart(2, '0')).join('')}`;
}

function hex(c: string): [number, number, number] {
  return [parseInt(c.slice(1, 3), 16), parseInt(c.slice(3, 5), 16), parseInt(c.slice(5, 7), 16)];
}
