/**
 * Slices of a map run (docs/maps.md, "From the map back to one parameter"): POST /api/runs/:id/slices
 * { value } computes the one-parameter diagram at that value of the map's second parameter as a trace
 * run of the same model version with the parameter overridden (no new version), and answers the same
 * run when asked again; bad values are refused naming `value` with nothing stored; reviewers read
 * slices but do not start them; another workspace's map is a 404; the override is named on the run
 * page, the runs list, the CSV and JSON downloads and the comparison.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db, rowCounts, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { computeMap } from '../../../src/lib/server/maps/compute.ts';
import { mapResultRow } from '../../../src/lib/server/maps/repository.ts';
import { cubicNetwork, symmetricPairValues } from '../../lib/regimes/fixtures.ts';
import { createModel, runRow, spawnWorker, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let other: WorkspaceFixture;
let worker: SpawnedWorker;
let modelId: number;
let mapId: number;
/** Symmetric cubic pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i), invented (tests/lib/regimes/fixtures.ts); its document value r = 0.1. */
const pair = () => cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }] });

beforeAll(async () => {
  [w, other] = await Promise.all([workspaceWithRoles('Map slices'), workspaceWithRoles('Map slice outsiders')]);
  worker = spawnWorker('default');
  ({ modelId } = await createModel(w.modeler, w.workspaceId, pair(), 'Slice pair'));
  // A finished map without waiting for a worker: queued where nobody serves, computed here by the thread's own function.
  const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, kind: 'map', notify: false, queue: 'slices-idle',
    settings: { second: 'r', secondFrom: 0.05, secondTo: 0.25, seeds: 2, regionColumns: 0, regionRows: 0, maxPointsPerCurve: 400, maxCurves: 8 } });
  const row = await db('runs as r').join('model_versions as v', 'v.id', 'r.model_version_id').where('r.id', run.id).first('r.cache_key', 'r.settings', 'v.document');
  const out = computeMap(row.document, typeof row.settings === 'string' ? JSON.parse(row.settings) : row.settings, { onProgress: () => undefined, isCancelled: () => false });
  const [id] = await db('map_results').insert({ cache_key: row.cache_key, ...mapResultRow(out) });
  await db('runs').where({ id: run.id }).update({ status: 'done', progress: 1, map_result_id: id, finished_at: db.raw('NOW(3)') });
  mapId = run.id;
}, 120_000);
afterAll(async () => {
  expect(await worker.stop(), worker.output()).toBe(0);
});

const slices = (id = mapId, workspaceId = w.workspaceId) => ws(`/api/runs/${id}/slices`, workspaceId);

describe('POST /api/runs/:id/slices', () => {
  it('starts a trace run of the same version with the value overridden, answers it again when asked again, and computes the diagram at that value', async () => {
    const versionsBefore = await db('model_versions').where({ model_id: modelId }).count({ n: '*' });
    const first = await w.modeler.post(slices(), { value: 0.15 });
    expect(first.status, first.text).toBe(201);
    expect(first.body.cached).toBe(false);
    const run = first.body.run;
    expect(run.kind).toBe('trace');
    expect(run.sliceOf).toBe(mapId);
    expect(run.versionNumber).toBe(1);
    expect(run.settings.override).toEqual({ parameter: 'r', value: 0.15 });
    expect(first.body.slice).toMatchObject({ id: run.id, value: 0.15 });

    // The same value again (another editor, before and after it finished): the same run, nothing new.
    const again = await w.owner.post(slices(), { value: 0.15 });
    expect(again.status, again.text).toBe(200);
    expect(again.body.cached).toBe(true);
    expect(again.body.run.id).toBe(run.id);

    await until('slice done', async () => {
      const r = await runRow(run.id);
      if (r.status === 'failed') throw new Error(`slice failed: ${r.error}`);
      return r.status === 'done';
    }, 120_000, 200);
    const third = await w.modeler.post(slices(), { value: 0.15 });
    expect(third.status).toBe(200);
    expect(third.body.run.id).toBe(run.id);
    expect(third.body.run.status).toBe('done');
    // No model version was saved.
    expect(await db('model_versions').where({ model_id: modelId }).count({ n: '*' })).toEqual(versionsBefore);

    // The diagram is the one at r = 0.15, not at the document's r = 0.1: the saddle-node of the
    // symmetric pair lies at beta = 1/3 - (r/2)^(2/3) (closed form derived in tests/lib/regimes/fixtures.ts).
    const res = await w.reviewer.get(ws(`/api/runs/${run.id}/result`, w.workspaceId));
    expect(res.status, res.text).toBe(200);
    const folds = res.body.result.diagram.bifurcations.filter((s: any) => s.type === 'saddle-node').map((s: any) => s.p);
    expect(folds.length).toBeGreaterThan(0);
    for (const p of folds) expect(Math.abs(p - symmetricPairValues(0.15).betaSaddleNode)).toBeLessThan(1e-6);
    expect(Math.abs(folds[0] - symmetricPairValues(0.1).betaSaddleNode)).toBeGreaterThan(0.01);

    // Reviewers see the slice (list) but do not start one.
    const list = await w.reviewer.get(slices());
    expect(list.status, list.text).toBe(200);
    expect(list.body.slices).toEqual([expect.objectContaining({ id: run.id, value: 0.15, status: 'done' })]);
  }, 180_000);

  it('says plainly that the parameter was overridden: run page, runs list, CSV, JSON, comparison', async () => {
    const { body } = await w.modeler.post(slices(), { value: 0.15 });
    const id = body.run.id as number;
    await until('slice done', async () => (await runRow(id)).status === 'done', 120_000, 200);
    const note = `r = 0.15 overridden (slice of map run ${mapId})`;
    const page = await w.reviewer.get(ws(`/runs/${id}`, w.workspaceId));
    expect(page.status).toBe(200);
    expect(page.text).toContain('data-testid="run-override"');
    expect(page.text).toContain(`map run ${mapId}`);
    expect(page.text.replace(/&amp;/g, '&')).toContain(note);
    const list = await w.reviewer.get(ws('/runs', w.workspaceId));
    expect(list.text).toContain(`with ${note}`);
    const csv = await w.reviewer.get(ws(`/api/runs/${id}/result.csv`, w.workspaceId));
    expect(csv.text).toContain(`# parameter overridden for this run (not the version's value): ${note}`);
    const json = await w.reviewer.get(ws(`/api/runs/${id}/result.json`, w.workspaceId));
    expect(JSON.parse(json.text).provenance).toMatchObject({ override: note, sliceOf: mapId, settings: { override: { parameter: 'r', value: 0.15 } } });
    // Compared with the model's own diagram.
    const own = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'trace' });
    await until('own run done', async () => (await runRow(own.body.run.id)).status === 'done', 120_000, 200);
    const cmp = await w.reviewer.get(ws(`/api/compare?runs=${own.body.run.id},${id}`, w.workspaceId));
    expect(cmp.status, cmp.text).toBe(200);
    const [a, b] = cmp.body.items;
    expect(a.label).not.toContain('overridden');
    expect(b.label).toContain(note);
    expect(b.provenance.override).toBe(note);
  }, 180_000);

  it('refuses bad values naming the field, stores nothing, and keeps roles and workspaces apart', async () => {
    const before = await rowCounts(['runs', 'results', 'model_versions']);
    for (const [body, field] of [
      [{ value: 0.5 }, 'value'], [{ value: 0.01 }, 'value'], [{ value: 'x' }, 'value'], [{}, 'value'], [{ value: null }, 'value'], [{ value: 0.1, extra: 1 }, 'extra'],
    ] as const) {
      const res = await w.modeler.post(slices(), body);
      expect(res.status, `${JSON.stringify(body)}: ${res.text}`).toBe(400);
      expect(res.body.error.code).toBe('invalid_input');
      expect(res.body.error.field).toBe(field);
    }
    expect((await w.modeler.post(slices(), { value: 0.5 })).body.error.message).toMatch(/range of r, 0\.05 to 0\.25/);
    // Reviewers may not start a slice (403), even at a new value.
    expect((await w.reviewer.post(slices(), { value: 0.2 })).status).toBe(403);
    // Another workspace's map: 404 for reading and for starting, in their own workspace or in ours.
    expect((await other.owner.get(slices(mapId, other.workspaceId))).status).toBe(404);
    expect((await other.owner.post(slices(mapId, other.workspaceId), { value: 0.2 })).status).toBe(404);
    expect((await other.owner.post(slices(mapId, w.workspaceId), { value: 0.2 })).status).toBe(404);
    expect(await rowCounts(['runs', 'results', 'model_versions'])).toEqual(before);
    // A run that is not a map: 409.
    const trace = await db('runs').where({ workspace_id: w.workspaceId, kind: 'trace' }).first('id');
    if (trace) expect((await w.modeler.post(slices(trace.id), { value: 0.2 })).status).toBe(409);
  }, 60_000);

  it('POST /api/runs checks a trace run\'s override against the document (400 naming settings.override.*)', async () => {
    const before = await rowCounts(['runs']);
    const cases = [
      [{ parameter: 'beta', value: 0.2 }, 'settings.override.parameter'],
      [{ parameter: 'nope', value: 0.2 }, 'settings.override.parameter'],
      [{ parameter: 'r', value: Number.NaN }, 'settings.override.value'],
      [{ parameter: 'r' }, 'settings.override.value'],
      [{ parameter: 'r', value: 0.2, also: 1 }, 'settings.override.also'],
    ] as const;
    for (const [override, field] of cases) {
      const res = await w.modeler.post(ws('/api/runs', w.workspaceId), { modelId, kind: 'trace', settings: { override } });
      expect(res.status, `${JSON.stringify(override)}: ${res.text}`).toBe(400);
      expect(res.body.error.field).toBe(field);
    }
    expect(await rowCounts(['runs'])).toEqual(before);
  });
});
