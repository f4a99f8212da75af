/**
 * Models and versions through the API against the real MariaDB: immutability of versions, hash
 * de-duplication, history, diff, archive, list search/sort/paging, JSON import/export byte for byte.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { createModel, twoLakes, ws } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
beforeAll(async () => { w = await workspaceWithRoles('Service models'); }, 60_000);

describe('model versions', () => {
  it('POST /api/models/[id]/versions adds version 2 and leaves version 1 byte-identical', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId);
    const before = await w.reviewer.get(ws(`/api/models/${modelId}/versions/1/export`, w.workspaceId));
    expect(before.status).toBe(200);
    const rowBefore = await db('model_versions').where({ model_id: modelId, number: 1 }).first();

    const res = await w.modeler.post(ws(`/api/models/${modelId}/versions`, w.workspaceId), { document: twoLakes({ a2: 0.04 }), changeNote: 'lower loading downstream', baseVersion: 1 });
    expect(res.status).toBe(201);
    expect(res.body.version.number).toBe(2);
    expect(res.body.version.parentNumber).toBe(1);

    const after = await w.reviewer.get(ws(`/api/models/${modelId}/versions/1/export`, w.workspaceId));
    expect(after.text).toBe(before.text);
    const rowAfter = await db('model_versions').where({ model_id: modelId, number: 1 }).first();
    expect(rowAfter).toEqual(rowBefore);
    const v2 = await w.reviewer.get(ws(`/api/models/${modelId}/versions/2`, w.workspaceId));
    expect(v2.body.version.document.nodes[1].parameters.a).toBe(0.04);
    expect(v2.body.version.hash).not.toBe(rowBefore.hash);

    const history = await w.reviewer.get(ws(`/api/models/${modelId}/versions`, w.workspaceId));
    expect(history.body.versions.map((v: { number: number }) => v.number)).toEqual([2, 1]);
    const model = await w.reviewer.get(ws(`/api/models/${modelId}`, w.workspaceId));
    expect(model.body.model.latestVersion).toBe(2);
  });

  it('saving a document equal to the latest (keys reordered) stores nothing and answers created: false', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId);
    const doc = twoLakes();
    const reordered = Object.fromEntries(Object.entries(doc).reverse());
    const count = async () => Number((await db('model_versions').where({ model_id: modelId }).count({ n: '*' }))[0].n);
    expect(await count()).toBe(1);
    const res = await w.modeler.post(ws(`/api/models/${modelId}/versions`, w.workspaceId), { document: reordered, changeNote: 'no real change' });
    expect(res.status).toBe(200);
    expect(res.body.created).toBe(false);
    expect(res.body.version.number).toBe(1);
    expect(await count()).toBe(1);
  });

  it('a stale baseVersion is a 409 conflict and stores nothing', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId);
    await w.modeler.post(ws(`/api/models/${modelId}/versions`, w.workspaceId), { document: twoLakes({ a2: 0.03 }), changeNote: 'edit one' });
    const res = await w.modeler.post(ws(`/api/models/${modelId}/versions`, w.workspaceId), { document: twoLakes({ a2: 0.02 }), changeNote: 'edit two', baseVersion: 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/baseVersion/);
    const n = (await db('model_versions').where({ model_id: modelId }).count({ n: '*' }))[0].n;
    expect(Number(n)).toBe(2);
  });

  it('GET /api/models/[id]/diff lists the changed parameter by path', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId);
    await w.modeler.post(ws(`/api/models/${modelId}/versions`, w.workspaceId), { document: twoLakes({ a2: 0.01 }), changeNote: 'edit' });
    const res = await w.reviewer.get(ws(`/api/models/${modelId}/diff?from=1&to=2`, w.workspaceId));
    expect(res.status).toBe(200);
    expect(res.body.changes).toEqual([{ path: 'nodes/[id=lower]/parameters/a', kind: 'changed', before: 0.05, after: 0.01 }]);
  });

  it('an invalid document is a 400 naming the field and creates no model', async () => {
    const before = await db('models').where({ workspace_id: w.workspaceId }).count({ n: '*' });
    const bad = { ...twoLakes(), element: { variable: 'P', rate: 'a - b * P + foo(P)', parameters: { a: 0.05, b: 0.6 } } };
    const res = await w.modeler.post(ws('/api/models', w.workspaceId), { name: 'Broken', document: bad });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/element\.rate/);
    expect(await db('models').where({ workspace_id: w.workspaceId }).count({ n: '*' })).toEqual(before);
  });
});

describe('model list and archive', () => {
  it('GET /api/models searches, sorts by name and pages', async () => {
    const fresh = await workspaceWithRoles('Service list');
    for (const name of ['Delta lake set', 'alpha lakes', 'Charlie ponds', 'Bravo lakes']) await createModel(fresh.modeler, fresh.workspaceId, twoLakes(), name);
    const page1 = await fresh.reviewer.get(ws('/api/models?q=lake&sort=name&pageSize=2&page=1', fresh.workspaceId));
    expect(page1.status).toBe(200);
    expect(page1.body.total).toBe(3);
    expect(page1.body.items.map((m: { name: string }) => m.name)).toEqual(['alpha lakes', 'Bravo lakes']);
    const page2 = await fresh.reviewer.get(ws('/api/models?q=lake&sort=name&pageSize=2&page=2', fresh.workspaceId));
    expect(page2.body.items.map((m: { name: string }) => m.name)).toEqual(['Delta lake set']);
    const bad = await fresh.reviewer.get(ws('/api/models?sort=colour', fresh.workspaceId));
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/sort/);
  });

  it('POST /api/models/[id]/archive hides the model from the default list and refuses new versions', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes(), 'To be archived');
    const res = await w.modeler.post(ws(`/api/models/${modelId}/archive`, w.workspaceId), { archived: true });
    expect(res.status).toBe(200);
    expect(res.body.model.archived).toBe(true);
    const list = await w.reviewer.get(ws('/api/models?q=To%20be%20archived', w.workspaceId));
    expect(list.body.items).toEqual([]);
    const only = await w.reviewer.get(ws('/api/models?q=To%20be%20archived&archived=only', w.workspaceId));
    expect(only.body.items.map((m: { id: number }) => m.id)).toEqual([modelId]);
    const v = await w.modeler.post(ws(`/api/models/${modelId}/versions`, w.workspaceId), { document: twoLakes({ a2: 0.02 }), changeNote: 'x' });
    expect(v.status).toBe(409);
    const audit = await db('audit_log').where({ action: 'model.archive', target_id: String(modelId) }).first();
    expect(audit).toBeTruthy();
  });
});

describe('import and export', () => {
  it('POST /api/models/import stores the uploaded JSON byte for byte and exports it unchanged', async () => {
    const text = `{"format":"brinkmap/network-1",  "name":"Imported lakes",\n${JSON.stringify(twoLakes()).slice(1).replace('"format":"brinkmap/network-1",', '').replace('"name":"Two invented lakes",', '')}`;
    const res = await w.modeler.request('POST', ws('/api/models/import', w.workspaceId), { raw: text, headers: { 'content-type': 'application/json' } });
    expect(res.status).toBe(201);
    expect(res.body.model.name).toBe('Imported lakes');
    const out = await w.reviewer.get(ws(`/api/models/${res.body.model.id}/versions/latest/export`, w.workspaceId));
    expect(out.status).toBe(200);
    expect(out.text).toBe(text);
    expect(out.headers.get('content-disposition')).toMatch(/attachment/);
  });

  it('POST /api/models/import of a name the workspace has makes "name (2)", then "name (3)", and says so', async () => {
    const file = JSON.stringify(twoLakes({ name: 'Twin lakes import' }));
    const send = () => w.modeler.request('POST', ws('/api/models/import', w.workspaceId), { raw: file, headers: { 'content-type': 'application/json' } });
    const first = await send();
    expect(first.status).toBe(201);
    expect(first.body.model.name).toBe('Twin lakes import');
    expect(first.body.renamedFrom).toBeUndefined();
    const second = await send();
    expect(second.status).toBe(201);
    expect(second.body.model.name).toBe('Twin lakes import (2)');
    expect(second.body.renamedFrom).toBe('Twin lakes import');
    expect((await send()).body.model.name).toBe('Twin lakes import (3)');
    const names = (await db('models').where({ workspace_id: w.workspaceId }).andWhere('name', 'like', 'Twin lakes import%').select('name')).map((r) => r.name).sort();
    expect(names).toEqual(['Twin lakes import', 'Twin lakes import (2)', 'Twin lakes import (3)']);
  });

  it('POST /api/models with a name the workspace has (any case, archived too) makes "name (2)" and says so', async () => {
    const fresh = await workspaceWithRoles('Service twin names');
    const create = (name: string) => fresh.modeler.post(ws('/api/models', fresh.workspaceId), { name, document: twoLakes() });
    const first = await create('Fenn ponds');
    expect(first.status).toBe(201);
    expect(first.body.renamedFrom).toBeUndefined();
    await fresh.modeler.post(ws(`/api/models/${first.body.model.id}/archive`, fresh.workspaceId), { archived: true });
    const second = await create('fenn PONDS');
    expect(second.status).toBe(201);
    expect(second.body.model.name).toBe('fenn PONDS (2)');
    expect(second.body.renamedFrom).toBe('fenn PONDS');
    // Asking for a taken "(2)" counts on from its base.
    const third = await create('Fenn ponds (2)');
    expect(third.body.model.name).toBe('Fenn ponds (3)');
    const names = (await db('models').where({ workspace_id: fresh.workspaceId }).orderBy('id').select('name')).map((r) => r.name);
    expect(names).toEqual(['Fenn ponds', 'fenn PONDS (2)', 'Fenn ponds (3)']);
  });

  it('four imports of one file at once make four distinct names', async () => {
    const fresh = await workspaceWithRoles('Service twin race');
    const file = JSON.stringify(twoLakes({ name: 'Racing lakes' }));
    const results = await Promise.all([1, 2, 3, 4].map(() =>
      fresh.modeler.request('POST', ws('/api/models/import', fresh.workspaceId), { raw: file, headers: { 'content-type': 'application/json' } })));
    expect(results.map((r) => r.status)).toEqual([201, 201, 201, 201]);
    const names = (await db('models').where({ workspace_id: fresh.workspaceId }).select('name')).map((r) => r.name).sort();
    expect(names).toEqual(['Racing lakes', 'Racing lakes (2)', 'Racing lakes (3)', 'Racing lakes (4)']);
  });

  it('PATCH /api/models/[id] onto another model\'s name answers 409 naming the field and renames nothing', async () => {
    const fresh = await workspaceWithRoles('Service rename twin');
    const a = await createModel(fresh.modeler, fresh.workspaceId, twoLakes(), 'Reed marsh');
    const b = await createModel(fresh.modeler, fresh.workspaceId, twoLakes(), 'Sedge marsh');
    const res = await fresh.modeler.request('PATCH', ws(`/api/models/${b.modelId}`, fresh.workspaceId), { json: { name: 'reed marsh' } });
    expect(res.status).toBe(409);
    expect(res.body.error.field).toBe('name');
    expect(res.body.error.message).toContain('already has a model named "reed marsh"');
    expect((await db('models').where({ id: b.modelId }).first()).name).toBe('Sedge marsh');
    // Its own name in another case is not a clash.
    const own = await fresh.modeler.request('PATCH', ws(`/api/models/${a.modelId}`, fresh.workspaceId), { json: { name: 'Reed Marsh' } });
    expect(own.status).toBe(200);
    expect(own.body.model.name).toBe('Reed Marsh');
  });

  it('POST /api/models/[id]/import-csv turns an adjacency matrix into the links of a new version', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId);
    const csv = ',upper,lower\nupper,0,0.5\nlower,0.25,0\n';
    const res = await w.modeler.request('POST', ws(`/api/models/${modelId}/import-csv`, w.workspaceId), { raw: csv, headers: { 'content-type': 'text/csv' } });
    expect(res.status).toBe(201);
    expect(res.body.version.number).toBe(2);
    const v2 = await w.reviewer.get(ws(`/api/models/${modelId}/versions/2`, w.workspaceId));
    expect(v2.body.version.document.links).toEqual([{ from: 'upper', to: 'lower', weight: 0.5 }, { from: 'lower', to: 'upper', weight: 0.25 }]);
  });

  it('POST /api/models/[id]/import-csv also takes a multipart form with a "file" field', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId);
    const form = new FormData();
    form.append('file', new Blob([',upper,lower\nupper,,2\nlower,,\n'], { type: 'text/csv' }), 'matrix.csv');
    form.append('changeNote', 'from the field team matrix');
    const encoded = new Response(form);
    const res = await w.modeler.request('POST', ws(`/api/models/${modelId}/import-csv`, w.workspaceId), { raw: await encoded.text(), headers: { 'content-type': encoded.headers.get('content-type')! } });
    expect(res.status).toBe(201);
    const history = await w.reviewer.get(ws(`/api/models/${modelId}/versions`, w.workspaceId));
    expect(history.body.versions[0].changeNote).toBe('from the field team matrix');
    const v2 = await w.reviewer.get(ws(`/api/models/${modelId}/versions/2`, w.workspaceId));
    expect(v2.body.version.document.links).toEqual([{ from: 'upper', to: 'lower', weight: 2 }]);
  });
});
