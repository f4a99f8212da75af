/**
 * Default Euler–Maruyama step and the step-halving check (docs/noise.md, "Monte Carlo escape
 * sequences").
 */
import type { Eigenvalue } from '../atlas/types';
import type { TimeSummary } from './escape-statistics';

/**
 * Fraction c of the fastest time scale used as the default step, dt = c / max_i |lambda_i|:
 * 0.05 keeps the deterministic part of every step well inside explicit Euler's stability bound
 * |1 + lambda dt| < 1 (dt < 2 / |lambda|) and the drift error per relaxation time at about 5 %
 * (common practice, no source); the halving check measures whether it is small enough.
 */
export const DEFAULT_STEP_FRACTION = 0.05;

/** dt = c / max |lambda| over the start state's eigenvalues (c = DEFAULT_STEP_FRACTION); 0.01 when all vanish. */
export function defaultStep(eigenvalues: readonly Eigenvalue[], c = DEFAULT_STEP_FRACTION): number {
  let fastest = 0;
  for (const e of eigenvalues) fastest = Math.max(fastest, Math.hypot(e.re, e.im));
  return fastest > 0 ? c / fastest : 0.01;
}

export interface StepCheck {
  readonly dt: number;
  readonly halfDt: number;
  /** Paths in each of the two runs (the same path indices and seeds). */
  readonly paths: number;
  readonly meanFirstEscape: number;
  readonly meanFirstEscapeHalf: number;
  /** Width of the 95 % interval of the mean first-escape time at dt (2 Z95 s / sqrt(m)). */
  readonly interval: number;
  readonly shift: number;
  /** |shift| < interval. */
  readonly passed: boolean;
}

/**
 * Compares the mean first-escape time at dt and at dt / 2 (same path indices, same seeds): the
 * step passes when the shift is smaller than the width of the 95 % interval of the mean at dt
 * (the criterion; the two runs are not coupled path by path, so this checks a bias
 * larger than the statistical resolution, not a small one).
 */
export function compareSteps(dt: number, full: TimeSummary, half: TimeSummary): StepCheck {
  const interval = 2 * full.meanHalfWidth;
  const shift = half.mean - full.mean;
  return {
    dt,
    halfDt: dt / 2,
    paths: Math.min(full.count, half.count),
    meanFirstEscape: full.mean,
    meanFirstEscapeHalf: half.mean,
    interval,
    shift,
    passed: Number.isFinite(interval) && Math.abs(shift) < interval,
  };
}
