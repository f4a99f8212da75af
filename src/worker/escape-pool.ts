/**
 * The escape Monte Carlo on several threads (piscina), shared by the CLI and the worker: the path
 * indices 0..paths-1 are cut into contiguous ranges, each thread compiles the document and
 * simulates its ranges (escape-thread.ts), and the batches are merged in index order, so the
 * result is bit-identical for any number of threads.
 */
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import { mergeBatches, type EscapeSetup, type PathBatch } from '../lib/noise/monte-carlo.ts';
import type { PathRunner } from '../lib/noise/sweep.ts';
import type { EscapeTask } from './escape-thread.ts';

export interface PoolRun {
  readonly model: unknown;
  readonly setup: EscapeSetup;
  readonly dt: number;
  readonly tMax: number;
  readonly seed: number;
  readonly first?: number;
  readonly count: number;
  /** Progress over the ranges done. */
  readonly progress?: (report: { fraction: number; pathsDone: number }) => void;
  readonly cancelFlag?: SharedArrayBuffer;
}

export class EscapePool {
  private readonly pool: Piscina;

  /** `threads` in [1, os.availableParallelism()] (RangeError otherwise). */
  constructor(readonly threads: number) {
    const cores = availableParallelism();
    if (!Number.isInteger(threads) || threads < 1 || threads > cores) throw new RangeError(`threads: must be an integer from 1 to ${cores}, got ${threads}`);
    this.pool = new Piscina({
      filename: new URL('./escape-thread.ts', import.meta.url).href,
      minThreads: threads,
      maxThreads: threads,
      execArgv: process.execArgv,
    });
  }

  /**
   * Simulates paths first .. first + count - 1 in ranges of about count / (4 threads) paths
   * (several per thread, for progress and balance), merged in index order.
   */
  async run(r: PoolRun): Promise<PathBatch> {
    const first = r.first ?? 0;
    const pieces = Math.min(r.count, this.threads === 1 ? 1 : 4 * this.threads);
    const size = Math.ceil(r.count / pieces);
    const tasks: Promise<PathBatch>[] = [];
    let done = 0;
    for (let a = 0; a < r.count; a += size) {
      const task: EscapeTask = {
        model: r.model,
        p: r.setup.p,
        sigma: [...r.setup.sigma],
        start: [...r.setup.start],
        thresholds: [...r.setup.thresholds],
        returnLevels: [...r.setup.returnLevels],
        direction: r.setup.direction,
        dt: r.dt,
        tMax: r.tMax,
        seed: r.seed,
        first: first + a,
        count: Math.min(size, r.count - a),
        cancelFlag: r.cancelFlag,
      };
      tasks.push(
        (this.pool.run(task) as Promise<PathBatch>).then((b) => {
          done += b.count;
          r.progress?.({ fraction: done / r.count, pathsDone: done });
          return b;
        }),
      );
    }
    return mergeBatches(await Promise.all(tasks));
  }

  /**
   * A PathRunner (src/lib/noise/sweep.ts) over this pool for one model document: sweepEscapesWith
   * then runs every parameter value's paths on the same warm threads.
   */
  runner(model: unknown): PathRunner {
    return (setup, run) => this.run({ model, setup, ...run });
  }

  async close(): Promise<void> {
    await this.pool.destroy();
  }
}
