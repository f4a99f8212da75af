/**
 * Runs through the API with a real worker process: the full life cycle (queue, progress over
 * server-sent events, result as JSON, thinned JSON and CSV), result reuse, the e-mail notice, and
 * cancellation of queued and running runs.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BASE_URL, closeDbAfterAll, db, waitForMail, workspaceWithRoles, type Client, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { createModel, runRow, spawnWorker, twoLakes, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let worker: SpawnedWorker;
beforeAll(async () => {
  w = await workspaceWithRoles('Service runs');
  // The test server's own worker (scripts/test.sh) also serves the default queue; one more makes
  // sure one exists whatever the set-up, and shows that two share a queue without trouble.
  worker = spawnWorker('default');
}, 60_000);
afterAll(async () => {
  const code = await worker.stop();
  expect(code, worker.output()).toBe(0);
});

/** Reads a server-sent event stream until its `end` event. */
async function readEvents(client: Client, path: string): Promise<{ event: string; data: any }[]> {
  const res = await fetch(BASE_URL + path, {
    headers: { cookie: [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; '), 'x-forwarded-for': client.address, accept: 'text/event-stream' },
  });
  expect(res.status).toBe(200);
  expect(res.headers.get('content-type')).toMatch(/text\/event-stream/);
  const events: { event: string; data: any }[] = [];
  const decoder = new TextDecoder();
  let buffer = '';
  for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
    buffer += decoder.decode(chunk, { stream: true });
    let at: number;
    while ((at = buffer.indexOf('\n\n')) >= 0) {
      const block = buffer.slice(0, at);
      buffer = buffer.slice(at + 2);
      const event = /^event: (.*)$/m.exec(block)?.[1];
      const data = /^data: (.*)$/m.exec(block)?.[1];
      if (event && data) events.push({ event, data: JSON.parse(data) });
    }
    if (events.some((e) => e.event === 'end')) break;
  }
  return events;
}

describe('run life cycle through the API', () => {
  it('POST /api/runs queues a run that a worker computes; events, result, thinned result and CSV agree', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0511 }), 'Life cycle lakes');
    const start = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: {}, notify: true });
    expect(start.status).toBe(201);
    const runId = start.body.run.id;
    expect(['queued', 'running']).toContain(start.body.run.status);

    const events = await readEvents(w.reviewer, ws(`/api/runs/${runId}/events`, w.workspaceId));
    const last = events[events.length - 1];
    expect(last.event).toBe('end');
    expect(last.data.status).toBe('done');
    const fractions = events.filter((e) => e.event === 'progress' && e.data.status === 'running').map((e) => e.data.progress);
    for (let i = 1; i < fractions.length; i++) expect(fractions[i]).toBeGreaterThanOrEqual(fractions[i - 1]);

    const poll = await w.reviewer.get(ws(`/api/runs/${runId}/progress`, w.workspaceId));
    expect(poll.body.progress).toMatchObject({ status: 'done', progress: 1 });

    const result = await w.reviewer.get(ws(`/api/runs/${runId}/result`, w.workspaceId));
    expect(result.status).toBe(200);
    const diagram = result.body.result.diagram;
    expect(diagram.parameter).toBe('beta');
    expect(diagram.variables).toEqual(['upper', 'lower']);
    expect(diagram.branches.length).toBeGreaterThan(0);
    expect(result.body.result.regimes).toHaveProperty('regimes');
    const total = diagram.branches.reduce((n: number, b: { points: unknown[] }) => n + b.points.length, 0);
    expect(result.body.result.pointCount).toBe(total);

    const csv = await w.reviewer.get(ws(`/api/runs/${runId}/result.csv`, w.workspaceId));
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/);
    // A provenance block of '#' lines (the run, its model version), then header and rows (data-export.ts).
    const all = csv.text.trim().split('\n');
    expect(all).toContain(`# run: ${runId}`);
    const lines = all.filter((l: string) => !l.startsWith('#'));
    expect(lines[0]).toBe('branch,point,beta,upper,lower,unstable,stability');
    expect(lines.length - 1).toBe(total);
    const first = diagram.branches[0].points[0];
    expect(lines[1]).toBe([diagram.branches[0].id, 0, first.p, ...first.x, first.unstable, first.unstable === 0 ? 'stable' : 'unstable'].join(','));

    if (total > 200) {
      const thin = await w.reviewer.get(ws(`/api/runs/${runId}/result?points=200`, w.workspaceId));
      const kept = thin.body.result.diagram.branches.reduce((n: number, b: { points: unknown[] }) => n + b.points.length, 0);
      expect(kept).toBeLessThan(total);
      expect(thin.body.result.diagram.thinned).toEqual({ from: total, to: kept });
      expect(thin.body.result.diagram.bifurcations).toEqual(diagram.bifurcations);
    }

    const preview = await w.reviewer.get(ws(`/api/runs/${runId}/result?view=preview`, w.workspaceId));
    expect(preview.status).toBe(200);
    expect(preview.body.result.viewPoints).toBeLessThanOrEqual(total);
    expect(preview.body.result.viewPoints).toBe(preview.body.result.diagram.branches.reduce((n: number, b: { points: unknown[] }) => n + b.points.length, 0));
    expect(preview.body.result.diagram.bifurcations).toEqual(diagram.bifurcations);

    const download = await w.reviewer.get(ws(`/api/runs/${runId}/result.json`, w.workspaceId));
    expect(download.body.provenance).toMatchObject({ runId, version: 1, versionHash: start.body.run.versionHash });

    const mail = await waitForMail(w.modeler.user!.email);
    expect(mail.subject).toMatch(new RegExp(`run ${runId} .* finished`));
  });

  it('a second run of identical inputs reuses the stored result at once (no new result row)', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0522 }), 'Reuse lakes');
    const first = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: { maxPointsPerBranch: 5000 } });
    const done = await until('first run done', async () => (await runRow(first.body.run.id)).status === 'done' && runRow(first.body.run.id));
    const resultsBefore = Number((await db('results').count({ n: '*' }))[0].n);

    // Another model with the same document (saved with its keys in another order) shares the hash.
    const doc = twoLakes({ a2: 0.0522 });
    const { modelId: twin } = await createModel(w.modeler, w.workspaceId, Object.fromEntries(Object.entries(doc).reverse()), 'Reuse lakes twin');
    const second = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId: twin, settings: { maxPointsPerBranch: 5000 } });
    expect(second.status).toBe(201);
    expect(second.body.run).toMatchObject({ status: 'done', reused: true, resultId: done.result_id, progress: 1 });
    expect(Number((await db('results').count({ n: '*' }))[0].n)).toBe(resultsBefore);

    // The document's own sweep range and the engine's default point cap, typed in, are the same inputs.
    const restated = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId: twin, settings: { from: 0, to: 0.3, maxPointsPerBranch: 5000, maxStep: 2e-2 } });
    expect(restated.body.run).toMatchObject({ status: 'done', reused: true, resultId: done.result_id });

    const other = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: { maxPointsPerBranch: 4000 } });
    expect(other.body.run.status).toBe('queued');
    expect(other.body.run.reused).toBe(false);
  });
});

describe('cancellation', () => {
  it('POST /api/runs/[id]/cancel cancels a queued run; a second cancel is a 409', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0533 }), 'Cancel queued');
    // Queued on a queue no worker serves, so it stays queued until cancelled.
    const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: false, queue: `nobody-${Date.now()}` });
    const res = await w.modeler.post(ws(`/api/runs/${run.id}/cancel`, w.workspaceId));
    expect(res.status).toBe(200);
    expect(res.body.run.status).toBe('cancelled');
    const again = await w.modeler.post(ws(`/api/runs/${run.id}/cancel`, w.workspaceId));
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already cancelled/);
  });

  it('cancelling a running run stops its worker thread and stores no result', async () => {
    const queue = `cancel-${Date.now()}`;
    const slow = spawnWorker(queue, { BRINKMAP_WORKER_TEST_DELAY_MS: '60000', BRINKMAP_WORKER_HEARTBEAT_MS: '200' });
    try {
      const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0544 }), 'Cancel running');
      const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: false, queue });
      await until('run running with progress', async () => {
        const r = await runRow(run.id);
        return r.status === 'running' && r.progress > 0;
      });
      const res = await w.modeler.post(ws(`/api/runs/${run.id}/cancel`, w.workspaceId));
      expect(res.status).toBe(200);
      await until('worker stopped the computation', async () => /nothing stored/.test(slow.output()), 15_000);
      const row = await runRow(run.id);
      expect(row.status).toBe('cancelled');
      expect(row.result_id).toBeNull();
      expect(await db('results').where({ cache_key: row.cache_key }).first()).toBeUndefined();
    } finally {
      expect(await slow.stop()).toBe(0);
    }
  });
});
