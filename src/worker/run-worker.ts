/**
 * A worker process's loop: claim runs from the database queue, compute each in a piscina thread,
 * keep the lease alive with progress heartbeats, store the result, repeat. Stateless: everything it
 * knows about a run is in the runs row, so any number of these can share one database.
 */
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import { MessageChannel, type MessagePort } from 'node:worker_threads';
import { Piscina } from 'piscina';
import { ENGINE_VERSION } from '../lib/atlas/engine-version.ts';
import {
  claimRun, completeRun, failRun, findResultId, heartbeat, releaseRun, type ClaimedRun, type RunError,
} from '../lib/server/runs/queue.ts';
import type { ComputeOutput } from '../lib/server/runs/compute.ts';
import type { ComputeTask, ProgressMessage, TaskFailure, TaskResult } from './compute-task.ts';
import { notifyRunFinished } from '../lib/server/runs/notify.ts';
import { availableParallelism } from 'node:os';
import type { EscapeComputeTask, EscapeTaskResult, PointMessage } from './compute-task.ts';
import type { StoredEscapeSettings } from '../lib/server/escapes/schema.ts';
import {
  atlasCacheKey, completeEscapeRun, findStudyId, storeAtlas, storedValueIndices, storeValue,
} from '../lib/server/escapes/repository.ts';
import { findResultDiagram } from '../lib/server/results/repository.ts';
import { decodeDiagramText } from '../lib/storage/index.ts';
import type { MapComputeTask } from './compute-task.ts';
import type { MapComputeOutput } from '../lib/server/maps/compute.ts';
import type { StoredMapSettings } from '../lib/server/maps/schema.ts';
import { completeMapRun, findMapResultId } from '../lib/server/maps/repository.ts';

export interface WorkerOptions {
  /** Queue name to take runs from. */
  queue: string;
  /** Runs computed at once (one thread each). */
  concurrency: number;
  /** How long a claim stays valid without a heartbeat. */
  leaseMs: number;
  /** Progress/lease write interval; must be well below leaseMs and at most 1000 for 1/s progress. */
  heartbeatMs: number;
  /** Idle wait between claim attempts when the queue is empty. */
  pollMs: number;
  /** Test-only: each computation waits this long first (makes kill and cancel tests deterministic). */
  testDelayMs: number;
  /** After cancellation, how long the thread gets to notice before it is terminated. */
  cancelGraceMs: number;
  log: (msg: string) => void;
}

function envInt(name: string, fallback: number): number {
  const v = process.env[name];
  if (v === undefined || v === '') return fallback;
  const n = Number(v);
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a non-negative number, got "${v}"`);
  return n;
}

export function workerOptionsFromEnv(): WorkerOptions {
  const leaseMs = envInt('BRINKMAP_WORKER_LEASE_MS', 30_000);
  return {
    queue: process.env.BRINKMAP_WORKER_QUEUE || 'default',
    concurrency: Math.max(1, envInt('BRINKMAP_WORKER_THREADS', 1)),
    leaseMs,
    heartbeatMs: Math.min(envInt('BRINKMAP_WORKER_HEARTBEAT_MS', 500), 1000, Math.floor(leaseMs / 3)),
    pollMs: Math.max(20, envInt('BRINKMAP_WORKER_POLL_MS', 1000)),
    testDelayMs: envInt('BRINKMAP_WORKER_TEST_DELAY_MS', 0),
    cancelGraceMs: 2000,
    log: (msg) => console.log(`[worker ${process.pid}] ${msg}`),
  };
}

interface Active {
  run: ClaimedRun;
  cancelFlag: Int32Array;
  abort: AbortController;
  lost: boolean;
}

export class RunWorker {
  readonly owner = `${hostname()}:${process.pid}:${randomBytes(4).toString('hex')}`;
  private readonly pool: Piscina;
  private readonly active = new Set<Active>();
  private stopping = false;
  private wake: (() => void) | null = null;
  private loopDone: Promise<void> | null = null;

  constructor(private readonly opts: WorkerOptions) {
    this.pool = new Piscina({
      filename: new URL('./compute-task.ts', import.meta.url).href,
      // Threads start with the worker and load the engine then (piscina imports `filename` on thread
      // start): a thread started on demand made the first run of a worker wait 2-3 s for module
      // loading (docs/architecture.md, "Storing results").
      minThreads: opts.concurrency,
      maxThreads: opts.concurrency,
      idleTimeout: 60_000,
      // Inherit `--import tsx` so the thread can load TypeScript.
      execArgv: process.execArgv,
    });
  }

  start(): void {
    this.opts.log(`started as ${this.owner} on queue "${this.opts.queue}" (${this.opts.concurrency} thread(s), engine ${ENGINE_VERSION})`);
    this.loopDone = this.loop();
  }

  /** Stops claiming, hands unfinished runs back to the queue, closes the thread pool. */
  async stop(): Promise<void> {
    if (this.stopping) return this.loopDone ?? undefined;
    this.stopping = true;
    this.wake?.();
    for (const a of this.active) {
      Atomics.store(a.cancelFlag, 0, 1);
      Atomics.notify(a.cancelFlag, 0);
      a.abort.abort();
    }
    await this.loopDone;
    await this.pool.destroy();
    this.opts.log('stopped');
  }

  private async sleep(ms: number): Promise<void> {
    await new Promise<void>((resolve) => {
      const t = setTimeout(() => { this.wake = null; resolve(); }, ms);
      this.wake = () => { clearTimeout(t); this.wake = null; resolve(); };
    });
  }

  private async loop(): Promise<void> {
    const running = new Set<Promise<void>>();
    while (!this.stopping) {
      if (running.size >= this.opts.concurrency) {
        await Promise.race(running);
        continue;
      }
      let run: ClaimedRun | null = null;
      try {
        run = await claimRun(this.owner, this.opts.queue, this.opts.leaseMs);
      } catch (e) {
        this.opts.log(`claim failed (${short(e)}); retrying`);
      }
      if (this.stopping) {
        if (run) await releaseRun(run, this.owner).catch(() => undefined);
        break;
      }
      if (!run) {
        // Jitter keeps many idle workers from polling in lock-step.
        await this.sleep(this.opts.pollMs * (0.75 + Math.random() * 0.5));
        continue;
      }
      const p: Promise<void> = this.process(run).finally(() => running.delete(p));
      running.add(p);
    }
    await Promise.allSettled([...running]);
  }

  private async process(run: ClaimedRun): Promise<void> {
    const log = this.opts.log;
    log(`run ${run.id}: claimed (attempt ${run.attempt})`);
    if (run.kind === 'escapes') return this.processEscapes(run);
    if (run.kind === 'map') return this.processMap(run);
    await this.runPooled<ComputeOutput>(run, {
      findReuse: () => findResultId(run.cacheKey),
      completeReuse: (reuse) => completeRun(run, this.owner, { reuse }, ENGINE_VERSION),
      reused: 'stored result',
      task: (port, cancelFlag): ComputeTask => ({
        documentText: run.documentText, settings: run.settings, port, cancelFlag, testDelayMs: this.opts.testDelayMs,
        threads: Math.max(1, Math.min(run.settings.threads ?? 1, availableParallelism())),
      }),
      store: (output) => completeRun(run, this.owner, output, ENGINE_VERSION),
      tooLarge: (output) => `the diagram (${(output.diagramBlob.byteLength / 1048576).toFixed(1)} MB encoded, ${output.pointCount} points) is larger than the database accepts in one statement (max_allowed_packet); narrow the sweep or lower maxPointsPerBranch, or raise max_allowed_packet`,
      done: (output, storingMs) => {
        const f = output.phasesMs;
        const stored = `${output.diagramBlob.byteLength + Buffer.byteLength(output.regimesJson)} bytes stored`;
        return `done (${output.branchCount} branches, ${output.pointCount} points, ${output.computeMs} ms: trace ${f.trace}, labelling ${f.label}, critical coupling ${f.onset}, encoding ${f.encode}; ${stored} in ${storingMs} ms)`;
      },
    });
  }

  /**
   * A run computed by one pool thread and stored whole when it finishes (trace and map runs): reuse
   * of a stored result with the same cache key, else the thread with progress, lease heartbeat and the
   * shared cancel flag; then hand-back (worker stopping), discard (cancelled or taken over), store
   * (a result over max_allowed_packet fails the run for good), or a failed attempt (retried unless
   * deterministic). Mail on done and on final failure.
   */
  private async runPooled<O extends { readonly cancelled?: boolean }>(run: ClaimedRun, how: {
    findReuse: () => Promise<number | null>;
    completeReuse: (reuse: number) => Promise<boolean>;
    reused: string;
    task: (port: MessagePort, cancelFlag: SharedArrayBuffer) => object;
    store: (output: O) => Promise<boolean>;
    tooLarge: (output: O) => string;
    done: (output: O, storingMs: number) => string;
  }): Promise<void> {
    const log = this.opts.log;
    const reuse = await how.findReuse().catch(() => null);
    if (reuse !== null) {
      const ok = await how.completeReuse(reuse).catch(() => false);
      log(`run ${run.id}: ${ok ? `reused ${how.reused} ${reuse}` : 'lost before reuse could be recorded'}`);
      if (ok) await this.notify(run, 'done');
      return;
    }
    const a: Active = { run, cancelFlag: new Int32Array(new SharedArrayBuffer(4)), abort: new AbortController(), lost: false };
    this.active.add(a);
    // stop() may have run while this run was being looked up: start the thread already cancelled.
    if (this.stopping) Atomics.store(a.cancelFlag, 0, 1);
    const { port1, port2 } = new MessageChannel();
    let progress = { fraction: 0, phrase: 'starting' };
    port1.on('message', (m: ProgressMessage) => { progress = m; });
    port1.unref();
    const timer = this.startHeartbeat(a, () => ({ fraction: progress.fraction, phrase: progress.phrase }));

    let output: O | null = null;
    let failure: unknown = null;
    let deterministic = false;
    try {
      const result = await this.pool.run(how.task(port2, a.cancelFlag.buffer as SharedArrayBuffer), { transferList: [port2], signal: a.abort.signal }) as O | TaskFailure;
      if ('failed' in result) {
        failure = result.failed;
        deterministic = result.failed.deterministic;
      } else {
        output = result;
      }
    } catch (e) {
      failure = e;
    } finally {
      clearInterval(timer);
      port1.close();
      this.active.delete(a);
    }

    try {
      if (this.stopping && !a.lost && (output === null || output.cancelled)) {
        await releaseRun(run, this.owner);
        log(`run ${run.id}: handed back to the queue (worker stopping)`);
        return;
      }
      if (a.lost || output?.cancelled) {
        log(`run ${run.id}: stopped (cancelled or taken over); nothing stored`);
        return;
      }
      if (output) {
        let ok: boolean;
        const storing = performance.now();
        try {
          ok = await how.store(output);
        } catch (e) {
          // A result larger than the server's max_allowed_packet fails the same way on every attempt.
          if ((e as { errno?: number }).errno !== 1153) throw e;
          const error = { code: 'result-too-large', message: how.tooLarge(output) };
          const status = await failRun(run, this.owner, error, false);
          log(`run ${run.id}: ${error.message}`);
          if (status === 'failed') await this.notify(run, 'failed');
          return;
        }
        log(`run ${run.id}: ${ok ? how.done(output, Math.round(performance.now() - storing)) : 'finished but no longer ours; discarded'}`);
        if (ok) await this.notify(run, 'done');
        return;
      }
      await this.failAttempt(run, failure, deterministic);
    } catch (e) {
      // The database went away while finishing: the lease will expire and another worker retries.
      log(`run ${run.id}: could not record the outcome (${short(e)}); the lease will lapse and the run be retried`);
    }
  }

  /**
   * An escape study (docs/noise.md, "Escape studies as runs"): the atlas (a stored trace result of
   * the same version and trace settings, or computed now and stored as one), then the study in a
   * pool thread, every finished parameter value stored as it arrives, so a retry resumes after it.
   * Same lease, heartbeat, cancel and retry rules as trace runs.
   */
  private async processEscapes(run: ClaimedRun): Promise<void> {
    const log = this.opts.log;
    const settings = run.settings as unknown as StoredEscapeSettings;
    const reuse = await findStudyId(run.cacheKey).catch(() => null);
    if (reuse !== null) {
      const ok = await completeEscapeRun(run, this.owner, { reuse }, null).catch(() => false);
      log(`run ${run.id}: ${ok ? `reused stored escape study ${reuse}` : 'lost before reuse could be recorded'}`);
      if (ok) await this.notify(run, 'done');
      return;
    }
    const a: Active = { run, cancelFlag: new Int32Array(new SharedArrayBuffer(4)), abort: new AbortController(), lost: false };
    this.active.add(a);
    if (this.stopping) Atomics.store(a.cancelFlag, 0, 1);
    let progress: { fraction: number; phrase: string; values?: unknown } = { fraction: 0, phrase: 'starting' };
    const timer = this.startHeartbeat(a, () => ({ fraction: progress.fraction, phrase: progress.phrase, detail: progress.values ? { values: progress.values } : undefined }));
    let failure: unknown = null;
    let deterministic = false;
    let result: EscapeTaskResult | null = null;
    let atlasId: number | null = null;
    let stores: Promise<void> = Promise.resolve();
    try {
      // 1. The atlas of the same version and sweep.
      const key = atlasCacheKey(run.versionHash, JSON.parse(run.documentText), settings.atlas ?? {});
      // Either stored form of the diagram (encoded or JSON text), as JSON text for the study.
      let atlas = await findResultDiagram(key);
      if (atlas) {
        log(`run ${run.id}: atlas from stored trace result ${atlas.id}`);
      } else {
        progress = { fraction: 0, phrase: 'computing the atlas first' };
        const { port1, port2 } = new MessageChannel();
        port1.on('message', (m: ProgressMessage) => { progress = { fraction: 0.1 * m.fraction, phrase: `atlas: ${m.phrase}` }; });
        port1.unref();
        // The study's threads trace the atlas too (the same diagram for any count, docs/numerics.md §11).
        const task: ComputeTask = { documentText: run.documentText, settings: settings.atlas ?? {}, port: port2, cancelFlag: a.cancelFlag.buffer as SharedArrayBuffer, testDelayMs: 0,
          threads: Math.max(1, Math.min(settings.threads ?? 1, availableParallelism())) };
        try {
          const out: TaskResult = await this.pool.run(task, { transferList: [port2], signal: a.abort.signal });
          if ('failed' in out) {
            failure = out.failed;
            deterministic = out.failed.deterministic;
          } else if (!out.cancelled) {
            const id = await storeAtlas(key, out);
            atlas = { id, diagramJson: decodeDiagramText(out.diagramBlob) };
            log(`run ${run.id}: atlas computed and stored as trace result ${id}`);
          }
        } finally {
          port1.close();
        }
      }
      // 2. The study, resuming after the values stored by earlier attempts.
      if (atlas && !failure) {
        atlasId = atlas.id;
        const done = await storedValueIndices(run.cacheKey);
        if (done.length > 0) log(`run ${run.id}: resuming after ${done.length} stored parameter value(s)`);
        const { port1, port2 } = new MessageChannel();
        port1.on('message', (m: ProgressMessage | PointMessage) => {
          if ('point' in m) {
            const point = m.point;
            stores = stores.then(() => storeValue(run.cacheKey, point)).then(
              () => log(`run ${run.id}: stored parameter value ${point.idx + 1} of ${settings.values.length} (p = ${point.p})`),
              (e) => log(`run ${run.id}: could not store parameter value ${point.idx} (${short(e)}); a retry computes it again`),
            ).finally(() => { try { port1.postMessage({ stored: point.idx }); } catch { /* thread gone */ } });
          } else {
            progress = { fraction: 0.1 + 0.9 * m.fraction, phrase: m.phrase, values: m.values };
          }
        });
        const task: EscapeComputeTask = {
          kind: 'escapes', documentText: run.documentText, diagramJson: atlas.diagramJson, settings, done,
          threads: Math.max(1, Math.min(settings.threads ?? 1, availableParallelism())),
          port: port2, cancelFlag: a.cancelFlag.buffer as SharedArrayBuffer, testDelayMs: this.opts.testDelayMs,
        };
        try {
          result = await this.pool.run(task, { transferList: [port2], signal: a.abort.signal });
          await stores;
        } finally {
          port1.close();
        }
        if (result && 'failed' in result) {
          failure = result.failed;
          deterministic = result.failed.deterministic;
        }
      }
    } catch (e) {
      failure = e;
    } finally {
      clearInterval(timer);
      this.active.delete(a);
    }
    try {
      const cancelled = !failure && (!result || ('cancelled' in result && result.cancelled));
      // As for trace runs: a worker stopping (SIGTERM aborts the thread) hands the run back uncounted.
      if (this.stopping && !a.lost && !(result && 'summary' in result && result.summary)) {
        await releaseRun(run, this.owner);
        log(`run ${run.id}: handed back to the queue (worker stopping)`);
        return;
      }
      if (a.lost || cancelled) {
        log(`run ${run.id}: stopped (cancelled or taken over); stored values are kept for a retry`);
        return;
      }
      if (result && 'summary' in result && result.summary) {
        // A value whose row could not be stored (database hiccup) is computed again by a retry.
        const stored = await storedValueIndices(run.cacheKey);
        if (stored.length < settings.values.length) {
          const error = { code: 'values-missing', message: `${settings.values.length - stored.length} of ${settings.values.length} parameter values could not be stored` };
          const status = await failRun(run, this.owner, error, true);
          log(`run ${run.id}: ${error.message}; ${status === 'queued' ? 'queued for retry' : 'ended failed'}`);
          if (status === 'failed') await this.notify(run, 'failed');
          return;
        }
        const ok = await completeEscapeRun(run, this.owner, result.summary, atlasId);
        log(`run ${run.id}: ${ok ? `done (${result.summary.valueCount} parameter values, ${result.summary.computeMs} ms)` : 'finished but no longer ours; discarded'}`);
        if (ok) await this.notify(run, 'done');
        return;
      }
      await this.failAttempt(run, failure, deterministic);
    } catch (e) {
      log(`run ${run.id}: could not record the outcome (${short(e)}); the lease will lapse and the run be retried`);
    }
  }

  /**
   * A two-parameter map (docs/maps.md, "Maps in the workspace"): one pool thread computes it with
   * progress and the shared cancel flag; the map_results row is written with the run's completion.
   * Same lease, heartbeat, cancel, retry and mail rules as trace runs.
   */
  private async processMap(run: ClaimedRun): Promise<void> {
    await this.runPooled<MapComputeOutput>(run, {
      findReuse: () => findMapResultId(run.cacheKey),
      completeReuse: (reuse) => completeMapRun(run, this.owner, { reuse }),
      reused: 'stored map',
      task: (port, cancelFlag): MapComputeTask => ({ kind: 'map', documentText: run.documentText, settings: run.settings as unknown as StoredMapSettings, port, cancelFlag, testDelayMs: this.opts.testDelayMs }),
      store: (output) => completeMapRun(run, this.owner, output),
      tooLarge: (output) => `the map (${(output.mapBlob.byteLength / 1048576).toFixed(1)} MB deflated, ${output.curvePointCount} curve points) is larger than the database accepts in one statement (max_allowed_packet); narrow the ranges or lower maxPointsPerCurve or maxCurves`,
      done: (output) => `done (map: ${output.curveCount} curves, ${output.curvePointCount} curve points, ${output.pointCount} codimension-two points, ${output.computeMs} ms; ${output.mapBlob.byteLength} bytes stored of ${output.jsonBytes} bytes of JSON)`,
    });
  }

  /**
   * Renews the run's lease every heartbeatMs with the progress `read` gives (one renewal at a time);
   * a renewal the database refuses (cancelled, taken over) stops the thread. Returns the timer.
   */
  private startHeartbeat(a: Active, read: () => { fraction: number; phrase: string; detail?: unknown }): ReturnType<typeof setInterval> {
    const log = this.opts.log;
    let beating = false;
    const beat = async () => {
      if (beating || a.lost) return;
      beating = true;
      try {
        const p = read();
        const ours = await heartbeat(a.run.id, this.owner, this.opts.leaseMs, p.fraction, p.phrase, undefined, p.detail);
        if (!ours) this.cancelThread(a, 'the run was cancelled or taken over');
      } catch (e) {
        log(`run ${a.run.id}: heartbeat failed (${short(e)})`);
      } finally {
        beating = false;
      }
    };
    return setInterval(beat, this.opts.heartbeatMs);
  }

  /** A failed attempt: recorded (queued again unless the failure is deterministic), logged, mailed when final. */
  private async failAttempt(run: ClaimedRun, failure: unknown, deterministic: boolean): Promise<void> {
    const log = this.opts.log;
    const error = describeFailure(failure);
    const status = await failRun(run, this.owner, error, !deterministic);
    log(`run ${run.id}: attempt failed (${error.message}); ${status === 'queued' ? 'queued for retry' : status === 'failed' ? 'ended failed' : 'no longer ours'}`);
    if (status === 'failed') await this.notify(run, 'failed');
  }

  private cancelThread(a: Active, why: string): void {
    if (a.lost) return;
    a.lost = true;
    this.opts.log(`run ${a.run.id}: stopping the computation (${why})`);
    Atomics.store(a.cancelFlag, 0, 1);
    Atomics.notify(a.cancelFlag, 0);
    // The engine polls isCancelled(); a thread that does not return in time is terminated.
    setTimeout(() => a.abort.abort(), this.opts.cancelGraceMs).unref();
  }

  private async notify(run: ClaimedRun, status: 'done' | 'failed'): Promise<void> {
    if (!run.notify || !run.createdBy) return;
    try {
      await notifyRunFinished(run.id, status);
    } catch (e) {
      this.opts.log(`run ${run.id}: e-mail notice failed (${short(e)})`);
    }
  }
}

/** Database errors quote their SQL, which may hold a whole diagram: keep log lines short. */
function short(e: unknown): string {
  const m = (e as Error)?.message ?? String(e);
  return m.length > 300 ? `${m.slice(0, 140)} … ${m.slice(-140)}` : m;
}

function describeFailure(e: unknown): RunError {
  if (e && typeof e === 'object') {
    const err = e as { name?: string; message?: string; code?: string; issues?: unknown; deterministic?: boolean };
    if (typeof err.code === 'string' && typeof err.deterministic === 'boolean') {
      return { code: err.code, message: err.message ?? 'computation failed', ...(err.issues ? { issues: err.issues } : {}) };
    }
    return { code: 'compute-error', message: `${err.name ?? 'Error'}: ${err.message ?? String(e)}`.slice(0, 500) };
  }
  return { code: 'compute-error', message: String(e).slice(0, 500) };
}
