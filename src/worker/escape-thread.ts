/**
 * Runs inside a piscina thread of the escape pool: compiles the model document itself (closures do
 * not cross threads) and simulates one contiguous range of path indices (simulateEscapePaths).
 * Path i's stream depends only on (seed, i), so the records are the same in any thread.
 */
import { compileModelJson } from '../lib/model/index.ts';
import type { CompiledSystem } from '../lib/model/compiled-system.ts';
import { simulateEscapePaths, type PathBatch } from '../lib/noise/monte-carlo.ts';
import type { EscapeDirection } from '../lib/noise/thresholds.ts';

export interface EscapeTask {
  readonly model: unknown;
  readonly p: number;
  readonly sigma: number[];
  readonly start: number[];
  readonly thresholds: number[];
  readonly returnLevels: number[];
  readonly direction: EscapeDirection;
  readonly dt: number;
  readonly tMax: number;
  readonly seed: number;
  readonly first: number;
  readonly count: number;
  /** Int32Array view: [0] = 1 once cancelled. */
  readonly cancelFlag?: SharedArrayBuffer;
}

/**
 * The last compiled document of this thread: a pool is kept warm across tasks and parameter values
 * (sweeps), so the document is compiled once per thread, not once per task.
 */
let cached: { key: string; system: CompiledSystem } | null = null;

function compiled(model: unknown): CompiledSystem {
  const key = JSON.stringify(model);
  if (cached?.key !== key) cached = { key, system: compileModelJson(model) };
  return cached.system;
}

export default function escapeThread(task: EscapeTask): PathBatch {
  const system = compiled(task.model);
  const flag = task.cancelFlag ? new Int32Array(task.cancelFlag) : null;
  const signal = { get aborted() { return flag !== null && Atomics.load(flag, 0) === 1; } };
  return simulateEscapePaths(
    system,
    {
      p: task.p,
      sigma: Float64Array.from(task.sigma),
      start: Float64Array.from(task.start),
      thresholds: Float64Array.from(task.thresholds),
      returnLevels: Float64Array.from(task.returnLevels),
      direction: task.direction,
    },
    { dt: task.dt, tMax: task.tMax, seed: task.seed, first: task.first, count: task.count, signal },
  );
}
