/**
 * Bad uploads: every one is a 400 whose message names the problem (row and column for CSV cells),
 * and the database is unchanged afterwards.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { createModel, ws } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let modelId: number;
beforeAll(async () => {
  w = await workspaceWithRoles('Service uploads');
  ({ modelId } = await createModel(w.modeler, w.workspaceId));
}, 60_000);

/** Rows of this test's workspace only: other test files run in parallel against the same database. */
async function counts(): Promise<Record<string, number>> {
  const n = async (q: any) => Number((await q.count({ n: '*' }))[0].n);
  return {
    models: await n(db('models').where({ workspace_id: w.workspaceId })),
    versions: await n(db('model_versions as v').join('models as m', 'm.id', 'v.model_id').where('m.workspace_id', w.workspaceId)),
    audit: await n(db('audit_log').where({ workspace_id: w.workspaceId })),
  };
}

const csvCases: { name: string; body: string; type?: string; message: RegExp }[] = [
  { name: 'malformed CSV (unclosed quote)', body: ',upper,lower\nupper,0,"1\nlower,0,0\n', message: /malformed CSV/ },
  { name: 'a ragged row', body: ',upper,lower\nupper,0,1\nlower,0\n', message: /row 3: has 2 cells, the header row has 3/ },
  { name: 'an unknown node id in the header', body: ',upper,middle\nupper,0,1\nmiddle,0,0\n', message: /row 1, column 3: unknown node id "middle"/ },
  { name: 'an unknown node id in the first column', body: ',upper,lower\nupper,0,1\nbottom,0,0\n', message: /row 3, column 1: unknown node id "bottom"/ },
  { name: 'a non-numeric weight', body: ',upper,lower\nupper,0,strong\nlower,0,0\n', message: /row 2, column 3: weight "strong" is not a number/ },
  { name: 'a self-link on the diagonal', body: ',upper,lower\nupper,2,1\nlower,0,0\n', message: /row 2, column 2: self-link/ },
  { name: 'an empty file', body: '', message: /empty/ },
  { name: 'the wrong content type', body: ',upper,lower\nupper,0,1\nlower,0,0\n', type: 'application/xml', message: /Content-Type application\/xml is not accepted/ },
];

describe('POST /api/models/[id]/import-csv refuses bad files', () => {
  for (const c of csvCases) {
    it(`${c.name}: 400 naming the problem, nothing written`, async () => {
      const before = await counts();
      const res = await w.modeler.request('POST', ws(`/api/models/${modelId}/import-csv`, w.workspaceId), { raw: c.body, headers: { 'content-type': c.type ?? 'text/csv' } });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(c.message);
      expect(await counts()).toEqual(before);
    });
  }

  it('an oversized file (over 256 KiB): 400 naming the limit, nothing written', async () => {
    const before = await counts();
    const big = ',upper,lower\n' + 'upper,0,1\n'.repeat(30_000);
    const res = await w.modeler.request('POST', ws(`/api/models/${modelId}/import-csv`, w.workspaceId), { raw: big, headers: { 'content-type': 'text/csv' } });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/larger than the 256 KiB limit/);
    expect(await counts()).toEqual(before);
  });

  it('a multipart upload with the file under another field name: 400 naming the field', async () => {
    const before = await counts();
    const form = new FormData();
    form.append('matrix', new Blob([',upper,lower\nupper,0,1\nlower,0,0\n'], { type: 'text/csv' }), 'm.csv');
    const encoded = new Response(form);
    const body = await encoded.text();
    const res = await w.modeler.request('POST', ws(`/api/models/${modelId}/import-csv`, w.workspaceId), { raw: body, headers: { 'content-type': encoded.headers.get('content-type')! } });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/field named "file"/);
    expect(await counts()).toEqual(before);
  });
});

describe('POST /api/models/import refuses bad files', () => {
  const jsonCases: { name: string; body: string; type?: string; message: RegExp }[] = [
    { name: 'JSON that does not parse', body: '{"format": "brinkmap/network-1",', message: /not valid JSON/ },
    { name: 'a document with an unknown node in a link', body: JSON.stringify({ format: 'brinkmap/network-1', name: 'x', element: { variable: 'P', rate: '-P', parameters: {} }, nodes: [{ id: 'a' }], links: [{ from: 'a', to: 'zz', weight: 1 }], coupling: { parameter: 'beta', value: 0 }, sweep: { parameter: 'beta', from: 0, to: 1 } }), message: /links\[0\]\.to/ },
    { name: 'the wrong content type', body: '{}', type: 'text/plain', message: /Content-Type text\/plain is not accepted/ },
    { name: 'an oversized file (over 1 MiB)', body: JSON.stringify({ format: 'brinkmap/network-1', name: 'x'.repeat(1_100_000) }), message: /larger than the 1024 KiB limit/ },
  ];
  for (const c of jsonCases) {
    it(`${c.name}: 400 naming the problem, nothing written`, async () => {
      const before = await counts();
      const res = await w.modeler.request('POST', ws('/api/models/import', w.workspaceId), { raw: c.body, headers: { 'content-type': c.type ?? 'application/json' } });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(c.message);
      expect(await counts()).toEqual(before);
    });
  }
});
