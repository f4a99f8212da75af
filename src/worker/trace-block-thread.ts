/**
 * Runs inside a piscina thread of the trace pool (trace-pool.ts): compiles the model document itself
 * (closures do not cross threads) and traces one block of starting equilibria (traceBlock). The
 * block's result depends only on the document and the block, so it is the same in any thread.
 */
import { compileModelJson, type CompileOptions } from '../lib/model/index.ts';
import type { CompiledSystem } from '../lib/model/compiled-system.ts';
import { traceBlock, type BlockResult, type TraceBlock } from '../lib/atlas/index.ts';

export interface TraceBlockTask {
  readonly model: unknown;
  readonly compile?: CompileOptions;
  readonly block: TraceBlock;
  /** Int32Array view: [0] = 1 once cancelled. */
  readonly cancelFlag?: SharedArrayBuffer;
  /** Float64Array view: [block.index] = the block's progress fraction. */
  readonly progress?: SharedArrayBuffer;
}

/** The last compiled document of this thread (a pool is kept warm across traces). */
let cached: { key: string; system: CompiledSystem } | null = null;

function compiled(model: unknown, options: CompileOptions | undefined): CompiledSystem {
  const key = JSON.stringify([model, options ?? null]);
  if (cached?.key !== key) cached = { key, system: compileModelJson(model, options) };
  return cached.system;
}

export default function traceBlockThread(task: TraceBlockTask): BlockResult {
  const system = compiled(task.model, task.compile);
  const flag = task.cancelFlag ? new Int32Array(task.cancelFlag) : null;
  const fractions = task.progress ? new Float64Array(task.progress) : null;
  return traceBlock(system, task.block, {
    isCancelled: () => flag !== null && Atomics.load(flag, 0) === 1,
    onProgress: (f) => { if (fractions) fractions[task.block.index] = f; },
  });
}
