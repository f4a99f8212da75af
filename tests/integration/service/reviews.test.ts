/**
 * Band tags and comments: role and authorship rules beyond the matrix (a modeler cannot change
 * another modeler's tag, a modeler may resolve but not rewrite a comment), validation, and an
 * audit entry for every change.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addMember, closeDbAfterAll, db, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { createModel, twoLakes, ws } from './fixtures.ts';

closeDbAfterAll(afterAll);

let w: WorkspaceFixture;
let runId: number;
beforeAll(async () => {
  w = await workspaceWithRoles('Service reviews');
  const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0811 }), 'Reviewed lakes');
  // Tags and comments attach to a run in any state; this one waits on a queue nobody serves.
  runId = (await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: false, queue: 'reviews-idle' })).id;
}, 60_000);

const auditCount = async (action: string, id: number) =>
  Number((await db('audit_log').where({ workspace_id: w.workspaceId, action, target_id: String(id) }).count({ n: '*' }))[0].n);

describe('band tags', () => {
  it('the author edits and deletes; another modeler gets 403; each change is audited', async () => {
    const created = await w.modeler.post(ws(`/api/runs/${runId}/tags`, w.workspaceId), { from: 0.05, to: 0.12, name: 'Fragile', colour: '#AA3300', note: 'check' });
    expect(created.status).toBe(201);
    expect(created.body.tag).toMatchObject({ from: 0.05, to: 0.12, name: 'Fragile', colour: '#aa3300', author: 'Test Person' });
    const id = created.body.tag.id;
    expect(await auditCount('band_tag.create', id)).toBe(1);

    const other = await addMember(w.workspaceId, 'modeler');
    const denied = await other.patch(ws(`/api/tags/${id}`, w.workspaceId), { note: 'mine now' });
    expect(denied.status).toBe(403);
    expect(denied.body.error.message).toMatch(/author or an owner/);

    const edited = await w.modeler.patch(ws(`/api/tags/${id}`, w.workspaceId), { to: 0.15 });
    expect(edited.body.tag.to).toBe(0.15);
    const inverted = await w.modeler.patch(ws(`/api/tags/${id}`, w.workspaceId), { from: 0.2 });
    expect(inverted.status).toBe(400);
    expect(inverted.body.error.message).toMatch(/to: must be greater than from/);
    expect(await auditCount('band_tag.update', id)).toBe(1);

    expect((await w.modeler.delete(ws(`/api/tags/${id}`, w.workspaceId))).status).toBe(204);
    expect(await auditCount('band_tag.delete', id)).toBe(1);
  });

  it('bad tags are 400 naming the field and store nothing', async () => {
    const count = async () => Number((await db('band_tags').where({ run_id: runId }).count({ n: '*' }))[0].n);
    const before = await count();
    const cases: [unknown, RegExp][] = [
      [{ from: 0.2, to: 0.1, name: 'x', colour: '#000000' }, /to: must be greater than from/],
      [{ from: 0, to: 0.1, name: 'x', colour: 'red' }, /colour/],
      [{ from: 0, to: 0.1, name: '', colour: '#000000' }, /name/],
      [{ from: 0, to: 0.1, name: 'x', colour: '#000000', weight: 3 }, /unknown field "weight"/],
    ];
    for (const [body, message] of cases) {
      const res = await w.modeler.post(ws(`/api/runs/${runId}/tags`, w.workspaceId), body);
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(message);
    }
    expect(await count()).toBe(before);
  });
});

describe('comments', () => {
  it('reviewers comment on a special point; modelers may resolve but not rewrite; listed as open until resolved', async () => {
    const created = await w.reviewer.post(ws(`/api/runs/${runId}/comments`, w.workspaceId), { target: { kind: 'special-point', ref: 's3' }, body: 'Is this fold real?' });
    expect(created.status).toBe(201);
    const id = created.body.comment.id;
    expect(created.body.comment.target).toEqual({ kind: 'special-point', ref: 's3' });

    const byModeler = await w.modeler.post(ws(`/api/runs/${runId}/comments`, w.workspaceId), { body: 'reply' });
    expect(byModeler.status).toBe(403);
    const rewrite = await w.modeler.patch(ws(`/api/comments/${id}`, w.workspaceId), { body: 'softened' });
    expect(rewrite.status).toBe(403);

    const open = await w.modeler.get(ws('/api/comments?open=1', w.workspaceId));
    expect(open.body.comments.map((c: { id: number }) => c.id)).toContain(id);
    const resolved = await w.modeler.patch(ws(`/api/comments/${id}`, w.workspaceId), { resolved: true });
    expect(resolved.status).toBe(200);
    expect(resolved.body.comment.resolved).toBe(true);
    const openAfter = await w.modeler.get(ws('/api/comments?open=1', w.workspaceId));
    expect(openAfter.body.comments.map((c: { id: number }) => c.id)).not.toContain(id);
    expect(await auditCount('comment.update', id)).toBe(1);

    const otherReviewer = await addMember(w.workspaceId, 'reviewer');
    expect((await otherReviewer.delete(ws(`/api/comments/${id}`, w.workspaceId))).status).toBe(403);
    expect((await w.owner.delete(ws(`/api/comments/${id}`, w.workspaceId))).status).toBe(204);
    expect(await auditCount('comment.delete', id)).toBe(1);
  });
});
