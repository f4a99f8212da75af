/**
 * Alignment of several diagrams for comparison. Special points are matched by type and by where
 * they sit: on corresponding branches, nearest in parameter and state (an optimal assignment, not
 * the order along the parameter). Band edges are matched by the pair of regimes they separate and
 * their order.
 */
import type { Diagram, SpecialPoint, SpecialPointType } from '../atlas/types';
import type { RegimeBand } from '../regimes/types';
import { SPECIAL_TYPES } from './markers';

export interface AlignedRow {
  /** 'saddle-node', … or 'band edge'. */
  readonly kind: string;
  /** What the row matches: 'saddle-node 2', 'weak → intermediate'. */
  readonly label: string;
  /** Parameter value per diagram (null when that diagram has no counterpart). */
  readonly values: (number | null)[];
  /** Differences to the first diagram's value (null where either is missing). */
  readonly deltas: (number | null)[];
  /** Special-point rows: the matched point's id per diagram. */
  readonly ids?: (string | null)[];
  /** Special-point rows: the matched point's state per diagram. */
  readonly states?: (readonly number[] | null)[];
  /**
   * Special-point rows: the scaled distance (see alignSpecialPoints) of each diagram's point to the
   * row's first point, 0 for that one, null where missing.
   */
  readonly distances?: (number | null)[];
}

export interface AlignOptions {
  /**
   * Largest scaled distance at which two points of one type still count as the same point
   * (default 0.35: about a third of the swept range, or of every variable's range).
   */
  readonly maxDistance?: number;
  /** Added to the distance of a pair whose branches do not correspond (default 0.5). */
  readonly branchPenalty?: number;
  /** Points sampled per branch to decide which branches correspond (default 48). */
  readonly branchSamples?: number;
}

type AlignInput = Pick<Diagram, 'bifurcations'> & Partial<Pick<Diagram, 'branches' | 'variables'>>;

function deltas(values: (number | null)[]): (number | null)[] {
  const ref = values[0];
  return values.map((v) => (v == null || ref == null ? null : v - ref));
}

/** Ranges of the parameter and of each of the first `n` variables over every diagram's branches and special points. */
function scales(diagrams: readonly AlignInput[], n: number): { p: number; x: number[] } {
  let pLo = Infinity, pHi = -Infinity;
  const lo = new Array<number>(n).fill(Infinity), hi = new Array<number>(n).fill(-Infinity);
  const see = (p: number, x: readonly number[]) => {
    if (Number.isFinite(p)) { if (p < pLo) pLo = p; if (p > pHi) pHi = p; }
    for (let i = 0; i < n; i++) { const v = x[i]; if (Number.isFinite(v)) { if (v < lo[i]) lo[i] = v; if (v > hi[i]) hi[i] = v; } }
  };
  for (const d of diagrams) {
    for (const b of d.branches ?? []) for (const pt of b.points) see(pt.p, pt.x);
    for (const s of d.bifurcations) see(s.p, s.x);
  }
  const span = (a: number, b: number) => (Number.isFinite(a) && Number.isFinite(b) && b > a ? b - a : 1);
  return { p: span(pLo, pHi), x: lo.map((l, i) => span(l, hi[i])) };
}

/**
 * Scaled distance between (p, x) and (q, y): sqrt(((p − q)/S_p)² + (1/n) Σ ((x_i − y_i)/S_i)²), with S
 * the ranges over all compared diagrams, so parameter and state weigh alike whatever their units and
 * however many nodes the network has.
 */
function distance(p: number, x: readonly number[], q: number, y: readonly number[], s: { p: number; x: number[] }): number {
  const dp = (p - q) / s.p;
  let sx = 0;
  const n = s.x.length;
  for (let i = 0; i < n; i++) { const d = (x[i] - y[i]) / s.x[i]; sx += d * d; }
  return Math.sqrt(dp * dp + (n ? sx / n : 0));
}

interface Sampled { readonly id: string; readonly pts: { p: number; x: readonly number[] }[] }

function sampleBranches(d: AlignInput, count: number): Sampled[] {
  return (d.branches ?? []).map((b) => {
    const n = b.points.length;
    const k = Math.min(n, count);
    const pts: { p: number; x: readonly number[] }[] = [];
    for (let j = 0; j < k; j++) { const pt = b.points[k === 1 ? 0 : Math.round((j * (n - 1)) / (k - 1))]; pts.push({ p: pt.p, x: pt.x }); }
    return { id: b.id, pts };
  });
}

/**
 * Which branches of A and B correspond: a pair does when one is the other's nearest branch, by the
 * mean distance from its sampled points to the other's nearest samples. Many-to-one is allowed, since
 * a variant may trace as two branches what the other traces as one.
 */
function branchCorrespondence(a: Sampled[], b: Sampled[], s: { p: number; x: number[] }): Set<string> {
  const directed = (from: Sampled, to: Sampled) => {
    if (!from.pts.length || !to.pts.length) return Infinity;
    let sum = 0;
    for (const u of from.pts) {
      let best = Infinity;
      for (const v of to.pts) { const d = distance(u.p, u.x, v.p, v.x, s); if (d < best) best = d; }
      sum += best;
    }
    return sum / from.pts.length;
  };
  const pairs = new Set<string>();
  const nearest = (from: Sampled[], to: Sampled[], key: (f: string, t: string) => string) => {
    for (const f of from) {
      let best = Infinity, id: string | null = null;
      for (const t of to) { const d = directed(f, t); if (d < best) { best = d; id = t.id; } }
      if (id !== null) pairs.add(key(f.id, id));
    }
  };
  nearest(a, b, (f, t) => `${f}\u0000${t}`);
  nearest(b, a, (f, t) => `${t}\u0000${f}`);
  return pairs;
}

/**
 * Minimum-cost assignment of rows to columns of a rectangular cost matrix (Kuhn 1955, Munkres 1957;
 * the O(n²m) shortest-augmenting-path form with potentials). Returns, per row, its column or −1.
 * Every entry must be finite.
 */
export function assignMinCost(cost: readonly (readonly number[])[]): number[] {
  const rows = cost.length, cols = rows ? cost[0].length : 0;
  if (!rows || !cols) return new Array<number>(rows).fill(-1);
  const transposed = rows > cols;
  const n = transposed ? cols : rows, m = transposed ? rows : cols;
  const c = (i: number, j: number) => (transposed ? cost[j][i] : cost[i][j]);
  // 1-based arrays as in the textbook form; column 0 is the virtual start.
  const u = new Float64Array(n + 1), v = new Float64Array(m + 1);
  const match = new Int32Array(m + 1), way = new Int32Array(m + 1);
  for (let i = 1; i <= n; i++) {
    match[0] = i;
    let j0 = 0;
    const minv = new Float64Array(m + 1).fill(Infinity);
    const used = new Uint8Array(m + 1);
    do {
      used[j0] = 1;
      const i0 = match[j0];
      let delta = Infinity, j1 = 0;
      for (let j = 1; j <= m; j++) {
        if (used[j]) continue;
        const cur = c(i0 - 1, j - 1) - u[i0] - v[j];
        if (cur < minv[j]) { minv[j] = cur; way[j] = j0; }
        if (minv[j] < delta) { delta = minv[j]; j1 = j; }
      }
      for (let j = 0; j <= m; j++) {
        if (used[j]) { u[match[j]] += delta; v[j] -= delta; } else minv[j] -= delta;
      }
      j0 = j1;
    } while (match[j0] !== 0);
    do { const j1 = way[j0]; match[j0] = match[j1]; j0 = j1; } while (j0);
  }
  const out = new Array<number>(rows).fill(-1);
  for (let j = 1; j <= m; j++) {
    if (!match[j]) continue;
    if (transposed) out[j - 1] = match[j] - 1;
    else out[match[j] - 1] = j - 1;
  }
  return out;
}

/**
 * Special points matched across diagrams. Within one type, the points of each diagram in turn are
 * assigned to the rows built so far at least total cost, where the cost of a pair is its scaled
 * distance in parameter and state (see `distance`) plus `branchPenalty` when the points lie on branches
 * that do not correspond; a row's cost is that to its nearest member. Pairs farther apart than
 * `maxDistance` are never matched, so a point that a variant lost or gained keeps its own row with
 * "none" elsewhere, and two symmetric points at one parameter value keep a row each.
 * Rows are ordered by type, then by parameter; `label` numbers them within their type.
 */
export function alignSpecialPoints(diagrams: readonly AlignInput[], options: AlignOptions = {}): AlignedRow[] {
  const maxDistance = options.maxDistance ?? 0.35;
  const penalty = options.branchPenalty ?? 0.5;
  const nVars = Math.min(...diagrams.map((d) => d.variables?.length ?? Math.min(Infinity, ...d.bifurcations.map((s) => s.x.length))));
  const n = Number.isFinite(nVars) ? nVars : 0;
  const s = scales(diagrams, n);
  const sampled = diagrams.map((d) => sampleBranches(d, options.branchSamples ?? 48));
  const correspond = new Map<string, Set<string>>();
  const corresponds = (i: number, a: SpecialPoint, j: number, b: SpecialPoint) => {
    if (!a.branches.length || !b.branches.length || !sampled[i].length || !sampled[j].length) return true;
    const key = `${i}:${j}`;
    let set = correspond.get(key);
    if (!set) { set = branchCorrespondence(sampled[i], sampled[j], s); correspond.set(key, set); }
    return a.branches.some((x) => b.branches.some((y) => set!.has(`${x}\u0000${y}`)));
  };
  const pairCost = (i: number, a: SpecialPoint, j: number, b: SpecialPoint) => {
    const d = distance(a.p, a.x, b.p, b.x, s);
    if (d > maxDistance) return Infinity;
    return d + (corresponds(i, a, j, b) ? 0 : penalty);
  };

  const rows: AlignedRow[] = [];
  for (const type of SPECIAL_TYPES) {
    const groups: (SpecialPoint | null)[][] = [];
    diagrams.forEach((d, k) => {
      const pts = d.bifurcations.filter((b) => b.type === type).sort((a, b) => a.p - b.p);
      if (!pts.length) return;
      const BIG = 1e9;
      const cost = groups.map((g) => pts.map((pt) => {
        let best = Infinity;
        g.forEach((m, i) => { if (m) best = Math.min(best, pairCost(i, m, k, pt)); });
        return Number.isFinite(best) ? best : BIG;
      }));
      const assigned = groups.length ? assignMinCost(cost) : [];
      const taken = new Set<number>();
      assigned.forEach((col, r) => {
        if (col >= 0 && cost[r][col] < BIG) { groups[r][k] = pts[col]; taken.add(col); }
      });
      pts.forEach((pt, col) => {
        if (taken.has(col)) return;
        const g = new Array<SpecialPoint | null>(diagrams.length).fill(null);
        g[k] = pt;
        groups.push(g);
      });
      for (const g of groups) if (g[k] === undefined) g[k] = null;
    });
    const firstP = (g: (SpecialPoint | null)[]) => g.find((m) => m)!.p;
    groups.sort((a, b) => firstP(a) - firstP(b));
    groups.forEach((g, r) => {
      const values = g.map((m) => m?.p ?? null);
      const ref = g.find((m) => m)!;
      rows.push({
        kind: type as SpecialPointType,
        label: `${type} ${r + 1}`,
        values,
        deltas: deltas(values),
        ids: g.map((m) => m?.id ?? null),
        states: g.map((m) => m?.x ?? null),
        distances: g.map((m) => (m ? distance(ref.p, ref.x, m.p, m.x, s) : null)),
      });
    });
  }
  return rows;
}

const ordinal = (k: number) => {
  const n = k + 1, t = n % 100, u = n % 10;
  const suffix = t >= 11 && t <= 13 ? 'th' : u === 1 ? 'st' : u === 2 ? 'nd' : u === 3 ? 'rd' : 'th';
  return `${n}${suffix}`;
};

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

/**
 * The vertical axis a diagram opens with, as on the run page: one node's state for one or two nodes
 * (the classic fold picture), the mean state for larger networks. Keys as projectionKey gives them.
 */
export function defaultProjectionKey(variables: readonly string[]): string {
  return variables.length > 2 ? 'mean' : 'node:0';
}
