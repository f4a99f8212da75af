/**
 * Runs inside a piscina worker thread: one trace run per call. Progress goes back over the
 * MessagePort in the task; cancellation comes in through a shared Int32 flag that the owning worker
 * process sets (Atomics), which the engine polls through isCancelled().
 */
import type { MessagePort } from 'node:worker_threads';
import { computeTrace, computeTraceOn, type ComputeOutput } from '../lib/server/runs/compute.ts';
import { TracePool } from './trace-pool.ts';
import type { RunSettings } from '../lib/server/runs/schemas.ts';
import { computeEscapeStudy, type EscapeStudySummary, type StudyRunner, type ValueProgress } from '../lib/server/escapes/compute.ts';
import type { EscapePointDbRow } from '../lib/server/escapes/rows.ts';
import type { StoredEscapeSettings } from '../lib/server/escapes/schema.ts';
import { simulateEscapePaths } from '../lib/noise/monte-carlo.ts';
import { compileModelJson } from '../lib/model/index.ts';
import { EscapePool } from './escape-pool.ts';
import { computeMap, type MapComputeOutput } from '../lib/server/maps/compute.ts';
import type { StoredMapSettings } from '../lib/server/maps/schema.ts';

export interface ComputeTask {
  readonly documentText: string;
  readonly settings: RunSettings;
  readonly port: MessagePort;
  /** Int32Array view: [0] = 1 once the run is cancelled. */
  readonly cancelFlag: SharedArrayBuffer;
  /** Test-only slowdown (BRINKMAP_WORKER_TEST_DELAY_MS): wait this long, in slices, before computing. */
  readonly testDelayMs: number;
  /** Trace runs: threads for the trace's blocks (already capped at the machine's cores); 1 or absent traces in this thread. */
  readonly threads?: number;
}

/**
 * An escape study (run kind 'escapes'): the atlas' diagram comes in as stored text, the values in
 * `done` are stored already (a retry resumes after them). Every finished value is posted as a
 * `point` message, and the thread waits for the worker's `stored` acknowledgement before going on.
 */
export interface EscapeComputeTask extends Omit<ComputeTask, 'settings'> {
  readonly kind: 'escapes';
  readonly diagramJson: string;
  readonly settings: StoredEscapeSettings;
  readonly done: number[];
  /** Threads of the escape pool (already capped at the machine's cores); 1 simulates in this thread. */
  readonly threads: number;
}

/** A two-parameter map (run kind 'map'): computed in this thread, stored by the worker. */
export interface MapComputeTask extends Omit<ComputeTask, 'settings'> {
  readonly kind: 'map';
  readonly settings: StoredMapSettings;
}

export type MapTaskResult = MapComputeOutput | TaskFailure;

export interface EscapeTaskOutput { readonly kind: 'escapes'; readonly cancelled: boolean; readonly summary: EscapeStudySummary | null }

export interface ProgressMessage { readonly fraction: number; readonly phrase: string; readonly values?: ValueProgress[] }
export interface PointMessage { readonly point: EscapePointDbRow }

/** A failure inside the thread, returned as data because custom error classes do not survive the thread boundary. */
export interface TaskFailure {
  readonly failed: { readonly code: string; readonly message: string; readonly issues?: unknown; readonly deterministic: boolean };
}

export type TaskResult = ComputeOutput | TaskFailure;
export type EscapeTaskResult = EscapeTaskOutput | TaskFailure;

const PROGRESS_INTERVAL_MS = 100;

export default function computeTask(task: ComputeTask | EscapeComputeTask | MapComputeTask): TaskResult | MapTaskResult | Promise<EscapeTaskResult> | Promise<TaskResult> {
  if ('kind' in task && task.kind === 'escapes') return escapeTask(task);
  if ('kind' in task && task.kind === 'map') return mapTask(task);
  return traceTask(task as ComputeTask);
}

/**
 * This thread's trace pool, started by the first trace run that asks for more than one thread and
 * kept for the next (starting its threads costs about a second each); a run asking for another
 * count replaces it. Its threads end with this thread.
 */
let tracePool: TracePool | null = null;

async function tracePoolOf(threads: number): Promise<TracePool> {
  if (tracePool?.threads === threads) return tracePool;
  const old = tracePool;
  tracePool = null;
  await old?.close().catch(() => undefined);
  tracePool = new TracePool(threads);
  return tracePool;
}

/**
 * The thread's answer for an error the computation threw: invalid models and settings, and refused
 * studies, fail the same way on every attempt (deterministic, no retry); anything else may be retried.
 */
function taskFailure(e: unknown): TaskFailure {
  const err = e as { name?: string; message?: string; issues?: unknown; code?: string };
  if (err?.name === 'ModelError') return { failed: { code: 'model-error', message: err.message ?? 'invalid model', issues: err.issues, deterministic: true } };
  if (err?.name === 'EscapeStudyRefused') return { failed: { code: err.code ?? 'refused', message: err.message ?? 'refused', deterministic: true } };
  if (err?.name === 'NoiseSettingError') return { failed: { code: 'invalid-settings', message: err.message ?? 'invalid settings', deterministic: true } };
  return { failed: { code: 'compute-error', message: `${err?.name ?? 'Error'}: ${err?.message ?? String(e)}`.slice(0, 500), deterministic: false } };
}

/** Progress to the worker over the task's port, at most every PROGRESS_INTERVAL_MS unless forced. */
function progressPoster(port: MessagePort): (fraction: number, phrase: string, force?: boolean, values?: ValueProgress[]) => void {
  let last = 0;
  return (fraction, phrase, force = false, values) => {
    const now = Date.now();
    if (!force && now - last < PROGRESS_INTERVAL_MS) return;
    last = now;
    port.postMessage({ fraction, phrase, ...(values ? { values: values.map((v) => ({ ...v })) } : {}) } satisfies ProgressMessage);
  };
}

function testDelay(task: { testDelayMs: number }, flag: Int32Array, post: (f: number, phrase: string, force?: boolean) => void, share: number): void {
  const until = Date.now() + task.testDelayMs;
  while (Atomics.load(flag, 0) !== 1 && Date.now() < until) {
    const left = until - Date.now();
    post(share * (1 - left / task.testDelayMs), 'test delay before computing', true);
    Atomics.wait(flag, 0, 0, Math.min(50, Math.max(1, left)));
  }
}

async function escapeTask(task: EscapeComputeTask): Promise<EscapeTaskResult> {
  const flag = new Int32Array(task.cancelFlag);
  const isCancelled = () => Atomics.load(flag, 0) === 1;
  const post = progressPoster(task.port);
  // Acknowledgements of stored points come back over the same port.
  const acks: (() => void)[] = [];
  task.port.on('message', (m: { stored?: number }) => { if (m && typeof m.stored === 'number') acks.shift()?.(); });
  let pool: EscapePool | null = null;
  try {
    if (task.testDelayMs > 0) testDelay(task, flag, post, 0);
    if (isCancelled()) return { kind: 'escapes', cancelled: true, summary: null };
    const model = JSON.parse(task.documentText);
    let runner: StudyRunner;
    if (task.threads > 1) {
      const escapePool = new EscapePool(task.threads);
      pool = escapePool;
      runner = (setup, run) => escapePool.run({ model, setup, dt: run.dt, tMax: run.tMax, seed: run.seed, count: run.count, cancelFlag: task.cancelFlag, progress: (r) => run.onPaths?.(r.pathsDone) });
    } else {
      const system = compileModelJson(model);
      const signal = { get aborted() { return isCancelled(); } };
      runner = async (setup, run) => simulateEscapePaths(system, setup, {
        dt: run.dt, tMax: run.tMax, seed: run.seed, count: run.count, signal,
        progress: (r) => { if (r.pathsDone !== undefined) run.onPaths?.(r.pathsDone); },
      });
    }
    const out = await computeEscapeStudy(task.documentText, task.diagramJson, task.settings, task.done, runner, {
      onProgress: (f, phrase, values) => post(f, phrase, f >= 1, values),
      isCancelled,
      onPoint: (point) => new Promise<void>((resolve) => {
        acks.push(resolve);
        task.port.postMessage({ point } satisfies PointMessage);
      }),
    });
    return { kind: 'escapes', ...out };
  } catch (e) {
    return taskFailure(e);
  } finally {
    await pool?.close().catch(() => undefined);
    task.port.close();
  }
}

/**
 * One trace run: in this thread, or with threads > 1 the trace's blocks on the thread's trace pool
 * (docs/numerics.md §11), which gives the same result.
 */
async function traceTask(task: ComputeTask): Promise<TaskResult> {
  const flag = new Int32Array(task.cancelFlag);
  const isCancelled = () => Atomics.load(flag, 0) === 1;
  const post = progressPoster(task.port);
  const delayShare = task.testDelayMs > 0 ? 0.5 : 0;
  const hooks = { onProgress: (f: number, phrase: string) => post(delayShare + (1 - delayShare) * f, phrase, f >= 1), isCancelled };
  try {
    if (task.testDelayMs > 0) testDelay(task, flag, post, delayShare);
    if (isCancelled()) {
      return { diagramBlob: new Uint8Array(0), regimesJson: '', previewPoints: 0, branchCount: 0, pointCount: 0, specialPointCount: 0, computeMs: 0, phasesMs: { trace: 0, label: 0, onset: 0, encode: 0 }, cancelled: true };
    }
    if ((task.threads ?? 1) <= 1) return computeTrace(task.documentText, task.settings, hooks);
    // The pool starts when a trace first has more than one block (a small network never needs it).
    return await computeTraceOn(task.documentText, task.settings, hooks,
      (document) => async (blocks, h) => (await tracePoolOf(task.threads!)).runner(document, undefined, task.cancelFlag)(blocks, h));
  } catch (e) {
    return taskFailure(e);
  } finally {
    task.port.close();
  }
}

function mapTask(task: MapComputeTask): MapTaskResult {
  const flag = new Int32Array(task.cancelFlag);
  const isCancelled = () => Atomics.load(flag, 0) === 1;
  const post = progressPoster(task.port);
  const delayShare = task.testDelayMs > 0 ? 0.5 : 0;
  try {
    if (task.testDelayMs > 0) testDelay(task, flag, post, delayShare);
    if (isCancelled()) {
      return { kind: 'map', mapBlob: new Uint8Array(0), jsonBytes: 0, second: task.settings.second, secondValue: 0, curveCount: 0, curvePointCount: 0, pointCount: 0, computeMs: 0, cancelled: true };
    }
    return computeMap(task.documentText, task.settings, {
      onProgress: (f, phrase) => post(delayShare + (1 - delayShare) * f, phrase, f >= 1),
      isCancelled,
    });
  } catch (e) {
    return taskFailure(e);
  } finally {
    task.port.close();
  }
}
