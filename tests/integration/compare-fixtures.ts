/**
 * Finished runs for the compare tests: a model made through the API by the workspace's modeler and
 * its run computed in this process through the worker's own code path (claim, computeTrace,
 * complete) on a queue of its own, so the test server's worker is not waited for.
 */
import type { WorkspaceFixture } from './helpers.ts';
import { twoLakes } from './service/fixtures.ts';

let serial = 0;

/** Two invented lakes (see twoLakes); `parameter` renames the swept coupling, `a2` makes each document distinct. */
export function compareLakes(a2: number, parameter = 'beta') {
  const doc = twoLakes({ a2, name: `Compare lakes ${a2} (invented)` });
  return { ...doc, coupling: { ...doc.coupling, parameter }, sweep: { ...doc.sweep, parameter } };
}

export async function finishedRun(ws: WorkspaceFixture, document: unknown): Promise<{ modelId: number; runId: number }> {
  const res = await ws.modeler.post(`/api/models?workspace=${ws.workspaceId}`, { name: `Compare model ${Date.now().toString(36)}-${++serial}`, document });
  if (res.status !== 201) throw new Error(`create model: ${res.status} ${res.text}`);
  const modelId = Number(res.body.model.id);
  const { startRun } = await import('../../src/lib/server/runs/repository.ts');
  const { claimRun, completeRun } = await import('../../src/lib/server/runs/queue.ts');
  const { computeTrace } = await import('../../src/lib/server/runs/compute.ts');
  const { ENGINE_VERSION } = await import('../../src/lib/atlas/engine-version.ts');
  const queue = `compare-${Date.now().toString(36)}-${serial}`;
  const run = await startRun(ws.workspaceId, ws.modeler.user!.id, { modelId, settings: {}, notify: false, queue });
  if (run.status !== 'done') {
    const claimed = await claimRun('compare-test', queue, 60_000);
    if (!claimed) throw new Error('finished run: nothing to claim');
    const out = computeTrace(claimed.documentText, claimed.settings, { onProgress: () => undefined, isCancelled: () => false });
    if (!(await completeRun(claimed, 'compare-test', out, ENGINE_VERSION))) throw new Error('finished run: complete failed');
  }
  return { modelId, runId: run.id };
}

/** A run that stays queued (no worker serves its queue). */
export async function queuedRun(ws: WorkspaceFixture, document: unknown): Promise<number> {
  const res = await ws.modeler.post(`/api/models?workspace=${ws.workspaceId}`, { name: `Compare queued ${Date.now().toString(36)}-${++serial}`, document });
  if (res.status !== 201) throw new Error(`create model: ${res.status} ${res.text}`);
  const { startRun } = await import('../../src/lib/server/runs/repository.ts');
  const run = await startRun(ws.workspaceId, ws.modeler.user!.id, { modelId: Number(res.body.model.id), settings: {}, notify: false, queue: 'compare-idle' });
  return run.id;
}
