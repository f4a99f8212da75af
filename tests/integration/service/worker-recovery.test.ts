/**
 * The queue under failure: a worker killed with SIGKILL mid-run (its run is reclaimed after the lease
 * and completed by another worker, nothing lost), concurrent claimers never sharing a run, and a run
 * that loses its worker too often ending failed with a diagnostic.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db, waitForMail, workspaceWithRoles } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { claimRun, completeRun } from '../../../src/lib/server/runs/queue.ts';
import { computeTrace } from '../../../src/lib/server/runs/compute.ts';
import { ENGINE_VERSION } from '../../../src/lib/atlas/engine-version.ts';
import { createModel, runRow, spawnWorker, twoLakes, until } from './fixtures.ts';
import { diagramOfResultRow } from '../../../src/lib/server/results/stored-diagram.ts';

closeDbAfterAll(afterAll);

describe('worker killed mid-run', () => {
  it('kill -9 of the claiming worker: after the lease another worker completes the run', async () => {
    const w = await workspaceWithRoles('Service recovery');
    const queue = `kill-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0611 }), 'Kill lakes');
    // Slow on purpose (test-only setting) so the kill lands while the run is in flight.
    const doomed = spawnWorker(queue, { BRINKMAP_WORKER_TEST_DELAY_MS: '30000', BRINKMAP_WORKER_LEASE_MS: '1500', BRINKMAP_WORKER_HEARTBEAT_MS: '300' });
    const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: false, queue });
    const claimed = await until('claimed by the doomed worker', async () => {
      const r = await runRow(run.id);
      return r.status === 'running' && r.progress > 0 && String(r.lease_owner).includes(`:${doomed.child.pid}:`) && r;
    });
    expect(claimed.attempts).toBe(1);
    doomed.child.kill('SIGKILL');
    await new Promise((r) => doomed.child.once('exit', r));

    const rescuer = spawnWorker(queue, { BRINKMAP_WORKER_LEASE_MS: '1500' });
    try {
      const done = await until('done by the rescuer', async () => {
        const r = await runRow(run.id);
        return r.status === 'done' && r;
      }, 60_000);
      expect(done.attempts).toBe(2);
      expect(done.lease_owner).toBeNull();
      expect(rescuer.output()).toMatch(new RegExp(`run ${run.id}: claimed \\(attempt 2\\)`));
      const result = await db('results').where({ id: done.result_id }).first();
      expect(result.cache_key).toBe(done.cache_key);
      const diagram = diagramOfResultRow(result);
      expect(diagram.branches.length).toBe(result.branch_count);
      expect(diagram.branches.length).toBeGreaterThan(0);
    } finally {
      expect(await rescuer.stop()).toBe(0);
    }
  }, 90_000);
});

describe('a run that keeps failing', () => {
  it('is retried up to max_attempts, then ends failed with its diagnostic and a mail to its starter', async () => {
    const w = await workspaceWithRoles('Service failing');
    const queue = `fail-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0666 }), 'Failing lakes');
    const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: true, queue, maxAttempts: 2 });
    // Test-only damage behind the API's back: the stored text no longer parses, so every attempt throws.
    await db('model_versions').where({ id: run.versionId }).update({ document: '{"format": "brinkmap/network-1",' });
    const worker = spawnWorker(queue);
    try {
      const failed = await until('failed', async () => {
        const r = await runRow(run.id);
        return r.status === 'failed' && r;
      }, 30_000);
      expect(failed.attempts).toBe(2);
      const error = typeof failed.error === 'string' ? JSON.parse(failed.error) : failed.error;
      expect(error.code).toBe('compute-error');
      expect(error.message).toMatch(/SyntaxError/);
      expect(worker.output()).toMatch(new RegExp(`run ${run.id}: attempt failed .*queued for retry`));
      const mail = await waitForMail(w.modeler.user!.email);
      expect(mail.subject).toMatch(new RegExp(`run ${run.id} .* failed`));
      expect(mail.text).toMatch(/SyntaxError/);
    } finally {
      expect(await worker.stop()).toBe(0);
    }
  }, 60_000);
});

describe('worker shutdown', () => {
  it('SIGTERM mid-run: the worker hands the run back to the queue uncounted and exits 0 within seconds', async () => {
    const w = await workspaceWithRoles('Service shutdown');
    const queue = `term-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0655 }), 'Shutdown lakes');
    const worker = spawnWorker(queue, { BRINKMAP_WORKER_TEST_DELAY_MS: '60000' });
    const run = await startRun(w.workspaceId, null, { modelId, settings: {}, notify: false, queue });
    await until('running', async () => (await runRow(run.id)).status === 'running');
    const t = Date.now();
    expect(await worker.stop()).toBe(0);
    expect(Date.now() - t).toBeLessThan(8000);
    const row = await runRow(run.id);
    expect(row).toMatchObject({ status: 'queued', attempts: 0, lease_owner: null });
    expect(worker.output()).toMatch(/handed back to the queue/);
    await db('runs').where({ id: run.id }).update({ status: 'cancelled' });
  }, 30_000);
});

describe('claiming', () => {
  it('claimRun: 16 concurrent claimers over 8 queued runs get 8 distinct runs and 8 nulls', async () => {
    const w = await workspaceWithRoles('Service claims');
    const queue = `claims-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0622 }), 'Claim lakes');
    const runs: { id: number }[] = [];
    for (let i = 0; i < 8; i++) runs.push(await startRun(w.workspaceId, null, { modelId, settings: { to: 0.2 + i / 100 }, notify: false, queue }));
    const claims = await Promise.all(Array.from({ length: 16 }, (_, i) => claimRun(`test-claimer-${i}`, queue, 60_000)));
    const ids = claims.filter((c) => c !== null).map((c) => c!.id);
    expect(ids.length).toBe(8);
    expect(new Set(ids).size).toBe(8);
    expect([...ids].sort((a, b) => a - b)).toEqual(runs.map((r) => r.id));
    const rows = await db('runs').whereIn('id', ids);
    for (const r of rows) expect(r.attempts).toBe(1);
    await db('runs').whereIn('id', ids).update({ status: 'cancelled' });
  });

  it('completeRun: concurrent stores of distinct and of identical keys neither deadlock nor duplicate results', async () => {
    const w = await workspaceWithRoles('Service concurrent stores');
    const queue = `stores-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0677 }), 'Store lakes');
    const distinct = [];
    for (let i = 0; i < 6; i++) distinct.push(await startRun(w.workspaceId, null, { modelId, settings: { to: 0.2 + i / 100 }, notify: false, queue }));
    const same = [];
    for (let i = 0; i < 4; i++) same.push(await startRun(w.workspaceId, null, { modelId, settings: { to: 0.15 }, notify: false, queue }));
    const claimed = await Promise.all(Array.from({ length: 10 }, (_, i) => claimRun(`store-${i}`, queue, 60_000)));
    expect(claimed.every((c) => c !== null)).toBe(true);
    // One real computation stands in for all (this test is about locking, not numbers).
    const out = computeTrace(claimed[0]!.documentText, { to: 0.15 }, { onProgress: () => undefined, isCancelled: () => false });
    const ok = await Promise.all(claimed.map((c, i) => completeRun(c!, `store-${i}`, out, ENGINE_VERSION)));
    expect(ok).toEqual(Array(10).fill(true));
    const rows = await db('runs').whereIn('id', [...distinct, ...same].map((r) => r.id));
    const byId = new Map(rows.map((r) => [r.id, r]));
    expect(new Set(distinct.map((r) => byId.get(r.id).result_id)).size).toBe(6);
    const shared = new Set(same.map((r) => byId.get(r.id).result_id));
    expect(shared.size).toBe(1);
    expect(same.filter((r) => !byId.get(r.id).reused).length).toBe(1);
  });

  it('two worker processes on one queue finish every run exactly once', async () => {
    const w = await workspaceWithRoles('Service two workers');
    const queue = `pair-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0633 }), 'Pair lakes');
    const runs: { id: number }[] = [];
    for (let i = 0; i < 4; i++) runs.push(await startRun(w.workspaceId, null, { modelId, settings: { to: 0.25 + i / 100 }, notify: false, queue }));
    const a = spawnWorker(queue, { BRINKMAP_WORKER_TEST_DELAY_MS: '300' });
    const b = spawnWorker(queue, { BRINKMAP_WORKER_TEST_DELAY_MS: '300' });
    try {
      await until('all four done', async () => {
        const rows = await db('runs').whereIn('id', runs.map((r) => r.id));
        return rows.every((r) => r.status === 'done') && rows;
      }, 60_000);
      const rows = await db('runs').whereIn('id', runs.map((r) => r.id));
      const logs = a.output() + b.output();
      for (const r of rows) expect(r.attempts, logs).toBe(1);
      for (const r of runs) expect(logs.match(new RegExp(`run ${r.id}: claimed`, 'g'))?.length).toBe(1);
    } finally {
      expect(await a.stop()).toBe(0);
      expect(await b.stop()).toBe(0);
    }
  }, 90_000);

  it('a run whose lease expired with no attempts left ends failed with a diagnostic', async () => {
    const w = await workspaceWithRoles('Service lost');
    const queue = `lost-${Date.now()}`;
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0644 }), 'Lost lakes');
    const run = await startRun(w.workspaceId, null, { modelId, settings: {}, notify: false, queue, maxAttempts: 2 });
    // As if two workers had claimed it in turn and both died: running, lease in the past, attempts used up.
    await db('runs').where({ id: run.id }).update({ status: 'running', attempts: 2, lease_owner: 'gone-host:1:dead', lease_expires_at: db.raw('NOW(3) - INTERVAL 1 SECOND') });
    expect(await claimRun('test-claimer', queue, 60_000)).toBeNull();
    const row = await runRow(run.id);
    expect(row.status).toBe('failed');
    const error = typeof row.error === 'string' ? JSON.parse(row.error) : row.error;
    expect(error.code).toBe('worker-lost');
    expect(error.message).toMatch(/gone-host:1:dead.*gave up after 2 attempts/);
  });
});
