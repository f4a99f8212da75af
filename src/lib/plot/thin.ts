/**
 * Point thinning for drawing: keep what the eye sees, drop what falls on the same pixels.
 * All functions return ascending indices into the input arrays and never mutate them.
 */

/**
 * Largest-triangle-three-buckets downsampling.
 * Source: S. Steinarsson, "Downsampling Time Series for Visual Representation", MSc thesis,
 * University of Iceland, 2013, section 4.2 (LTTB).
 * Method: keep the first and last point; split the rest into (budget − 2) buckets of equal point count;
 * from each bucket keep the point forming the largest triangle with the point kept in the previous
 * bucket and the average of the next bucket. Buckets go by point order, not by x, and areas are taken
 * in the given (screen) coordinates, so curves that fold back in x (branches at a saddle-node) work.
 */
export function lttb(xs: ArrayLike<number>, ys: ArrayLike<number>, budget: number): number[] {
  const n = xs.length;
  if (budget >= n || n <= 2) return Array.from({ length: n }, (_, i) => i);
  if (budget < 3) return budget <= 1 ? [0] : [0, n - 1];
  const out: number[] = [0];
  const every = (n - 2) / (budget - 2);
  let a = 0;
  for (let i = 0; i < budget - 2; i++) {
    const nextStart = Math.floor((i + 1) * every) + 1;
    const nextEnd = Math.min(Math.floor((i + 2) * every) + 1, n);
    let avgX = 0, avgY = 0;
    const nextLen = Math.max(nextEnd - nextStart, 0);
    if (nextLen > 0) {
      for (let j = nextStart; j < nextEnd; j++) { avgX += xs[j]; avgY += ys[j]; }
      avgX /= nextLen; avgY /= nextLen;
    } else { avgX = xs[n - 1]; avgY = ys[n - 1]; }
    const start = Math.floor(i * every) + 1;
    const end = Math.min(Math.floor((i + 1) * every) + 1, n - 1);
    let best = start, bestArea = -1;
    for (let j = start; j < end; j++) {
      const area = Math.abs((xs[a] - avgX) * (ys[j] - ys[a]) - (xs[a] - xs[j]) * (avgY - ys[a]));
      if (area > bestArea) { bestArea = area; best = j; }
    }
    out.push(best);
    a = best;
  }
  out.push(n - 1);
  return out;
}

/**
 * Indices that thinning must never drop: both ends, every reversal of direction in x (the fold of a
 * branch at a saddle-node, where the line turns back), and the points of smallest and largest y.
 * (common practice, no source: a downsampled curve must keep its extremes or it changes shape)
 */
export function mustKeep(xs: ArrayLike<number>, ys: ArrayLike<number>): number[] {
  const n = xs.length;
  if (n === 0) return [];
  const keep = new Set<number>([0, n - 1]);
  let lastDir = 0;
  let lastIdx = 0;
  let iMin = 0, iMax = 0;
  for (let i = 1; i < n; i++) {
    const d = Math.sign(xs[i] - xs[i - 1]);
    if (d !== 0) {
      if (lastDir !== 0 && d !== lastDir) keep.add(lastIdx);
      lastDir = d;
      lastIdx = i;
    }
    if (ys[i] < ys[iMin]) iMin = i;
    if (ys[i] > ys[iMax]) iMax = i;
  }
  keep.add(iMin); keep.add(iMax);
  return [...keep].sort((p, q) => p - q);
}

/**
 * Thinning to a point budget that keeps extremes: LTTB between consecutive must-keep points, each
 * stretch given a share of the budget proportional to its length. The result may exceed the budget
 * only by the number of must-keep points.
 */
export function thinToBudget(xs: ArrayLike<number>, ys: ArrayLike<number>, budget: number): number[] {
  const n = xs.length;
  if (n <= budget) return Array.from({ length: n }, (_, i) => i);
  const anchors = mustKeep(xs, ys);
  const out: number[] = [];
  for (let k = 0; k < anchors.length - 1; k++) {
    const s = anchors[k], e = anchors[k + 1];
    const len = e - s + 1;
    const share = Math.max(2, Math.round((budget * (len - 1)) / (n - 1)));
    const subX = Array.prototype.slice.call(xs, s, e + 1) as number[];
    const subY = Array.prototype.slice.call(ys, s, e + 1) as number[];
    const kept = lttb(subX, subY, share);
    for (let j = k === 0 ? 0 : 1; j < kept.length; j++) out.push(s + kept[j]);
  }
  if (anchors.length === 1) out.push(anchors[0]);
  return out;
}

/**
 * Screen-space decimation for interactive drawing: a point is kept when it lies at least `minDist`
 * pixels from the last kept point, or when it is a must-keep point. O(n), one pass, so it can run on
 * every zoom frame. (common practice, no source)
 */
export function decimateByPixel(xs: ArrayLike<number>, ys: ArrayLike<number>, minDist = 0.75): number[] {
  const n = xs.length;
  if (n <= 2) return Array.from({ length: n }, (_, i) => i);
  const forced = new Set(mustKeep(xs, ys));
  const out: number[] = [0];
  const d2 = minDist * minDist;
  let lx = xs[0], ly = ys[0];
  for (let i = 1; i < n - 1; i++) {
    const dx = xs[i] - lx, dy = ys[i] - ly;
    if (forced.has(i) || dx * dx + dy * dy >= d2) { out.push(i); lx = xs[i]; ly = ys[i]; }
  }
  out.push(n - 1);
  return out;
}
