/**
 * A trace run on two threads (settings.threads, docs/numerics.md §11): the worker traces the two
 * blocks of a 729-start network on the trace pool inside its compute thread and stores exactly the
 * diagram the one-thread computation gives; threads are kept with the run but are not part of the
 * result's identity, so the same inputs on one thread reuse it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { computeTrace } from '../../../src/lib/server/runs/compute.ts';
import { decodeDiagramText } from '../../../src/lib/storage/index.ts';
import { createModel, runRow, spawnWorker, until, ws, type SpawnedWorker } from './fixtures.ts';
import { chain, cubicDoc } from '../../../scripts/trace-blocks-common.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let worker: SpawnedWorker;
beforeAll(async () => {
  w = await workspaceWithRoles('Trace threads');
  worker = spawnWorker('default');
}, 60_000);
afterAll(async () => {
  const code = await worker.stop();
  expect(code, worker.output()).toBe(0);
});

describe('a trace run with settings.threads', () => {
  it('stores the diagram of the one-thread computation, keeps threads with the run, and is reused by the same inputs on one thread', async () => {
    // Invented: six cubic elements on a two-way chain, 3^6 = 729 starting patterns (two blocks).
    const doc = cubicDoc('Six invented lakes, two-way chain', 6, chain(6, true));
    const { modelId } = await createModel(w.modeler, w.workspaceId, doc, 'Six lakes on threads');
    const start = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: { threads: 2 } });
    expect(start.status, start.text).toBe(201);
    expect(start.body.run.settings).toEqual({ threads: 2 });
    const done = await until('threaded trace run done', async () => {
      const r = await runRow(start.body.run.id);
      if (r.status === 'failed') throw new Error(`run failed: ${JSON.stringify(r.error)}`);
      return r.status === 'done' && r;
    }, 180_000, 250);
    const row = await db('results').where({ id: done.result_id }).first();
    const stored = decodeDiagramText(row.diagram_blob);
    const here = decodeDiagramText(computeTrace(JSON.stringify(doc), {}, { onProgress: () => undefined, isCancelled: () => false }).diagramBlob);
    expect(stored.length).toBeGreaterThan(1000);
    expect(stored === here, 'stored diagram equals the one-thread computation byte for byte').toBe(true);
    expect(JSON.parse(stored).settings).not.toHaveProperty('threads');

    const again = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: {} });
    expect(again.body.run).toMatchObject({ status: 'done', reused: true, resultId: done.result_id });
  }, 240_000);

  it('answers 400 naming settings.threads for a count out of range, storing nothing', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, cubicDoc('Two invented lakes', 2, chain(2, false)), 'Threads out of range');
    const before = Number((await db('runs').count({ n: '*' }))[0].n);
    for (const threads of [0, 1.5, 65]) {
      const res = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: { threads } });
      expect(res.status).toBe(400);
      expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'settings.threads' });
    }
    expect(Number((await db('runs').count({ n: '*' }))[0].n)).toBe(before);
  });
});
