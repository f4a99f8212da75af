/**
 * One Monte Carlo escape study at one parameter value (docs/noise.md, "Monte Carlo escape
 * sequences"): the escape graph at p, its barriers and the weak-noise prediction (prediction.ts),
 * the start state, thresholds, default step and time cap, the budget check; then the paths
 * (in-process here, or through src/worker/escape-pool.ts) and the report of the `escapes` command.
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import type { NoiseSpec } from './types';
import { noiseGraphAt } from './graph-at';
import { barriersAt } from './barriers';
import { predictEscapes, type Prediction } from './prediction';
import { NoiseSettingError, sigmaOf } from './noise-spec';
import { escapeThresholds } from './thresholds';
import { simulateEscapePaths, type EscapeSetup, type PathBatch } from './monte-carlo';
import { defaultStep, compareSteps, type StepCheck } from './step-size';
import { checkBudget, estimateWork, DEFAULT_BUDGET, type WorkEstimate } from './budget';
import { escapeStatistics, summarizeTimes, type EscapeStatistics } from './escape-statistics';
import type { CancelSignal, Progress } from './types';
import { chooseTimeCap, type TimeCap } from './time-cap';

export type EscapeStart = 'all-base' | 'all-tipped';

export interface EscapeStudyOptions {
  /** Number of paths, integer in [1, 1e7]; default 1000. */
  readonly paths?: number;
  /** Step; default defaultStep(eigenvalues of the start state). */
  readonly dt?: number;
  /** Time cap per path; default from a pilot of the study's first paths (time-cap.ts). */
  readonly tMax?: number;
  /** Default 1. */
  readonly seed?: number;
  /** Default 'all-base'. */
  readonly start?: EscapeStart;
  /** Escape threshold per node (thresholds.ts); default halfway. */
  readonly thresholds?: ArrayLike<number>;
  /** Node-steps allowed (budget.ts); default DEFAULT_BUDGET. */
  readonly budget?: number;
  /** Paths rerun at dt / 2 for the step check (the first ones); default min(paths, 500); 0 skips it. */
  readonly stepCheckPaths?: number;
}

export interface PreparedEscapes {
  readonly p: number;
  readonly setup: EscapeSetup;
  readonly names: string[];
  readonly paths: number;
  readonly dt: number;
  readonly tMax: number;
  readonly seed: number;
  readonly stepCheckPaths: number;
  readonly prediction: Prediction;
  readonly estimate: WorkEstimate;
  /** How tMax was chosen (time-cap.ts). */
  readonly timeCap: Omit<TimeCap, 'diagnostics'>;
  readonly diagnostics: Diagnostic[];
}

export const MAX_PATHS = 1e7;

function positive(field: string, v: number | undefined): void {
  if (v !== undefined && !(Number.isFinite(v) && v > 0)) throw new NoiseSettingError(field, `must be positive and finite, got ${v}`);
}

/**
 * Everything before the paths: escape graph (noiseGraphAt), barriers (barriersAt), prediction
 * (predictEscapes), start state, thresholds, step, time cap and the budget (throws
 * BudgetExceededError). Bad settings throw NoiseSettingError naming the field; no escape graph at
 * p throws NoiseSettingError('at', reason).
 */
export function prepareEscapes(system: CompiledSystem, diagram: Diagram, spec: NoiseSpec, p: number, options: EscapeStudyOptions = {}): PreparedEscapes {
  const paths = options.paths ?? 1000;
  if (!Number.isInteger(paths) || paths < 1 || paths > MAX_PATHS) throw new NoiseSettingError('paths', `must be an integer from 1 to ${MAX_PATHS}, got ${paths}`);
  positive('noise', spec.level);
  positive('dt', options.dt);
  positive('tMax', options.tMax);
  const seed = options.seed ?? 1;
  if (!Number.isInteger(seed) || seed < 0 || seed > 4294967295) throw new NoiseSettingError('seed', `must be an integer in [0, 4294967295], got ${seed}`);
  const start = options.start ?? 'all-base';
  const graph = noiseGraphAt(system, diagram, p);
  if (!graph.ok) throw new NoiseSettingError('at', `no escape graph at ${p}: ${graph.reason}`);
  const diagnostics: Diagnostic[] = [...graph.diagnostics];
  const want = start === 'all-base' ? 'base' : 'tipped';
  const startIndex = graph.graph.states.findIndex((s) => s.pattern.every((q) => q === want));
  if (startIndex < 0) throw new NoiseSettingError('start', `there is no ${start} stable state at ${p}`);
  const direction = start === 'all-base' ? 'up' : 'down';
  const thresholds = escapeThresholds(graph.roles, options.thresholds, direction);
  const b = barriersAt(system, graph, spec.weights);
  diagnostics.push(...b.diagnostics);
  const prediction = predictEscapes(system, graph, b.barriers, spec, { start: startIndex, thresholds, gradient: b.gradient });
  diagnostics.push(...prediction.diagnostics);
  const state = graph.states[startIndex];
  const dt = options.dt ?? defaultStep(state.eigenvalues);
  const last = prediction.meanLastEscape;
  const stepCheckPaths = Math.min(paths, options.stepCheckPaths ?? 500);
  const setup: EscapeSetup = {
    p,
    sigma: sigmaOf(spec),
    start: Float64Array.from(state.x),
    thresholds,
    returnLevels: Float64Array.from(graph.roles, (r) => r.threshold),
    direction,
  };
  // Refuse before the pilot when the prediction alone is over the budget (the check as it was
  // before the pilot existed).
  const budget = options.budget ?? DEFAULT_BUDGET;
  const before = options.tMax ?? (Number.isFinite(last) && last > 0 ? 10 * last : 1000);
  checkBudget(estimateWork(paths + 2 * stepCheckPaths, system.dimension, dt, before, last), budget);
  // The cap, from a pilot of the study's first paths unless given (time-cap.ts); the budget counts
  // the pilot's mean last escape as the expected time when it has one.
  const { diagnostics: capNotes, ...timeCap } = chooseTimeCap(system, setup, { dt, seed, paths }, last, options.tMax);
  diagnostics.push(...capNotes);
  const tMax = timeCap.tMax;
  const fromPilot = Number.isFinite(timeCap.expectedTime);
  const estimate = estimateWork(paths + 2 * stepCheckPaths, system.dimension, dt, tMax, fromPilot ? timeCap.expectedTime : last, fromPilot ? 'pilot' : 'prediction');
  checkBudget(estimate, budget);
  const names = [...(system.network?.nodeIds ?? system.variables)];
  return { p, setup, names, paths, dt, tMax, seed, stepCheckPaths, prediction, estimate, timeCap, diagnostics };
}

export interface EscapeReport {
  readonly parameter: string;
  readonly p: number;
  readonly noise: number;
  readonly paths: number;
  readonly dt: number;
  readonly tMax: number;
  readonly seed: number;
  readonly nodeSteps: number;
  readonly sequences: EscapeStatistics['sequences'];
  readonly escapeTimes: EscapeStatistics['escapeTimes'];
  readonly between: EscapeStatistics['between'];
  readonly returns: number;
  readonly pathsWithReturns: number;
  readonly capped: number;
  readonly stepCheck: StepCheck | null;
  readonly estimate: WorkEstimate;
  readonly prediction: { prefactor: Prediction['prefactor']; sequences: Prediction['sequences']; meanFirstEscape: number; meanKthEscape: number[]; returnProbability: number };
  readonly diagnostics: Diagnostic[];
}

/** First escape times of a batch's first `m` paths. */
function firstTimes(batch: PathBatch, m: number): number[] {
  const out: number[] = [];
  for (let k = 0; k < Math.min(m, batch.count); k++) {
    const j = batch.order[k * batch.n];
    if (j >= 0) out.push(batch.times[k * batch.n + j]);
  }
  return out;
}

/** The `escapes` report from the paths (and the dt / 2 rerun of the first stepCheckPaths of them). */
export function escapeReport(system: CompiledSystem, prep: PreparedEscapes, level: number, batch: PathBatch, half: PathBatch | null): EscapeReport {
  const stats = escapeStatistics(batch, prep.names, { tEnd: prep.tMax });
  const diagnostics = [...prep.diagnostics];
  let stepCheck: StepCheck | null = null;
  if (half && half.count > 1) {
    stepCheck = compareSteps(prep.dt, summarizeTimes(firstTimes(batch, half.count)), summarizeTimes(firstTimes(half, half.count)));
    diagnostics.push(
      stepCheck.passed
        ? { level: 'info', code: 'step-check-passed', message: `halving dt = ${prep.dt} moved the mean first-escape time by ${stepCheck.shift.toPrecision(3)}, less than its 95 % interval width ${stepCheck.interval.toPrecision(3)} (${stepCheck.paths} paths)`, p: prep.p }
        : { level: 'warning', code: 'step-check-failed', message: `halving dt = ${prep.dt} moved the mean first-escape time by ${stepCheck.shift.toPrecision(3)}, not less than its 95 % interval width ${stepCheck.interval.toPrecision(3)} (${stepCheck.paths} paths): use a smaller --dt`, p: prep.p },
    );
  }
  if (stats.capped > 0) diagnostics.push({ level: 'warning', code: 'paths-capped', message: `${stats.capped} of ${stats.paths} paths hit t-max = ${prep.tMax} before every node escaped`, p: prep.p });
  if (batch.cancelled) diagnostics.push({ level: 'warning', code: 'cancelled', message: `cancelled after ${batch.count} of ${prep.paths} paths`, p: prep.p });
  const pr = prep.prediction;
  return {
    parameter: system.parameter,
    p: prep.p,
    noise: level,
    paths: stats.paths,
    dt: prep.dt,
    tMax: prep.tMax,
    seed: prep.seed,
    nodeSteps: stats.nodeSteps + (half ? escapeStatistics(half, prep.names).nodeSteps : 0),
    sequences: stats.sequences,
    escapeTimes: stats.escapeTimes,
    between: stats.between,
    returns: stats.returns.total,
    pathsWithReturns: stats.returns.paths,
    capped: stats.capped,
    stepCheck,
    estimate: prep.estimate,
    prediction: { prefactor: pr.prefactor, sequences: pr.sequences, meanFirstEscape: pr.meanFirstEscape, meanKthEscape: pr.meanKthEscape, returnProbability: pr.returnProbability },
    diagnostics,
  };
}

/**
 * One study in this thread: prepareEscapes, the paths, the dt / 2 rerun of the first
 * stepCheckPaths paths (same indices and seeds), escapeReport.
 */
export function escapesAt(
  system: CompiledSystem,
  diagram: Diagram,
  spec: NoiseSpec,
  p: number,
  options: EscapeStudyOptions & { progress?: Progress; signal?: CancelSignal } = {},
): EscapeReport {
  const prep = prepareEscapes(system, diagram, spec, p, options);
  const batch = simulateEscapePaths(system, prep.setup, { dt: prep.dt, tMax: prep.tMax, seed: prep.seed, count: prep.paths, progress: options.progress, signal: options.signal });
  const half = prep.stepCheckPaths > 0 && !batch.cancelled
    ? simulateEscapePaths(system, prep.setup, { dt: prep.dt / 2, tMax: prep.tMax, seed: prep.seed, count: prep.stepCheckPaths, signal: options.signal })
    : null;
  return escapeReport(system, prep, spec.level, batch, half);
}
