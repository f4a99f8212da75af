/**
 * Alignment of several diagrams for comparison: special points matched by type and order along the
 * parameter, band edges matched by the pair of regimes they separate and order.
 */
import type { Diagram, SpecialPointType } from '../atlas/types';
import type { RegimeBand } from '../regimes/types';
import { SPECIAL_TYPES } from './markers';

export interface AlignedRow {
  /** 'saddle-node', … or 'band edge'. */
  readonly kind: string;
  /** What the row matches: '2nd saddle-node', 'weak → intermediate'. */
  readonly label: string;
  /** Parameter value per diagram (null when that diagram has no counterpart). */
  readonly values: (number | null)[];
  /** Differences to the first diagram's value (null where either is missing). */
  readonly deltas: (number | null)[];
}

const ordinal = (k: number) => {
  const n = k + 1, t = n % 100, u = n % 10;
  const suffix = t >= 11 && t <= 13 ? 'th' : u === 1 ? 'st' : u === 2 ? 'nd' : u === 3 ? 'rd' : 'th';
  return `${n}${suffix}`;
};

function deltas(values: (number | null)[]): (number | null)[] {
  const ref = values[0];
  return values.map((v) => (v == null || ref == null ? null : v - ref));
}

/**
 * Special points of the same type are matched by rank in p. Several points at one parameter value
 * (two symmetric saddle-nodes) keep their own rows, so a lost symmetry shows as a missing value.
 */
export function alignSpecialPoints(diagrams: readonly Pick<Diagram, 'bifurcations'>[]): AlignedRow[] {
  const rows: AlignedRow[] = [];
  for (const type of SPECIAL_TYPES) {
    const per = diagrams.map((d) => d.bifurcations.filter((b) => b.type === type).map((b) => b.p).sort((a, b) => a - b));
    const count = Math.max(0, ...per.map((v) => v.length));
    for (let k = 0; k < count; k++) {
      const values = per.map((v) => v[k] ?? null);
      rows.push({ kind: type as SpecialPointType, label: `${ordinal(k)} ${type}`, values, deltas: deltas(values) });
    }
  }
  return rows;
}

/** Band edges (the `to` of each band followed by another), matched by regime pair and rank. */
export function alignBandEdges(bands: readonly (readonly RegimeBand[] | undefined)[]): AlignedRow[] {
  const per = bands.map((list) => {
    const m = new Map<string, number[]>();
    const sorted = [...(list ?? [])].sort((a, b) => a.from - b.from);
    for (let i = 0; i + 1 < sorted.length; i++) {
      const key = `${sorted[i].regime} → ${sorted[i + 1].regime}`;
      m.set(key, [...(m.get(key) ?? []), sorted[i].to]);
    }
    return m;
  });
  const keys = [...new Set(per.flatMap((m) => [...m.keys()]))];
  const rows: AlignedRow[] = [];
  for (const key of keys) {
    const count = Math.max(...per.map((m) => m.get(key)?.length ?? 0));
    for (let k = 0; k < count; k++) {
      const values = per.map((m) => m.get(key)?.[k] ?? null);
      rows.push({ kind: 'band edge', label: count > 1 ? `${key} (${ordinal(k)})` : key, values, deltas: deltas(values) });
    }
  }
  return rows.sort((a, b) => (a.values.find((v) => v != null) ?? 0) - (b.values.find((v) => v != null) ?? 0));
}
