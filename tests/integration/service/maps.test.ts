/**
 * Two-parameter maps as runs (docs/maps.md, "Maps in the workspace"), through the API and real
 * worker processes: request -> claimed -> computed in a thread -> stored (deflated JSON) -> JSON and
 * CSV, the mail notice, reuse of identical inputs; bad settings refused naming the field with no
 * rows written; cancel while computing stores nothing; roles and another workspace.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, db, rowCounts, waitForMail, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { MAP_RESULT_ENGINE } from '../../../src/lib/server/maps/settings.ts';
import { MAP_ENGINE_VERSION } from '../../../src/lib/maps/map-version.ts';
import { cubicNetwork, symmetricPairValues } from '../../lib/regimes/fixtures.ts';
import { createModel, runRow, spawnWorker, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let other: WorkspaceFixture;
let worker: SpawnedWorker;
let slow: SpawnedWorker;
beforeAll(async () => {
  [w, other] = await Promise.all([workspaceWithRoles('Map runs'), workspaceWithRoles('Map outsiders')]);
  worker = spawnWorker('default');
  slow = spawnWorker('maps-slow', { BRINKMAP_WORKER_TEST_DELAY_MS: '20000', BRINKMAP_WORKER_HEARTBEAT_MS: '100' });
}, 60_000);
afterAll(async () => {
  expect(await worker.stop(), worker.output()).toBe(0);
  expect(await slow.stop(), slow.output()).toBe(0);
});

/** Symmetric cubic pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i), invented (tests/lib/regimes/fixtures.ts). */
const pair = (r = 0.1) => cubicNetwork({ r, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }] });
const settings = { second: 'r', secondFrom: 0.05, secondTo: 0.25, seeds: 3, regionColumns: 7, regionRows: 3 };

async function done(runId: number) {
  return until('map run done', async () => {
    const r = await runRow(runId);
    if (r.status === 'failed') throw new Error(`run failed: ${r.error}`);
    return r.status === 'done' && r;
  }, 120_000, 200);
}

describe('a map run through the API', () => {
  it('is queued, computed by the worker, stored compactly, served as JSON and CSV, mailed, reused, and hidden from others', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, pair(), 'Map pair');
    const start = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'map', notify: true, settings: { ...settings, maxCurves: 64 } });
    expect(start.status, start.text).toBe(201);
    const runId = start.body.run.id;
    expect(start.body.run.kind).toBe('map');
    // Defaults typed in are dropped from the stored (and hashed) settings.
    expect(start.body.run.settings).toEqual(settings);

    const row = await done(runId);
    expect(row.map_result_id).not.toBeNull();
    expect(row.result_id).toBeNull();
    const stored = await db('map_results').where({ id: row.map_result_id }).first();
    expect(stored.cache_key).toBe(row.cache_key);
    expect(stored.second_parameter).toBe('r');
    // Keyed and stored by both versions: the one-parameter engine seeds the curves, the maps layer continues them.
    expect(stored.engine_version).toBe(MAP_RESULT_ENGINE);
    expect(MAP_RESULT_ENGINE).toContain(`+maps-${MAP_ENGINE_VERSION}`);
    expect(Number(stored.second_value)).toBe(0.1);
    // Deflated: the blob is smaller than the JSON it holds.
    expect(new Uint8Array(stored.map_blob).byteLength).toBeLessThan(stored.json_bytes);

    const res = await w.reviewer.get(ws(`/api/runs/${runId}/map`, w.workspaceId));
    expect(res.status, res.text).toBe(200);
    const map = res.body;
    expect(map.parameters).toEqual(['beta', 'r']);
    expect(map.ranges).toEqual({ first: [0, 1], second: [0.05, 0.25] });
    expect(map.secondValue).toBe(0.1);
    expect(map.provenance).toMatchObject({ runId, model: 'Map pair', version: 1 });
    expect(map.curves.map((c: any) => c.type).sort()).toEqual(['pitchfork', 'saddle-node', 'saddle-node']);
    // Closed forms derived in tests/lib/regimes/fixtures.ts (symmetricPairValues): saddle-node curve
    // beta = 1/3 - (r/2)^(2/3), pitchfork curve beta = (1 - 3 m(r)^2)/2; the engine's own test holds them to 1e-8.
    for (const c of map.curves) {
      for (const q of c.points) {
        const v = symmetricPairValues(q.p[1]);
        expect(Math.abs(q.p[0] - (c.type === 'saddle-node' ? v.betaSaddleNode : v.betaPitchfork))).toBeLessThan(1e-8);
      }
    }
    expect(map.regions.map((g: any) => g.regime).filter(Boolean).sort()).toEqual(['intermediate', 'strong', 'weak']);
    expect(stored.curve_count).toBe(map.curves.length);
    expect(stored.curve_point_count).toBe(map.curves.reduce((n: number, c: any) => n + c.points.length, 0));

    const csv = await w.reviewer.get(ws(`/api/runs/${runId}/map.csv`, w.workspaceId));
    expect(csv.status).toBe(200);
    const lines = csv.text.trim().split('\n').filter((l) => !l.startsWith('#'));
    expect(lines[0]).toBe('curve,type,point,beta,r,frequency,x_x1,x_x2');
    expect(lines.length - 1).toBe(stored.curve_point_count);
    const first = lines[1].split(',');
    const c0 = map.curves[0];
    expect(first.slice(0, 3)).toEqual([c0.id, c0.type, '0']);
    expect(Number(first[3])).toBe(c0.points[0].p[0]);
    expect(Number(first[6])).toBe(c0.points[0].x[0]);
    expect(csv.text).toContain('indicative');

    const mail = await waitForMail(w.modeler.user!.email);
    expect(mail.subject).toContain('two-parameter map run');
    expect(mail.text).toContain(`/runs/${runId}`);

    // Identical inputs: done at once, pointing at the same stored map.
    const before = await rowCounts(['map_results']);
    const again = await w.owner.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'map', settings: { ...settings, maxPointsPerCurve: 4000 } });
    expect(again.status).toBe(201);
    expect(again.body.run).toMatchObject({ status: 'done', reused: true, mapResultId: row.map_result_id });
    expect(await rowCounts(['map_results'])).toEqual(before);
    // ... but a trace run of the same version is another computation (the kind is in the cache key).
    const trace = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, settings: {} });
    expect((await runRow(trace.body.run.id)).cache_key).not.toBe(row.cache_key);
    expect((await w.reviewer.get(ws(`/api/runs/${trace.body.run.id}/map`, w.workspaceId))).status).toBe(409);

    // Another workspace's owner: 404, as for a missing run; signed out: 401.
    expect((await other.owner.get(ws(`/api/runs/${runId}/map`, w.workspaceId))).status).toBe(404);
    expect((await other.owner.get(ws(`/api/runs/${runId}/map`, other.workspaceId))).status).toBe(404);
    expect((await other.owner.get(ws(`/api/runs/${runId}/map.csv`, other.workspaceId))).status).toBe(404);
    expect((await new Client().get(ws(`/api/runs/${runId}/map`, w.workspaceId))).status).toBe(401);
  }, 180_000);
});

describe('map settings refused before anything is stored', () => {
  const cases: [string, Record<string, unknown>, string, RegExp][] = [
    ['an unknown second parameter', { ...settings, second: 'nope' }, 'settings.second', /unknown parameter 'nope'/],
    ['the swept parameter as second', { ...settings, second: 'beta' }, 'settings.second', /already the swept parameter/],
    ['an empty range', { ...settings, secondTo: 0.05 }, 'settings.secondTo', /must differ/],
    ['a missing range end', { second: 'r', secondFrom: 0.1 }, 'settings.secondTo', /required/i],
    ['too many seeds', { ...settings, seeds: 1000 }, 'settings.seeds', /at most 25/],
    ['regions half switched off', { ...settings, regionRows: 0 }, 'settings.regionColumns', /together/],
    ['an unknown key', { ...settings, colour: 'red' }, 'settings.colour', /unknown field/],
    ['a swept range with one end', { ...settings, from: 0.2 }, 'settings.to', /together/],
  ];
  it.each(cases)('%s: 400 naming %s', async (_what, s, field, message) => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, pair(0.1 + Math.random() * 1e-6), `Bad map ${Math.random()}`);
    const before = await rowCounts(['runs', 'map_results']);
    const res = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'map', settings: s });
    expect(res.status, res.text).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_input', field });
    expect(res.body.error.message).toMatch(message);
    expect(await rowCounts(['runs', 'map_results'])).toEqual(before);
  }, 30_000);

  it('a reviewer cannot start a map (403) and nothing is stored', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, pair(0.1 + 2e-6), 'Reviewer map');
    const before = await rowCounts(['runs']);
    const res = await w.reviewer.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'map', settings });
    expect(res.status).toBe(403);
    expect(await rowCounts(['runs'])).toEqual(before);
  });
});

describe('cancelling a map run', () => {
  it('stops the computation and stores no map', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, pair(0.1 + 3e-6), 'Cancelled map');
    const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, kind: 'map', notify: false, queue: 'maps-slow', settings: { ...settings, seeds: 5, regionColumns: 9, regionRows: 5, maxPointsPerCurve: 4000, maxCurves: 64 } });
    await until('map run claimed', async () => (await runRow(run.id)).status === 'running', 30_000);
    const cancel = await w.modeler.post(ws(`/api/runs/${run.id}/cancel`, w.workspaceId), {});
    expect(cancel.status, cancel.text).toBe(200);
    await until('worker stopped the thread', async () => slow.output().includes(`run ${run.id}: stopped`), 30_000);
    const row = await runRow(run.id);
    expect(row.status).toBe('cancelled');
    expect(row.map_result_id).toBeNull();
    expect(await db('map_results').where({ cache_key: row.cache_key }).first()).toBeUndefined();
  }, 60_000);
});
