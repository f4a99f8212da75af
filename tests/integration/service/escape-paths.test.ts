/**
 * The path picture of an escape study (GET /api/runs/:id/escapes/paths, docs/noise.md "Views of an
 * escape study") through the API and a real worker: 200 with states, saddles, minimum-action paths
 * and sample paths; its barriers are the study's stored ones; 400 naming `p` or `paths`; 404 for
 * another workspace; 409 for a study that is not finished and for a trace run.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { createModel, runRow, spawnWorker, twoLakes, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let other: WorkspaceFixture;
let worker: SpawnedWorker;
let runId: number;
let modelId: number;
beforeAll(async () => {
  [w, other] = await Promise.all([workspaceWithRoles('Path pictures'), workspaceWithRoles('Path picture outsiders')]);
  worker = spawnWorker('default');
  // A document of its own (the data directory outlives a test run): the study is computed by this worker, not reused.
  ({ modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0502 + (Date.now() % 100_000) * 1e-10 }), 'Path picture lakes'));
  const start = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'escapes', settings: { noise: 0.45, values: [0.05, 0.15], paths: 50, seed: 3 } });
  expect(start.status, start.text).toBe(201);
  runId = start.body.run.id;
  await until('escape run done', async () => {
    const r = await runRow(runId);
    if (r.status === 'failed') throw new Error(`run failed: ${JSON.stringify(r.error)}`);
    return r.status === 'done' && r;
  }, 120_000, 250);
}, 180_000);
afterAll(async () => {
  const code = await worker.stop();
  expect(code, worker.output()).toBe(0);
});

describe('GET /api/runs/:id/escapes/paths', () => {
  it('200: states, saddles, the minimum-action paths with the study\'s stored barriers, and K sample paths from the start state', async () => {
    const res = await w.reviewer.get(ws(`/api/runs/${runId}/escapes/paths?p=0.15&paths=2`, w.workspaceId));
    expect(res.status, res.text).toBe(200);
    const pic = res.body.picture;
    expect(pic).toMatchObject({ parameter: 'beta', p: 0.15, names: ['upper', 'lower'], seed: 3, noise: 0.45 });
    expect(pic.states.length).toBeGreaterThanOrEqual(2);
    expect(pic.saddles.length).toBeGreaterThanOrEqual(1);
    expect(pic.states[pic.start].label).toBe('all-base');
    expect(res.body.provenance).toMatchObject({ runId, model: 'Path picture lakes' });
    // The barriers are those the study stored for the edges out of the start state.
    const study = await w.reviewer.get(ws(`/api/runs/${runId}/escapes`, w.workspaceId));
    const stored = study.body.points.find((q: any) => q.p === 0.15).barriers.filter((b: any) => b.from === 'all-base');
    expect(pic.minimumActionPaths.length).toBe(stored.length);
    for (const m of pic.minimumActionPaths) {
      const s = stored.find((b: any) => b.saddle === m.label);
      expect(s, m.label).toBeDefined();
      expect(m.barrier).toBeCloseTo(s.barrier, 9);
      expect(m.path[0]).toEqual(pic.states[pic.start].x);
      expect(m.path[m.path.length - 1]).toEqual(pic.saddles[m.saddle].x);
    }
    expect(pic.samples).toHaveLength(2);
    for (const s of pic.samples) {
      expect(s.points[0]).toEqual(pic.states[pic.start].x);
      expect(s.points.length).toBeLessThanOrEqual(2000);
      expect(s.points.length).toBe(s.times.length);
    }
    // Default K = 3.
    const three = await w.owner.get(ws(`/api/runs/${runId}/escapes/paths?p=0.05`, w.workspaceId));
    expect(three.status, three.text).toBe(200);
    expect(three.body.picture.samples).toHaveLength(3);
  }, 60_000);

  it('400 naming p (missing, not a number, not a value of the study) or paths (out of range)', async () => {
    for (const q of ['', 'p=', 'p=abc', 'p=0.1']) {
      const res = await w.reviewer.get(ws(`/api/runs/${runId}/escapes/paths?${q}`, w.workspaceId));
      expect(res.status, q).toBe(400);
      expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'p' });
    }
    for (const k of ['11', '-1', '1.5', 'x']) {
      const res = await w.reviewer.get(ws(`/api/runs/${runId}/escapes/paths?p=0.05&paths=${k}`, w.workspaceId));
      expect(res.status, k).toBe(400);
      expect(res.body.error.field).toBe('paths');
    }
  });

  it('404 for another workspace and a missing run (signed-out callers: the route matrix)', async () => {
    expect((await other.owner.get(ws(`/api/runs/${runId}/escapes/paths?p=0.05`, other.workspaceId))).status).toBe(404);
    expect((await w.owner.get(ws(`/api/runs/999999999/escapes/paths?p=0.05`, w.workspaceId))).status).toBe(404);
  });

  it('409 for a study that is not finished and for a trace run', async () => {
    const queued = await startRun(w.workspaceId, w.modeler.user!.id, {
      modelId, kind: 'escapes', notify: false, queue: 'paths-idle',
      settings: { values: [0.1], paths: 10, seed: 1, start: 'all-base', threads: 1, atlas: {}, noise: 0.45 },
    });
    const a = await w.reviewer.get(ws(`/api/runs/${queued.id}/escapes/paths?p=0.1`, w.workspaceId));
    expect(a.status, a.text).toBe(409);
    const trace = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: {} });
    expect(trace.status).toBe(201);
    const b = await w.reviewer.get(ws(`/api/runs/${trace.body.run.id}/escapes/paths?p=0.05`, w.workspaceId));
    expect(b.status, b.text).toBe(409);
  });
});
