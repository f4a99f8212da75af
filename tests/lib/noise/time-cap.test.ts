import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model';
import { simulateEscapePaths, type EscapeSetup } from '../../../src/lib/noise/monte-carlo';
import { chooseTimeCap, PILOT_PATHS, SAFETY, PILOT_FACTOR } from '../../../src/lib/noise/time-cap';

// The textbook double well x' = x - x^3 (as in monte-carlo.test.ts), started in the left well, escape
// past x = 0.5. At sigma = 0.5 its mean first-passage time is about 35: Kramers' pi sqrt(2) e^2 ≈ 32.8,
// and the exact value (Gardiner §5.2.7) is 1.067 times that (both computed in monte-carlo.test.ts);
// the deliberately poor "predictions" below are far from it.
const doubleWell = compileModelJson({
  format: 'brinkmap/ode-1', name: 'double well (textbook)', variables: ['x'], parameters: { k: 0 }, rates: { x: 'x - x^3 + k' }, sweep: { parameter: 'k', from: 0, to: 0.1 },
});
const setup: EscapeSetup = { p: 0, sigma: Float64Array.of(0.5), start: Float64Array.of(-1), thresholds: Float64Array.of(0.5), returnLevels: Float64Array.of(0), direction: 'up' };
const run = { dt: 0.005, seed: 7, paths: 300 };

/** The study's first `count` paths with no practical cap, computed directly (independent of chooseTimeCap's bookkeeping). */
function longestOfFirst(count: number): { longest: number; mean: number } {
  const b = simulateEscapePaths(doubleWell, setup, { dt: run.dt, tMax: 1e6, seed: run.seed, count });
  expect(b.capped.every((c) => c === 0)).toBe(true);
  let longest = 0;
  let sum = 0;
  for (let k = 0; k < count; k++) {
    longest = Math.max(longest, b.times[k]);
    sum += b.times[k];
  }
  return { longest, mean: sum / count };
}

describe('chooseTimeCap (the pilot rule of time-cap.ts)', () => {
  it('keeps a given cap and runs no pilot', () => {
    const c = chooseTimeCap(doubleWell, setup, run, 3, 42);
    expect(c).toMatchObject({ tMax: 42, basis: 'given', pilot: null });
  });

  it('sets the cap to SAFETY x the longest last escape of the study\'s first paths when the prediction is too short', () => {
    // Prediction 0.5: today's rule would cap at 10 x 0.5 = 5, about a quarter of the mean escape time.
    const c = chooseTimeCap(doubleWell, setup, run, 0.5);
    const direct = longestOfFirst(PILOT_PATHS);
    expect(c.basis).toBe('pilot');
    expect(c.pilot?.paths).toBe(PILOT_PATHS);
    expect(c.pilot?.finished).toBe(PILOT_PATHS);
    // Grid times k dt: the same paths, the same steps, so equal to the last bit.
    expect(c.pilot?.longest).toBe(direct.longest);
    expect(c.tMax).toBe(Math.max(5, SAFETY * direct.longest));
    expect(c.expectedTime).toBeCloseTo(direct.mean, 12);
    // The study's paths under that cap: none of the 300 is cut (with the old cap of 5 most are).
    const study = simulateEscapePaths(doubleWell, setup, { dt: run.dt, tMax: c.tMax, seed: run.seed, count: run.paths });
    const old = simulateEscapePaths(doubleWell, setup, { dt: run.dt, tMax: 5, seed: run.seed, count: run.paths });
    const cut = (b: typeof study) => b.capped.reduce((s, v) => s + v, 0);
    expect(cut(study)).toBe(0);
    expect(cut(old)).toBeGreaterThan(run.paths / 2);
  });

  it('is deterministic in the seed and changes with it', () => {
    const a = chooseTimeCap(doubleWell, setup, run, 0.5);
    const b = chooseTimeCap(doubleWell, setup, run, 0.5);
    const other = chooseTimeCap(doubleWell, setup, { ...run, seed: 8 }, 0.5);
    expect(b.tMax).toBe(a.tMax);
    expect(other.tMax).not.toBe(a.tMax);
  });

  it('never goes below 10 x the prediction', () => {
    // A prediction of 50 (longer than the true mean, about 35): the cap stays 500.
    const c = chooseTimeCap(doubleWell, setup, run, 50);
    expect(c.basis).toBe('pilot');
    expect(c.tMax).toBe(Math.max(500, SAFETY * (c.pilot?.longest ?? 0)));
    expect(c.tMax).toBeGreaterThanOrEqual(500);
  });

  it('uses the long pilot cap with a warning when pilot paths do not finish', () => {
    // Prediction 1e-3: the pilot cap is PILOT_FACTOR x 10 x 1e-3 = 0.2, far below the escape times.
    const c = chooseTimeCap(doubleWell, setup, run, 1e-3);
    expect(c.basis).toBe('pilot-capped');
    expect(c.tMax).toBeCloseTo(PILOT_FACTOR * 10 * 1e-3, 15);
    expect(c.diagnostics[0]).toMatchObject({ level: 'warning', code: 'pilot-capped' });
    expect(c.diagnostics[0].message).toMatch(/of 32 pilot paths had not seen every node escape/);
  });

  it('uses fewer pilot paths for a smaller study', () => {
    const c = chooseTimeCap(doubleWell, setup, { ...run, paths: 5 }, 0.5);
    expect(c.pilot?.paths).toBe(5);
    expect(c.pilot?.longest).toBe(longestOfFirst(5).longest);
  });
});
