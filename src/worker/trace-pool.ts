/**
 * The trace on several threads (piscina), shared by the CLI and the worker: the engine splits a
 * full enumeration of starting equilibria into a fixed number of blocks (planTrace, 'traceBlocks';
 * docs/numerics.md §11) that does not depend on the thread count, this pool traces the blocks on
 * its threads (trace-block-thread.ts), and the engine merges them in block order, so the diagram is
 * the same for any number of threads, one included. Start the pool once and reuse it: a thread
 * takes about a second to load the engine.
 */
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import type { BlockResult, TraceBlockRunner } from '../lib/atlas/index.ts';
import type { CompileOptions } from '../lib/model/index.ts';
import type { TraceBlockTask } from './trace-block-thread.ts';

const PROGRESS_MS = 200;

export class TracePool {
  private readonly pool: Piscina;

  /** `threads` in [1, os.availableParallelism()] (RangeError otherwise). */
  constructor(readonly threads: number) {
    const cores = availableParallelism();
    if (!Number.isInteger(threads) || threads < 1 || threads > cores) throw new RangeError(`threads: must be an integer from 1 to ${cores}, got ${threads}`);
    this.pool = new Piscina({
      filename: new URL('./trace-block-thread.ts', import.meta.url).href,
      minThreads: threads,
      maxThreads: threads,
      idleTimeout: 60_000,
      // The thread loads TypeScript: inherit `--import tsx` (CLI, worker), or add it where the
      // process loads TypeScript some other way (vitest).
      execArgv: process.execArgv.some((a) => a.includes('tsx')) ? process.execArgv : [...process.execArgv, '--import', 'tsx'],
    });
  }

  /**
   * A TraceBlockRunner (traceDiagramWith) for one model document compiled with `compile` (the same
   * options the caller compiled its system with): each block is one task, taken by the next free
   * thread; results come back in block order. `cancelFlag` (Int32Array [0] = 1) stops every block.
   */
  runner(model: unknown, compile?: CompileOptions, cancelFlag?: SharedArrayBuffer): TraceBlockRunner {
    return async (blocks, hooks) => {
      const progress = new SharedArrayBuffer(8 * blocks.length);
      const fractions = new Float64Array(progress);
      const flag = cancelFlag ?? new SharedArrayBuffer(4);
      const flagView = new Int32Array(flag);
      // Progress and the caller's own cancel test are polled here; the threads read the shared arrays.
      const timer = setInterval(() => {
        if (hooks.isCancelled?.()) Atomics.store(flagView, 0, 1);
        for (let b = 0; b < blocks.length; b++) hooks.onProgress(b, fractions[b], 'tracing');
      }, PROGRESS_MS);
      try {
        return await Promise.all(blocks.map((block) => {
          const task: TraceBlockTask = { model, compile, block, cancelFlag: flag, progress };
          return (this.pool.run(task) as Promise<BlockResult>).then((r) => {
            hooks.onProgress(block.index, 1, 'traced');
            return r;
          });
        }));
      } finally {
        clearInterval(timer);
      }
    };
  }

  async close(): Promise<void> {
    await this.pool.destroy();
  }
}
