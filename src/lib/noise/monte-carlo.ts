/**
 * Euler–Maruyama escape paths (docs/noise.md, "Monte Carlo escape sequences").
 *
 *   x_{k+1} = x_k + F(x_k; p) dt + sigma ⊙ sqrt(dt) Z_k,   Z_k ~ N(0, I)
 *
 * (Kloeden & Platen, Numerical Solution of Stochastic Differential Equations, 1992, §9.1; strong
 * order 1/2, weak order 1 for additive noise). Path i uses its own normal stream (rng.ts; one
 * generator per call re-seeded per path, the same numbers as a fresh generator per path), so a
 * range of paths gives the same records whichever thread simulates it. Escapes are monitored at
 * the grid times t_k = k dt: node j escapes at the first t_k where it is past its escape threshold
 * (the side away from the start), and a return is counted when an escaped node comes back past
 * its threshold root (the element's middle root); it can return again only after passing its
 * escape threshold again. A path stops when every node has escaped (first passages) or at t_max
 * (then it is `capped`).
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { CancelSignal, Progress } from './types';
import type { EscapeDirection } from './thresholds';
import { PathStreams } from './rng';

/** What one Monte Carlo run simulates (all vectors length n; never mutated). */
export interface EscapeSetup {
  readonly p: number;
  /** Noise amplitude per variable, sigma_i = level * weight_i. */
  readonly sigma: Float64Array;
  /** Start state of every path (a stable state of the escape graph). */
  readonly start: Float64Array;
  /** Escape threshold per node (thresholds.ts). */
  readonly thresholds: Float64Array;
  /** Threshold (middle) root per node: coming back past it after an escape is a return. */
  readonly returnLevels: Float64Array;
  /** 'up' when the start is on the base side (escape = x_j above its threshold), 'down' otherwise. */
  readonly direction: EscapeDirection;
}

export interface MonteCarloOptions {
  /** Time step; > 0 (step-size.ts gives the default). */
  readonly dt: number;
  /** Time cap per path; > 0. The step cap is ceil(tMax / dt). */
  readonly tMax: number;
  readonly seed: number;
  /** First path index (default 0) and number of paths. */
  readonly first?: number;
  readonly count: number;
  readonly progress?: Progress;
  readonly signal?: CancelSignal;
  /** Steps between cancellation checks inside one path; default 65536. */
  readonly checkEvery?: number;
}

/**
 * Per-path records of a contiguous range of path indices, in index order (flat typed arrays, so
 * they cross thread boundaries cheaply). Path k of the batch is index first + k:
 * times[k n + j] = first escape time of node j (NaN if it never escaped), order[k n + r] = the node
 * that escaped r-th (-1 past the last escape), returns[k], capped[k] (1 if t_max was hit),
 * steps[k] = Euler–Maruyama steps taken.
 */
export interface PathBatch {
  readonly first: number;
  /** Paths simulated (less than asked only when cancelled). */
  readonly count: number;
  readonly n: number;
  readonly times: Float64Array;
  readonly order: Int32Array;
  readonly returns: Int32Array;
  readonly capped: Uint8Array;
  readonly steps: Float64Array;
  readonly cancelled: boolean;
}

/**
 * Simulates paths first .. first + count - 1 (see the file header for the scheme and the event
 * rules). Checks the cancel signal between paths and every `checkEvery` steps; a cancelled run
 * returns the paths finished so far (`cancelled: true`). Throws only for broken contracts
 * (dt, tMax not positive finite, count not a non-negative integer).
 */
export function simulateEscapePaths(system: CompiledSystem, setup: EscapeSetup, options: MonteCarloOptions): PathBatch {
  const { dt, tMax, seed } = options;
  const first = options.first ?? 0;
  const count = options.count;
  if (!(Number.isFinite(dt) && dt > 0)) throw new RangeError(`dt: must be positive and finite, got ${dt}`);
  if (!(Number.isFinite(tMax) && tMax > 0)) throw new RangeError(`tMax: must be positive and finite, got ${tMax}`);
  if (!Number.isInteger(count) || count < 0) throw new RangeError(`count: must be a non-negative integer, got ${count}`);
  const n = system.dimension;
  const p = setup.p;
  const checkEvery = options.checkEvery ?? 65536;
  const maxSteps = Math.ceil(tMax / dt - 1e-9);
  const sign = setup.direction === 'up' ? 1 : -1;
  const thr = Float64Array.from(setup.thresholds, (v) => sign * v);
  const back = Float64Array.from(setup.returnLevels, (v) => sign * v);
  const noise = Float64Array.from(setup.sigma, (s) => s * Math.sqrt(dt));
  const times = new Float64Array(count * n).fill(Number.NaN);
  const order = new Int32Array(count * n).fill(-1);
  const returns = new Int32Array(count);
  const capped = new Uint8Array(count);
  const steps = new Float64Array(count);
  const x = new Float64Array(n);
  const f = new Float64Array(n);
  const escaped = new Uint8Array(n);
  const below = new Uint8Array(n);
  const result = new Float64Array(3);
  let done = 0;
  let cancelled = false;
  let lastReport = 0;
  // One generator re-seeded per path (rng.ts): the same stream (seed, first + k) as a fresh one.
  const streams = new PathStreams(seed);
  for (let k = 0; k < count; k++) {
    if (options.signal?.aborted) {
      cancelled = true;
      break;
    }
    const z = streams.select(first + k);
    x.set(setup.start);
    runPath(system.rates, p, n, x, f, escaped, below, z, dt, noise, sign, thr, back, maxSteps, checkEvery, options.signal, times, order, k * n, result);
    const step = result[0];
    const ret = result[1];
    const nEscaped = result[2];
    if (nEscaped < n && step < maxSteps) {
      cancelled = true;
      break;
    }
    returns[k] = ret;
    capped[k] = nEscaped < n ? 1 : 0;
    steps[k] = step;
    done = k + 1;
    if (options.progress) {
      const now = Date.now();
      if (now - lastReport >= 100 || done === count) {
        lastReport = now;
        options.progress({ fraction: count === 0 ? 1 : done / count, pathsDone: done, stage: 'monte-carlo' });
      }
    }
  }
  if (done < count) {
    return { first, count: done, n, times: times.slice(0, done * n), order: order.slice(0, done * n), returns: returns.slice(0, done), capped: capped.slice(0, done), steps: steps.slice(0, done), cancelled };
  }
  return { first, count, n, times, order, returns, capped, steps, cancelled };
}

/**
 * One path from x (already set to the start): Euler–Maruyama steps with the event rules of the file
 * header, until every node escaped, maxSteps, or cancellation (checked every `checkEvery` steps).
 * Writes escape times and order at `base`, and [steps, returns, escaped count] into `result`.
 * Kept as a separate small function: V8 optimizes this hot loop far better on its own than inlined
 * in the bookkeeping loop over paths (measured about 3x per step, docs/noise.md).
 */
function runPath(
  rates: CompiledSystem['rates'], p: number, n: number, x: Float64Array, f: Float64Array, escaped: Uint8Array, below: Uint8Array,
  z: () => number, dt: number, noise: Float64Array, sign: number, thr: Float64Array, back: Float64Array, maxSteps: number,
  checkEvery: number, signal: CancelSignal | undefined, times: Float64Array, order: Int32Array, base: number, result: Float64Array,
): void {
  escaped.fill(0);
  below.fill(0);
  let nEscaped = 0;
  let ret = 0;
  let step = 0;
  while (nEscaped < n && step < maxSteps) {
    rates(x, p, f);
    for (let j = 0; j < n; j++) x[j] += f[j] * dt + noise[j] * z();
    step++;
    for (let j = 0; j < n; j++) {
      const u = sign * x[j];
      if (escaped[j] === 0) {
        if (u > thr[j]) {
          escaped[j] = 1;
          times[base + j] = step * dt;
          order[base + nEscaped] = j;
          nEscaped++;
        }
      } else if (below[j] === 0) {
        if (u < back[j]) {
          below[j] = 1;
          ret++;
        }
      } else if (u > thr[j]) below[j] = 0;
    }
    if (step % checkEvery === 0 && signal?.aborted) break;
  }
  result[0] = step;
  result[1] = ret;
  result[2] = nEscaped;
}

/** Concatenates batches of consecutive ranges (sorted by `first`) into one batch, in index order. */
export function mergeBatches(batches: readonly PathBatch[]): PathBatch {
  const sorted = [...batches].sort((a, b) => a.first - b.first);
  const n = sorted[0]?.n ?? 0;
  const count = sorted.reduce((s, b) => s + b.count, 0);
  const out = {
    first: sorted[0]?.first ?? 0,
    count,
    n,
    times: new Float64Array(count * n),
    order: new Int32Array(count * n),
    returns: new Int32Array(count),
    capped: new Uint8Array(count),
    steps: new Float64Array(count),
    cancelled: sorted.some((b) => b.cancelled),
  };
  let at = 0;
  let expected = out.first;
  for (const b of sorted) {
    if (b.first !== expected) throw new RangeError(`mergeBatches: ranges are not contiguous (expected first ${expected}, got ${b.first})`);
    out.times.set(b.times, at * n);
    out.order.set(b.order, at * n);
    out.returns.set(b.returns, at);
    out.capped.set(b.capped, at);
    out.steps.set(b.steps, at);
    at += b.count;
    expected = b.first + b.count;
    if (b.cancelled) break;
  }
  return out;
}
