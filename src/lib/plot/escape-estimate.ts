/**
 * The cost of an escape study before it is started, in words, for the "Study escapes" form. The same
 * count as the service's request-time check (src/lib/server/escapes/settings.ts, checkRequestBudget):
 * (paths + 2 · min(paths, 500)) · ⌈tMax / dt⌉ · n node-steps per value (estimateWork on the t-max
 * basis), against the engine's budget per value. Without dt and tMax the worker derives them from the
 * start state and the prediction, so only the paths and values are known here and the estimate says so.
 */
import { estimateWork } from '../noise/budget';
import { ESCAPE_BUDGET_PER_VALUE } from '../server/escapes/budget-constant';

/**
 * Node-steps per second of one escape-pool thread on this kind of server: the 1-thread column of the
 * noise bench (docs/noise.md, "Measured speed": 29.1 M node-steps/s for 2 nodes, 2 cores under load),
 * rounded down to 25 M for the step check and other work on the machine.
 */
export const NODE_STEPS_PER_SECOND_PER_THREAD = 25e6;

export interface StudyCostInput {
  readonly paths: number;
  /** State dimension (nodes of a network, variables of an ODE model). */
  readonly n: number;
  readonly valueCount: number;
  readonly dt?: number;
  readonly tMax?: number;
  /** Threads asked for; the worker uses at most `cores`. */
  readonly threads: number;
  readonly cores: number;
  readonly budgetPerValue?: number;
  readonly rate?: number;
}

export interface StudyCost {
  /** Upper bound per value (every path runs to tMax), null without dt and tMax. */
  readonly nodeStepsPerValue: number | null;
  readonly nodeStepsTotal: number | null;
  /** Wall time in seconds on the threads used, null without dt and tMax. */
  readonly seconds: number | null;
  readonly overBudget: boolean;
  readonly threadsUsed: number;
  /** "about 4 min on this server", or why no number can be given. */
  readonly words: string;
}

/** A duration in words, rounded to what matters: "under a second", "about 40 s", "about 4 min", "about 2.5 h", "about 3 days". */
export function durationWords(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return 'an unknown time';
  if (seconds < 1) return 'under a second';
  if (seconds < 90) { const step = seconds < 20 ? 1 : 10; return `about ${Math.round(seconds / step) * step} s`; }
  const min = seconds / 60;
  if (min < 90) return `about ${Math.round(min)} min`;
  const h = min / 60;
  if (h < 36) return `about ${h < 10 ? Number(h.toFixed(1)) : Math.round(h)} h`;
  return `about ${Math.round(h / 24)} days`;
}

export function studyCost(input: StudyCostInput): StudyCost {
  const budget = input.budgetPerValue ?? ESCAPE_BUDGET_PER_VALUE;
  const threadsUsed = Math.max(1, Math.min(input.threads, input.cores));
  const rate = (input.rate ?? NODE_STEPS_PER_SECOND_PER_THREAD) * threadsUsed;
  const stepCheck = Math.min(input.paths, 500);
  if (input.dt === undefined || input.tMax === undefined || !(input.dt > 0) || !(input.tMax > 0)) {
    return {
      nodeStepsPerValue: null, nodeStepsTotal: null, seconds: null, overBudget: false, threadsUsed,
      words: `${input.paths} paths (and ${2 * stepCheck} step-check paths) at each of ${input.valueCount} value${input.valueCount === 1 ? '' : 's'}; the worker derives the step and the time cap from the model and refuses a value over the budget before any path runs. Give the step and the time cap for a time estimate.`,
    };
  }
  const e = estimateWork(input.paths + 2 * stepCheck, input.n, input.dt, input.tMax);
  const total = e.nodeSteps * input.valueCount;
  const seconds = total / rate;
  const overBudget = e.nodeSteps > budget;
  const words = overBudget
    ? `over the budget: ${e.nodeSteps.toExponential(2)} node-steps per value, the limit is ${budget.toExponential(2)}; the server will refuse it (use a larger noise level, fewer paths, a smaller time cap or a larger step)`
    : `at most ${durationWords(seconds)} on this server (${threadsUsed} thread${threadsUsed === 1 ? '' : 's'}; ${total.toExponential(2)} node-steps if every path runs to the time cap; most stop sooner)`;
  return { nodeStepsPerValue: e.nodeSteps, nodeStepsTotal: total, seconds, overBudget, threadsUsed, words };
}
