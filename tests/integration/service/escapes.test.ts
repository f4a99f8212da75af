/**
 * Escape studies as runs (docs/noise.md, "Escape studies as runs"), through the API and real
 * worker processes: request -> claimed -> atlas -> values stored one by one -> study -> JSON and
 * CSV, the mail notice; refusals before anything is stored (over budget, bad settings); a worker
 * killed mid-study (the stored values are kept and the retry resumes after them); another
 * workspace and signed-out callers.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BASE_URL, Client, closeDbAfterAll, db, waitForMail, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { createModel, runRow, spawnWorker, twoLakes, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let other: WorkspaceFixture;
let worker: SpawnedWorker;
beforeAll(async () => {
  [w, other] = await Promise.all([workspaceWithRoles('Escape studies'), workspaceWithRoles('Escape outsiders')]);
  worker = spawnWorker('default');
}, 60_000);
afterAll(async () => {
  const code = await worker.stop();
  expect(code, worker.output()).toBe(0);
});

const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);

describe('an escape study through the API', () => {
  it('is queued, computed by the worker (atlas first, values stored), served as JSON and CSV, mailed, and hidden from others', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0501 }), 'Escape lakes');
    const start = await w.modeler.post(ws('/api/runs', w.workspaceId), {
      modelId, kind: 'escapes', notify: true,
      // Two threads: the paths run on the escape pool inside the worker's compute thread.
      settings: { noise: 0.45, values: [0.05, 0.15], paths: 300, seed: 7, threads: 2 },
    });
    expect(start.status, start.text).toBe(201);
    const runId = start.body.run.id;
    expect(start.body.run.kind).toBe('escapes');
    expect(start.body.run.settings).toMatchObject({ noise: 0.45, values: [0.05, 0.15], paths: 300, seed: 7, start: 'all-base', threads: 2 });

    const done = await until('escape run done', async () => {
      const r = await runRow(runId);
      if (r.status === 'failed') throw new Error(`run failed: ${JSON.stringify(r.error)}`);
      return r.status === 'done' && r;
    }, 120_000, 250);
    expect(done.escape_study_id).not.toBeNull();
    expect(done.result_id).toBeNull();
    // Paths done per parameter value, as the progress channel reported them last.
    const detail = parse(done.progress_detail);
    expect(detail.values.map((v: any) => [v.p, v.pathsDone, v.status])).toEqual([[0.05, 300, 'done'], [0.15, 300, 'done']]);
    const progress = await w.reviewer.get(ws(`/api/runs/${runId}/progress`, w.workspaceId));
    expect(progress.body.progress.detail.values).toHaveLength(2);
    // The event stream carries the same fields: its `end` event has the paths done per value.
    const events = await fetch(`${BASE_URL}${ws(`/api/runs/${runId}/events`, w.workspaceId)}`, {
      headers: { cookie: [...w.reviewer.cookies].map(([k, v]) => `${k}=${v}`).join('; '), 'x-forwarded-for': w.reviewer.address, accept: 'text/event-stream' },
    });
    expect(events.status).toBe(200);
    const end = /event: end\ndata: (.*)\n/.exec(await events.text());
    expect(JSON.parse(end![1])).toMatchObject({ status: 'done', kind: 'escapes', detail: { values: [{ p: 0.05, pathsDone: 300 }, { p: 0.15, pathsDone: 300 }] } });

    // The atlas was computed first and stored as the trace result of the same version: a trace run now reuses it.
    const study = await db('escape_studies').where({ id: done.escape_study_id }).first();
    expect(study.atlas_result_id).not.toBeNull();
    const listed = await w.reviewer.get(ws(`/api/runs?modelId=${modelId}&kind=escapes`, w.workspaceId));
    expect(listed.body.items.map((r: any) => r.id)).toEqual([runId]);
    const trace = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: {} });
    expect(trace.status).toBe(201);
    expect(trace.body.run).toMatchObject({ status: 'done', reused: true, resultId: study.atlas_result_id, kind: 'trace' });

    // Rows: one per parameter value under the run's cache key.
    const rows = await db('escape_points').where({ cache_key: done.cache_key }).orderBy('idx');
    expect(rows.map((r) => [r.idx, r.p, r.status])).toEqual([[0, 0.05, 'done'], [1, 0.15, 'done']]);

    const res = await w.reviewer.get(ws(`/api/runs/${runId}/escapes`, w.workspaceId));
    expect(res.status).toBe(200);
    expect(res.body.study).toMatchObject({ parameter: 'beta', noise: 0.45, start: 'all-base', valueCount: 2 });
    expect(res.body.provenance).toMatchObject({ runId, model: 'Escape lakes' });
    expect(res.body.points).toHaveLength(2);
    for (const pt of res.body.points) {
      expect(pt.status).toBe('done');
      expect(pt.paths).toBe(300);
      const complete = pt.sequences.reduce((s: number, q: any) => s + q.count, 0);
      expect(complete).toBeGreaterThan(0);
      expect(complete).toBeLessThanOrEqual(300);
      for (const q of pt.sequences) {
        expect(q.probability).toBeCloseTo(q.count / 300, 12);
        expect(q.low).toBeLessThanOrEqual(q.probability);
        expect(q.high).toBeGreaterThanOrEqual(q.probability);
        expect([...q.order].sort()).toEqual(['lower', 'upper']);
      }
      // Every path that reached its first escape is in exactly one bin of the k = 1 histogram.
      const first = pt.escapeTimes[0];
      expect(first.histogram.reduce((s: number, c: number) => s + c, 0)).toBe(first.count);
      expect(first.q05).toBeLessThanOrEqual(first.median);
      expect(first.median).toBeLessThanOrEqual(first.q95);
      expect(pt.prediction.sequences.length).toBeGreaterThan(0);
      expect(pt.barriers.length).toBeGreaterThan(0);
      expect(pt.barriers.some((b: any) => b.from === 'all-base' && b.barrier > 0)).toBe(true);
    }

    const csv = await w.reviewer.get(ws(`/api/runs/${runId}/escapes.csv`, w.workspaceId));
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/);
    const lines = csv.text.trim().split('\n');
    expect(lines[0]).toBe('# Brinkmap escape study data');
    expect(lines).toContain('record,p,item,count,value,low,high,median,q05,q95,predicted');
    const seqLines = lines.filter((l) => l.startsWith('sequence,0.05,'));
    const counted = res.body.points[0].sequences;
    expect(seqLines.filter((l) => Number(l.split(',')[3]) > 0)).toHaveLength(counted.length);
    expect(seqLines.find((l) => l.startsWith(`sequence,0.05,${counted[0].order.join('>')},${counted[0].count},`))).toBeDefined();

    // The run page shows the study as a table, one row per value, with the data links (no diagram).
    const page = await w.reviewer.get(ws(`/runs/${runId}`, w.workspaceId));
    expect(page.status).toBe(200);
    expect(page.text).toContain('data-testid="escape-table"');
    expect((page.text.match(/<tr data-p=/g) ?? []).length).toBe(2);
    expect(page.text).toContain(`/api/runs/${runId}/escapes.csv`);
    expect(page.text).not.toContain('data-testid="run-diagram"');

    const mail = await waitForMail(w.modeler.user!.email);
    expect(mail.subject).toMatch(new RegExp(`escape study run ${runId} .* finished`));

    // Another workspace's members and signed-out callers see nothing.
    expect((await other.owner.get(ws(`/api/runs/${runId}/escapes`, other.workspaceId))).status).toBe(404);
    expect((await other.owner.get(ws(`/api/runs/${runId}/escapes`, w.workspaceId))).status).toBe(404);
    expect((await other.owner.get(ws(`/api/runs/${runId}/escapes.csv`, other.workspaceId))).status).toBe(404);
    expect((await new Client().get(ws(`/api/runs/${runId}/escapes`, w.workspaceId))).status).toBe(401);
    expect((await new Client().get(ws(`/api/runs/${runId}/escapes.csv`, w.workspaceId))).status).toBe(401);
    // A trace run has no escape rows.
    expect((await w.reviewer.get(ws(`/api/runs/${trace.body.run.id}/escapes`, w.workspaceId))).status).toBe(409);
  }, 180_000);
});

describe('refused when requested', () => {
  it('over the budget: 400 with the estimate, no run stored', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0502 }), 'Budget lakes');
    const res = await w.modeler.post(ws('/api/runs', w.workspaceId), {
      modelId, kind: 'escapes', settings: { noise: 0.3, from: 0.05, to: 0.25, count: 3, paths: 1_000_000, dt: 0.001, tMax: 10_000 },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('over_budget');
    expect(res.body.error.field).toBe('settings.paths');
    // 1e6 paths + 1000 step-check paths, 1e7 steps each, 2 variables.
    expect(res.body.error.message).toContain('2.00e+13 node-steps per parameter value');
    expect(res.body.error.message).toContain('over the budget of 4.00e+9');
    expect(await db('runs').where({ model_id: modelId }).count({ n: '*' }).first()).toMatchObject({ n: 0 });
  });

  it('over the budget by the prediction (no dt / tMax given): the worker fails the run before any path, without retrying', async () => {
    const queue = `escapes-budget-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0506 }), 'Slow noise lakes');
    // At sigma 0.15 the predicted mean escape time at beta = 0.1 is so long that 1000 paths (and 2 x 500 step-check paths) need about 5e10 node-steps.
    const run = await startRun(w.workspaceId, w.modeler.user!.id, {
      modelId, kind: 'escapes', notify: false, queue, settings: { noise: 0.15, values: [0.1], paths: 1000, seed: 1, start: 'all-base', threads: 1, atlas: {} },
    });
    const wk = spawnWorker(queue);
    try {
      const failed = await until('failed', async () => {
        const r = await runRow(run.id);
        return r.status === 'failed' && r;
      }, 120_000, 250);
      expect(failed.attempts).toBe(1);
      const error = parse(failed.error);
      expect(error.code).toBe('over-budget');
      expect(error.message).toMatch(/^at p = 0\.1, the run needs about \d\.\d\de\+10 node-steps .* over the budget of 4\.00e\+9; .*a smaller tMax/);
      expect(await db('escape_points').where({ cache_key: failed.cache_key }).count({ n: '*' }).first()).toMatchObject({ n: 0 });
    } finally {
      expect(await wk.stop()).toBe(0);
    }
  }, 150_000);

  it('bad settings: 400 naming the field, nothing stored; reviewers cannot start one', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0503 }), 'Bad settings lakes');
    const cases: [unknown, string][] = [
      [{ noise: 0.3, values: [0.1, 0.9] }, 'settings.values'],
      [{ noise: 0.3, values: [0.1], from: 0, to: 0.2, count: 3 }, 'settings.values'],
      [{ noise: 0.3, from: 0, count: 3 }, 'settings.to'],
      [{ values: [0.1] }, 'settings.noise'],
      [{ noise: -1, values: [0.1] }, 'settings.noise'],
      [{ noise: 0.3, values: [0.1], paths: 0 }, 'settings.paths'],
      [{ noise: 0.3, values: [0.1], start: 'halfway' }, 'settings.start'],
      [{ noise: 0.3, values: [0.1], threads: 0 }, 'settings.threads'],
      [{ noise: 0.3, values: [0.1], colour: 'red' }, 'settings.colour'],
    ];
    for (const [settings, field] of cases) {
      const res = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'escapes', settings });
      expect(res.status, JSON.stringify(settings)).toBe(400);
      expect(res.body.error.field, JSON.stringify(settings)).toBe(field);
    }
    const kind = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'noise' });
    expect(kind.status).toBe(400);
    expect(kind.body.error.field).toBe('kind');
    const reviewer = await w.reviewer.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'escapes', settings: { noise: 0.3, values: [0.1] } });
    expect(reviewer.status).toBe(403);
    expect(await db('runs').where({ model_id: modelId }).count({ n: '*' }).first()).toMatchObject({ n: 0 });
  });
});

describe('a worker killed mid-study', () => {
  it('kill -9 after a value is stored: the retry keeps the stored values and computes only the rest', async () => {
    const queue = `escapes-kill-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0504 }), 'Killed study lakes');
    const run = await startRun(w.workspaceId, w.modeler.user!.id, {
      modelId, kind: 'escapes', notify: false, queue,
      settings: { noise: 0.35, values: [0.04, 0.1, 0.16, 0.22], paths: 4000, seed: 3, start: 'all-base', threads: 1, atlas: {} },
    });
    const cacheKey = (await runRow(run.id)).cache_key as string;
    const doomed = spawnWorker(queue, { BRINKMAP_WORKER_LEASE_MS: '3000', BRINKMAP_WORKER_HEARTBEAT_MS: '300' });
    const before = await until('a stored value while the run is still running', async () => {
      const rows = await db('escape_points').where({ cache_key: cacheKey }).orderBy('idx');
      const r = await runRow(run.id);
      return rows.length >= 1 && r.status === 'running' && rows.length < 4 && rows;
    }, 120_000, 50);
    doomed.child.kill('SIGKILL');
    await new Promise((r) => doomed.child.once('exit', r));
    const kept = await db('escape_points').where({ cache_key: cacheKey }).orderBy('idx');
    expect(kept.length).toBeGreaterThanOrEqual(before.length);
    expect(kept.length).toBeLessThan(4);

    const rescuer = spawnWorker(queue, { BRINKMAP_WORKER_LEASE_MS: '3000' });
    try {
      const done = await until('done by the rescuer', async () => {
        const r = await runRow(run.id);
        if (r.status === 'failed') throw new Error(`failed: ${JSON.stringify(r.error)}`);
        return r.status === 'done' && r;
      }, 150_000, 250);
      expect(done.attempts).toBe(2);
      expect(rescuer.output()).toMatch(new RegExp(`run ${run.id}: resuming after ${kept.length} stored parameter value`));
      // The atlas the doomed worker stored is reused, not computed again.
      expect(rescuer.output()).toMatch(new RegExp(`run ${run.id}: atlas from stored trace result`));
      const rows = await db('escape_points').where({ cache_key: done.cache_key }).orderBy('idx');
      expect(rows.map((r) => r.idx)).toEqual([0, 1, 2, 3]);
      // The values stored before the kill are the same rows (not recomputed and rewritten).
      for (const k of kept) {
        const same = rows.find((r) => r.idx === k.idx)!;
        expect(same.id).toBe(k.id);
        expect(new Date(same.created_at).getTime()).toBe(new Date(k.created_at).getTime());
      }
      const newer = rows.filter((r) => !kept.some((k) => k.idx === r.idx));
      for (const r of newer) expect(r.id).toBeGreaterThan(Math.max(...kept.map((k) => k.id)));
      expect(rescuer.output()).toMatch(new RegExp(`run ${run.id}: stored parameter value ${kept.length + 1} of 4`));
    } finally {
      expect(await rescuer.stop()).toBe(0);
    }
  }, 300_000);
});

describe('cancelling a study', () => {
  it('a running study cancelled through the API stops; the values stored so far are kept, no study row', async () => {
    const queue = `escapes-cancel-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0505 }), 'Cancelled study lakes');
    const run = await startRun(w.workspaceId, w.modeler.user!.id, {
      modelId, kind: 'escapes', notify: false, queue,
      settings: { noise: 0.35, values: [0.04, 0.1, 0.16, 0.22], paths: 4000, seed: 4, start: 'all-base', threads: 1, atlas: {} },
    });
    const cacheKey = (await runRow(run.id)).cache_key as string;
    const wk = spawnWorker(queue);
    try {
      await until('a stored value', async () => (await db('escape_points').where({ cache_key: cacheKey }).count({ n: '*' }).first())!.n as number > 0, 120_000, 50);
      // Mid-run, the progress channel reports paths done per value: the first value done, the others not yet.
      const mid = await until('paths per value on the progress channel', async () => {
        const p = await w.reviewer.get(ws(`/api/runs/${run.id}/progress`, w.workspaceId));
        const values = p.body.progress.detail?.values;
        return values?.[0]?.status === 'done' && p.body.progress;
      }, 10_000, 100);
      expect(mid.status).toBe('running');
      expect(mid.detail.values.map((v: any) => v.p)).toEqual([0.04, 0.1, 0.16, 0.22]);
      expect(mid.detail.values[0].pathsDone).toBe(4000);
      expect(mid.detail.values[3]).toMatchObject({ pathsDone: 0, status: 'waiting' });
      expect(mid.phrase).toMatch(/^p = 0\.\d+ (\(value \d of 4\)|done)/);
      const res = await w.modeler.post(ws(`/api/runs/${run.id}/cancel`, w.workspaceId), {});
      expect(res.status).toBe(200);
      expect(res.body.run.status).toBe('cancelled');
      await until('the worker stopped the study', async () => wk.output().includes(`run ${run.id}: stopped (cancelled or taken over)`), 30_000);
      const r = await runRow(run.id);
      expect(r.status).toBe('cancelled');
      expect(r.escape_study_id).toBeNull();
      const rows = await db('escape_points').where({ cache_key: cacheKey });
      expect(rows.length).toBeGreaterThan(0);
      expect(rows.length).toBeLessThan(4);
      const api = await w.reviewer.get(ws(`/api/runs/${run.id}/escapes`, w.workspaceId));
      expect(api.status).toBe(200);
      expect(api.body.study).toBeNull();
      expect(api.body.points.length).toBe(rows.length);
    } finally {
      expect(await wk.stop()).toBe(0);
    }
  }, 180_000);
});

describe('worker shutdown mid-study', () => {
  it('SIGTERM: the run goes back to the queue uncounted, the stored values stay, and the next worker resumes', async () => {
    const queue = `escapes-term-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0507 }), 'Stopped study lakes');
    const run = await startRun(w.workspaceId, w.modeler.user!.id, {
      modelId, kind: 'escapes', notify: false, queue,
      settings: { noise: 0.35, values: [0.04, 0.1, 0.16], paths: 4000, seed: 5, start: 'all-base', threads: 1, atlas: {} },
    });
    const cacheKey = (await runRow(run.id)).cache_key as string;
    const first = spawnWorker(queue);
    await until('a stored value', async () => (await db('escape_points').where({ cache_key: cacheKey }).count({ n: '*' }).first())!.n as number > 0, 120_000, 50);
    expect(await first.stop()).toBe(0);
    const back = await runRow(run.id);
    const kept = await db('escape_points').where({ cache_key: cacheKey }).orderBy('idx');
    if (kept.length < 3) {
      expect(back.status).toBe('queued');
      expect(back.attempts).toBe(0);
      expect(first.output()).toMatch(new RegExp(`run ${run.id}: handed back to the queue`));
    }
    const second = spawnWorker(queue);
    try {
      const done = await until('done', async () => {
        const r = await runRow(run.id);
        return r.status === 'done' && r;
      }, 120_000, 250);
      expect(done.attempts).toBe(1);
      const rows = await db('escape_points').where({ cache_key: cacheKey }).orderBy('idx');
      expect(rows.map((r) => r.idx)).toEqual([0, 1, 2]);
      for (const k of kept) expect(rows.find((r) => r.idx === k.idx)!.id).toBe(k.id);
    } finally {
      expect(await second.stop()).toBe(0);
    }
  }, 240_000);
});
