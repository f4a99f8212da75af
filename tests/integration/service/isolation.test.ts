/**
 * Workspace isolation beyond the role matrix: a signed-in owner of workspace B, with B as the
 * active workspace, names ids of workspace A's models, versions, runs, tags and comments in every
 * service route. Every answer is 404 (never 403, never data), and B's lists never show A's rows.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { claimRun, completeRun } from '../../../src/lib/server/runs/queue.ts';
import { computeTrace } from '../../../src/lib/server/runs/compute.ts';
import { ENGINE_VERSION } from '../../../src/lib/atlas/engine-version.ts';
import { createModel, twoLakes, ws } from './fixtures.ts';

closeDbAfterAll(afterAll);

let a: WorkspaceFixture;
let b: WorkspaceFixture;
let ids: { model: number; run: number; tag: number; comment: number };

beforeAll(async () => {
  [a, b] = await Promise.all([workspaceWithRoles('Isolation A'), workspaceWithRoles('Isolation B')]);
  const { modelId } = await createModel(a.modeler, a.workspaceId, twoLakes({ a2: 0.0711 }), 'Secret lakes of A');
  const queue = `isolation-${Date.now()}`;
  const run = await startRun(a.workspaceId, a.modeler.user!.id, { modelId, settings: {}, notify: false, queue });
  const claimed = (await claimRun('isolation-test', queue, 60_000))!;
  await completeRun(claimed, 'isolation-test', computeTrace(claimed.documentText, claimed.settings, { onProgress: () => undefined, isCancelled: () => false }), ENGINE_VERSION);
  const tag = await a.modeler.post(ws(`/api/runs/${run.id}/tags`, a.workspaceId), { from: 0, to: 0.1, name: 'A tag', colour: '#123456', note: '' });
  const comment = await a.reviewer.post(ws(`/api/runs/${run.id}/comments`, a.workspaceId), { body: 'A comment' });
  ids = { model: modelId, run: run.id, tag: tag.body.tag.id, comment: comment.body.comment.id };
}, 60_000);

describe('an owner of workspace B, acting in B, names workspace A ids', () => {
  const cases: [string, string, (i: typeof ids) => string, unknown?][] = [
    ['GET', 'model', (i) => `/api/models/${i.model}`],
    ['PATCH', 'model', (i) => `/api/models/${i.model}`, { description: 'hijack' }],
    ['POST', 'archive', (i) => `/api/models/${i.model}/archive`, { archived: true }],
    ['GET', 'versions', (i) => `/api/models/${i.model}/versions`],
    ['POST', 'new version', (i) => `/api/models/${i.model}/versions`, { document: twoLakes({ a2: 0.01 }), changeNote: 'hijack' }],
    ['GET', 'version', (i) => `/api/models/${i.model}/versions/1`],
    ['GET', 'export', (i) => `/api/models/${i.model}/versions/1/export`],
    ['GET', 'diff', (i) => `/api/models/${i.model}/diff?from=1&to=1`],
    ['GET', 'run', (i) => `/api/runs/${i.run}`],
    ['POST', 'cancel', (i) => `/api/runs/${i.run}/cancel`],
    ['GET', 'progress', (i) => `/api/runs/${i.run}/progress`],
    ['GET', 'events', (i) => `/api/runs/${i.run}/events`],
    ['GET', 'result', (i) => `/api/runs/${i.run}/result`],
    ['GET', 'result csv', (i) => `/api/runs/${i.run}/result.csv`],
    ['GET', 'result json', (i) => `/api/runs/${i.run}/result.json`],
    ['GET', 'escapes', (i) => `/api/runs/${i.run}/escapes`],
    ['GET', 'escapes csv', (i) => `/api/runs/${i.run}/escapes.csv`],
    ['GET', 'tags', (i) => `/api/runs/${i.run}/tags`],
    ['POST', 'tag', (i) => `/api/runs/${i.run}/tags`, { from: 0, to: 1, name: 'x', colour: '#000000', note: '' }],
    ['PATCH', 'tag', (i) => `/api/tags/${i.tag}`, { note: 'hijack' }],
    ['DELETE', 'tag', (i) => `/api/tags/${i.tag}`],
    ['GET', 'comments', (i) => `/api/runs/${i.run}/comments`],
    ['POST', 'comment', (i) => `/api/runs/${i.run}/comments`, { body: 'hijack' }],
    ['PATCH', 'comment', (i) => `/api/comments/${i.comment}`, { body: 'hijack' }],
    ['DELETE', 'comment', (i) => `/api/comments/${i.comment}`],
  ];
  for (const [method, what, path, body] of cases) {
    it(`${method} ${what}: 404`, async () => {
      const res = await b.owner.request(method, ws(path(ids), b.workspaceId), body === undefined ? {} : { json: body });
      expect(res.status).toBe(404);
      expect(res.body.error.code).toBe('not_found');
    });
  }

  it('POST /api/runs with A\'s model id: 404', async () => {
    const res = await b.owner.post(ws('/api/runs', b.workspaceId), { modelId: ids.model });
    expect(res.status).toBe(404);
    const escapes = await b.owner.post(ws('/api/runs', b.workspaceId), { modelId: ids.model, kind: 'escapes', settings: { noise: 0.3, values: [0.1] } });
    expect(escapes.status).toBe(404);
  });

  it('B\'s lists show none of A\'s models, runs or comments; A\'s rows are untouched', async () => {
    const models = await b.owner.get(ws('/api/models?archived=include', b.workspaceId));
    expect(models.body.items).toEqual([]);
    const runs = await b.owner.get(ws('/api/runs', b.workspaceId));
    expect(runs.body.items).toEqual([]);
    const comments = await b.owner.get(ws('/api/comments', b.workspaceId));
    expect(comments.body.comments).toEqual([]);
    const model = await a.reviewer.get(ws(`/api/models/${ids.model}`, a.workspaceId));
    expect(model.body.model).toMatchObject({ description: '', archived: false, latestVersion: 1 });
    const tags = await a.reviewer.get(ws(`/api/runs/${ids.run}/tags`, a.workspaceId));
    expect(tags.body.tags.map((t: { note: string }) => t.note)).toEqual(['']);
  });
});
