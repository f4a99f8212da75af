/**
 * The default time cap of a Monte Carlo escape study (docs/noise.md, "Time cap").
 *
 * A path stops when every node has escaped or at t_max; a path stopped at t_max has an incomplete
 * order and no last-escape time, so a cap that is too short biases every statistic of the last
 * escapes downward. The weak-noise prediction of the mean last-escape time (prediction.ts) is an
 * asymptotic formula (Kramers' rate per edge, sigma -> 0); at moderate noise it can be several times
 * too short (measured: about 5× at sigma = 0.45 on the demo lakes, docs/noise.md), and a cap of
 * 10 × the prediction then cut most paths. So the cap comes from a pilot run instead:
 *
 *   1. Simulate the study's own first P = min(paths, PILOT_PATHS) paths (the same normal streams,
 *      rng.ts) with the long cap L = PILOT_FACTOR × the prediction's cap T0 (T0 = 10 × predicted
 *      mean last escape, or 1000 without a prediction), shortened so that the pilot stays within
 *      PILOT_BUDGET node-steps.
 *   2. If every pilot path finished, t_max = max(T0, SAFETY × the longest pilot last-escape time).
 *      Otherwise t_max = L and a warning says how many pilot paths did not finish.
 *
 * Why SAFETY = 5 over the longest of P = 32 paths (our rule; the numbers derived here): a typical
 * size of the largest of 32 draws is the (1 - 1/32) quantile. For an exponential last-escape time
 * with mean m that is m ln 32 ≈ 3.47 m (its expectation is m H_32 ≈ 4.06 m, H_k the harmonic
 * number, which follows from the independence of exponential spacings; from memory), so the cap is
 * about 17 m and a path exceeds it with probability e^-17.3 ≈ 3e-8. A cascade's last escape is
 * a sum of exponential stages; with two equal stages (gamma, tail e^-x (1 + x) with x = 2t/m) the quantile is 2.65 m, the
 * cap 13.3 m and the probability 27.5 e^-26.5 ≈ 8e-11: lighter tails shrink the cap and the miss
 * probability alike. The margin 5 itself is our choice (common practice, no source).
 *
 * Deterministic: the pilot depends only on (seed, path indices 0..P-1), so the same study always gets
 * the same cap. The pilot's paths are the study's first paths and finish within the chosen cap, so
 * choosing the cap from them does not cut them.
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic } from '../atlas/types';
import { simulateEscapePaths, type EscapeSetup } from './monte-carlo';

export const PILOT_PATHS = 32;
export const PILOT_FACTOR = 20;
export const SAFETY = 5;
/** Node-steps the pilot may take at most (~2 s at the measured ~100 ns per node-step, docs/noise.md). */
export const PILOT_BUDGET = 2e7;

export interface TimeCap {
  readonly tMax: number;
  /** 'given': the study's own tMax; 'pilot': from the pilot run; 'pilot-capped': some pilot paths did not finish by L. */
  readonly basis: 'given' | 'pilot' | 'pilot-capped';
  /** Mean last-escape time of the pilot's finished paths (the budget's expected time), or NaN. */
  readonly expectedTime: number;
  readonly pilot: { readonly paths: number; readonly cap: number; readonly finished: number; readonly longest: number; readonly nodeSteps: number } | null;
  readonly diagnostics: Diagnostic[];
}

/**
 * The study's time cap: `given` when set, else the pilot rule of the file header. `predictedLast` is
 * the prediction's mean last-escape time (NaN or Infinity when there is none).
 */
export function chooseTimeCap(
  system: CompiledSystem,
  setup: EscapeSetup,
  run: { dt: number; seed: number; paths: number },
  predictedLast: number,
  given?: number,
): TimeCap {
  if (given !== undefined) return { tMax: given, basis: 'given', expectedTime: Number.NaN, pilot: null, diagnostics: [] };
  const t0 = Number.isFinite(predictedLast) && predictedLast > 0 ? 10 * predictedLast : 1000;
  const n = system.dimension;
  const paths = Math.min(run.paths, PILOT_PATHS);
  // The pilot's steps: at most paths · ceil(L / dt) · n node-steps.
  const affordable = Math.floor(PILOT_BUDGET / (paths * n)) * run.dt;
  const cap = Math.max(t0, Math.min(PILOT_FACTOR * t0, affordable));
  const batch = simulateEscapePaths(system, setup, { dt: run.dt, tMax: cap, seed: run.seed, count: paths });
  let finished = 0;
  let longest = 0;
  let sum = 0;
  let steps = 0;
  for (let k = 0; k < batch.count; k++) {
    steps += batch.steps[k];
    if (batch.capped[k]) continue;
    const last = batch.steps[k] * run.dt;
    finished++;
    sum += last;
    longest = Math.max(longest, last);
  }
  const pilot = { paths, cap, finished, longest, nodeSteps: steps * n };
  const expectedTime = finished > 0 ? sum / finished : Number.NaN;
  const p = setup.p;
  if (finished < paths) {
    return {
      tMax: cap,
      basis: 'pilot-capped',
      expectedTime: Number.NaN,
      pilot,
      diagnostics: [{ level: 'warning', code: 'pilot-capped', p, message: `time cap: ${paths - finished} of ${paths} pilot paths had not seen every node escape by t = ${fmt(cap)}, so the cap is ${fmt(cap)}; paths of the study may stop there with an incomplete order (set tMax, or a larger noise level)` }],
    };
  }
  const tMax = Math.max(t0, SAFETY * longest);
  return {
    tMax,
    basis: 'pilot',
    expectedTime,
    pilot,
    diagnostics: [{ level: 'info', code: 'time-cap', p, message: `time cap ${fmt(tMax)}: ${SAFETY} × the longest last-escape time (${fmt(longest)}) of a pilot of the study's first ${paths} paths${tMax === t0 ? ', raised to 10 × the predicted mean last escape' : ''}; the pilot's mean last escape is ${fmt(expectedTime)}${Number.isFinite(predictedLast) ? ` (predicted ${fmt(predictedLast)})` : ''}` }],
  };
}

function fmt(v: number): string {
  return Number.isFinite(v) ? Number(v.toPrecision(4)).toString() : String(v);
}
