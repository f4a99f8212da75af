/**
 * Statistics of Monte Carlo escape records (docs/noise.md, "Monte Carlo escape sequences"):
 * sequence probabilities with Wilson intervals, k-th escape time summaries (mean with its normal
 * 95 % interval, Hyndman–Fan type 7 quantiles, histogram, empirical survival curve), mean times
 * between the j-th and k-th escapes, returns and capped paths.
 */
import type { PathBatch } from './monte-carlo';

/** z_{0.975} of the standard normal, 1.959963984540054 (Abramowitz & Stegun, Table 26.1). */
export const Z95 = 1.959963984540054;

/**
 * Wilson score interval for a binomial proportion (Wilson 1927, JASA 22, 209–212):
 *   (p̂ + z²/2n ± z sqrt(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n),  p̂ = k / n.
 * n = 0 gives [0, 1].
 */
export function wilsonInterval(k: number, n: number, z = Z95): { low: number; high: number } {
  if (n <= 0) return { low: 0, high: 1 };
  const ph = k / n;
  const z2 = z * z;
  const centre = ph + z2 / (2 * n);
  const half = z * Math.sqrt((ph * (1 - ph)) / n + z2 / (4 * n * n));
  const d = 1 + z2 / n;
  return { low: Math.max(0, (centre - half) / d), high: Math.min(1, (centre + half) / d) };
}

/**
 * Sample quantile of type 7 (Hyndman & Fan 1996, Am. Stat. 50, 361–365): with sorted x_1..x_m,
 * h = (m − 1) q, Q(q) = x_⌊h⌋+1 + (h − ⌊h⌋)(x_⌊h⌋+2 − x_⌊h⌋+1). `sorted` ascending; NaN when empty.
 */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const m = sorted.length;
  if (m === 0) return Number.NaN;
  const h = (m - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(m - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export interface TimeSummary {
  /** Paths that contribute (reached the event). */
  readonly count: number;
  readonly mean: number;
  /** Half-width of the normal 95 % interval of the mean, Z95 s / sqrt(count) (s: sample standard deviation). */
  readonly meanHalfWidth: number;
  readonly median: number;
  readonly q05: number;
  readonly q95: number;
}

/** Mean, its 95 % half-width, median and the 5 % / 95 % type-7 quantiles of a sample. */
export function summarizeTimes(values: ArrayLike<number>): TimeSummary {
  const sorted = Float64Array.from(values).sort();
  const m = sorted.length;
  let mean = 0;
  for (const v of sorted) mean += v;
  mean = m > 0 ? mean / m : Number.NaN;
  let ss = 0;
  for (const v of sorted) ss += (v - mean) * (v - mean);
  const sd = m > 1 ? Math.sqrt(ss / (m - 1)) : Number.NaN;
  return { count: m, mean, meanHalfWidth: m > 1 ? (Z95 * sd) / Math.sqrt(m) : Number.NaN, median: quantileSorted(sorted, 0.5), q05: quantileSorted(sorted, 0.05), q95: quantileSorted(sorted, 0.95) };
}

/** Equal-width histogram of `values` over [0, max] (`bins` bins; edges length bins + 1). */
export function histogram(values: ArrayLike<number>, bins: number, max: number): { edges: number[]; counts: number[] } {
  const edges = Array.from({ length: bins + 1 }, (_, i) => (max * i) / bins);
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < values.length; i++) {
    const b = max > 0 ? Math.min(bins - 1, Math.floor((values[i] / max) * bins)) : 0;
    counts[b]++;
  }
  return { edges, counts };
}

/**
 * Empirical survival S(t) = #{paths whose event time > t} / total at `points` equally spaced t in
 * [0, tEnd]; paths that never reach the event (capped) count as surviving.
 */
export function survivalCurve(values: ArrayLike<number>, total: number, tEnd: number, points: number): { t: number[]; survival: number[] } {
  const sorted = Float64Array.from(values).sort();
  const t: number[] = [];
  const survival: number[] = [];
  let idx = 0;
  for (let i = 0; i < points; i++) {
    const ti = points === 1 ? tEnd : (tEnd * i) / (points - 1);
    while (idx < sorted.length && sorted[idx] <= ti) idx++;
    t.push(ti);
    survival.push(total > 0 ? (total - idx) / total : Number.NaN);
  }
  return { t, survival };
}

export interface SequenceCount {
  /** Node ids in the order of their first escapes. */
  readonly order: string[];
  readonly count: number;
  readonly probability: number;
  /** Wilson 95 % interval of the probability. */
  readonly low: number;
  readonly high: number;
}

export interface KthEscape extends TimeSummary {
  readonly k: number;
  readonly histogram: { edges: number[]; counts: number[] };
  readonly survival: { t: number[]; survival: number[] };
}

export interface EscapeStatistics {
  readonly paths: number;
  /** Complete sequences (every node escaped), most frequent first; probability = count / paths. */
  readonly sequences: SequenceCount[];
  /** k = 1..n: time to the k-th escape over the paths that reached it. */
  readonly escapeTimes: KthEscape[];
  /** between[j][k] (j < k, 1-based as keys "j-k"): mean time from the j-th to the k-th escape. */
  readonly between: { j: number; k: number; count: number; mean: number }[];
  /** Total returns, and paths with at least one. */
  readonly returns: { total: number; paths: number };
  readonly capped: number;
  readonly nodeSteps: number;
}

export interface StatisticsOptions {
  readonly bins?: number;
  readonly survivalPoints?: number;
  /** End of the survival curve and histogram range; default the largest observed time. */
  readonly tEnd?: number;
}

/** Summarises a merged batch (see the file header); `names[j]` is node j's id. */
export function escapeStatistics(batch: PathBatch, names: readonly string[], options: StatisticsOptions = {}): EscapeStatistics {
  const { n, count } = batch;
  const bins = options.bins ?? 20;
  const points = options.survivalPoints ?? 41;
  const seqs = new Map<string, number>();
  const kth: number[][] = Array.from({ length: n }, () => []);
  let total = 0;
  let withReturn = 0;
  let nodeSteps = 0;
  let capped = 0;
  const between = new Map<string, { sum: number; count: number }>();
  for (let k = 0; k < count; k++) {
    const base = k * n;
    const ts: number[] = [];
    for (let r = 0; r < n; r++) {
      const j = batch.order[base + r];
      if (j < 0) break;
      ts.push(batch.times[base + j]);
    }
    ts.forEach((t, r) => kth[r].push(t));
    for (let a = 0; a < ts.length; a++) {
      for (let b = a + 1; b < ts.length; b++) {
        const key = `${a + 1}-${b + 1}`;
        const e = between.get(key) ?? { sum: 0, count: 0 };
        e.sum += ts[b] - ts[a];
        e.count++;
        between.set(key, e);
      }
    }
    if (ts.length === n) {
      const key = Array.from(batch.order.subarray(base, base + n)).join(',');
      seqs.set(key, (seqs.get(key) ?? 0) + 1);
    }
    total += batch.returns[k];
    if (batch.returns[k] > 0) withReturn++;
    capped += batch.capped[k];
    nodeSteps += batch.steps[k] * n;
  }
  let tEnd = options.tEnd ?? 0;
  if (options.tEnd === undefined) for (const list of kth) for (const t of list) tEnd = Math.max(tEnd, t);
  const sequences = [...seqs.entries()]
    .map(([key, c]) => ({ order: key.split(',').map((j) => names[Number(j)]), count: c, probability: c / count, ...wilsonInterval(c, count) }))
    .sort((a, b) => b.count - a.count || a.order.join(',').localeCompare(b.order.join(',')));
  const escapeTimes = kth.map((list, r) => ({ k: r + 1, ...summarizeTimes(list), histogram: histogram(list, bins, tEnd), survival: survivalCurve(list, count, tEnd, points) }));
  const betweenList = [...between.entries()].map(([key, e]) => {
    const [j, k] = key.split('-').map(Number);
    return { j, k, count: e.count, mean: e.sum / e.count };
  }).sort((a, b) => a.j - b.j || a.k - b.k);
  return { paths: count, sequences, escapeTimes, between: betweenList, returns: { total, paths: withReturn }, capped, nodeSteps };
}
