/** Work estimate and budget of a Monte Carlo run (docs/noise.md, "Budget"). */

/** Default budget: 4e9 node-steps, a few minutes on two cores at the measured ~100 ns per node-step (npm run bench). */
export const DEFAULT_BUDGET = 4e9;

export interface WorkEstimate {
  /** paths × steps per path × n. */
  readonly nodeSteps: number;
  /** min(expected time, tMax) / dt. */
  readonly stepsPerPath: number;
  /** Where the expected time came from: the weak-noise prediction, the pilot of the time cap (time-cap.ts) or the cap itself. */
  readonly basis: 'prediction' | 'pilot' | 't-max';
}

/**
 * nodeSteps = paths · ceil(min(T, tMax) / dt) · n, where T is the expected mean time until every
 * node has escaped (a path stops there) when finite, else tMax; `source` says where T came from.
 */
export function estimateWork(paths: number, n: number, dt: number, tMax: number, expectedTime?: number, source: 'prediction' | 'pilot' = 'prediction'): WorkEstimate {
  const usePrediction = expectedTime !== undefined && Number.isFinite(expectedTime) && expectedTime > 0 && expectedTime < tMax;
  const T = usePrediction ? expectedTime : tMax;
  const stepsPerPath = Math.ceil(T / dt);
  return { nodeSteps: paths * stepsPerPath * n, stepsPerPath, basis: usePrediction ? source : 't-max' };
}

/** Thrown when a run's estimate exceeds its budget; the message gives the estimate and the ways out. */
export class BudgetExceededError extends Error {
  constructor(readonly estimate: WorkEstimate, readonly budget: number) {
    super(
      `budget: the run needs about ${estimate.nodeSteps.toExponential(2)} node-steps (${estimate.stepsPerPath} steps per path, from the ${estimate.basis === 'prediction' ? 'predicted mean escape time' : estimate.basis === 'pilot' ? 'mean escape time of the pilot paths' : 't-max cap'}), over the budget of ${budget.toExponential(2)}; use a larger noise level (escape times fall like exp(-barrier / sigma^2)), fewer paths, a smaller t-max, or the weak-noise prediction`,
    );
    this.name = 'BudgetExceededError';
  }
}

/** Throws BudgetExceededError when estimate.nodeSteps > budget. */
export function checkBudget(estimate: WorkEstimate, budget = DEFAULT_BUDGET): void {
  if (!(estimate.nodeSteps <= budget)) throw new BudgetExceededError(estimate, budget);
}
