/**
 * Runs inside a piscina worker thread: one trace run per call. Progress goes back over the
 * MessagePort in the task; cancellation comes in through a shared Int32 flag that the owning worker
 * process sets (Atomics), which the engine polls through isCancelled().
 */
import type { MessagePort } from 'node:worker_threads';
import { computeTrace, type ComputeOutput } from '../lib/server/runs/compute.ts';
import type { RunSettings } from '../lib/server/runs/schemas.ts';

export interface ComputeTask {
  readonly documentText: string;
  readonly settings: RunSettings;
  readonly port: MessagePort;
  /** Int32Array view: [0] = 1 once the run is cancelled. */
  readonly cancelFlag: SharedArrayBuffer;
  /** Test-only slowdown (BRINKMAP_WORKER_TEST_DELAY_MS): wait this long, in slices, before computing. */
  readonly testDelayMs: number;
}

export interface ProgressMessage { readonly fraction: number; readonly phrase: string }

/** A failure inside the thread, returned as data because custom error classes do not survive the thread boundary. */
export interface TaskFailure {
  readonly failed: { readonly code: string; readonly message: string; readonly issues?: unknown; readonly deterministic: boolean };
}

export type TaskResult = ComputeOutput | TaskFailure;

const PROGRESS_INTERVAL_MS = 100;

export default function computeTask(task: ComputeTask): TaskResult {
  const flag = new Int32Array(task.cancelFlag);
  const isCancelled = () => Atomics.load(flag, 0) === 1;
  let last = 0;
  const post = (fraction: number, phrase: string, force = false) => {
    const now = Date.now();
    if (!force && now - last < PROGRESS_INTERVAL_MS) return;
    last = now;
    task.port.postMessage({ fraction, phrase } satisfies ProgressMessage);
  };
  const delayShare = task.testDelayMs > 0 ? 0.5 : 0;
  try {
    if (task.testDelayMs > 0) {
      // Atomics.wait sleeps the thread but wakes as soon as the flag is set (Atomics.notify).
      const until = Date.now() + task.testDelayMs;
      while (!isCancelled() && Date.now() < until) {
        const left = until - Date.now();
        post(delayShare * (1 - left / task.testDelayMs), 'test delay before computing', true);
        Atomics.wait(flag, 0, 0, Math.min(50, Math.max(1, left)));
      }
    }
    if (isCancelled()) {
      return { diagramJson: '', regimesJson: '', previewJson: '', previewPoints: 0, branchCount: 0, pointCount: 0, specialPointCount: 0, computeMs: 0, cancelled: true };
    }
    const out = computeTrace(task.documentText, task.settings, {
      onProgress: (f, phrase) => post(delayShare + (1 - delayShare) * f, phrase, f >= 1),
      isCancelled,
    });
    return out;
  } catch (e) {
    const err = e as { name?: string; message?: string; issues?: unknown };
    if (err?.name === 'ModelError') {
      return { failed: { code: 'model-error', message: err.message ?? 'invalid model', issues: err.issues, deterministic: true } };
    }
    return { failed: { code: 'compute-error', message: `${err?.name ?? 'Error'}: ${err?.message ?? String(e)}`.slice(0, 500), deterministic: false } };
  } finally {
    task.port.close();
  }
}
