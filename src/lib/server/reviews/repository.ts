/**
 * Band tags and review comments on runs. Role rules (checked here, so pages and API agree):
 *   band tags: owners and modelers create; the author edits/deletes their own; owners everything.
 *   comments:  owners and reviewers create; the author edits/deletes their own; owners everything;
 *              modelers may also mark a comment resolved or open (they act on reviews of their models).
 * Every change is written to the audit log in the same transaction.
 */
import type { Knex } from 'knex';
import type { z } from 'zod';
import { db } from '../db.ts';
import type { Role } from '../auth/roles.ts';
import { recordAudit } from '../models/audit.ts';
import { badRequest, forbidden, notFound } from '../models/service-error.ts';
import type { bandTagPatchSchema, bandTagSchema, commentPatchSchema, commentSchema } from './schemas.ts';

export interface Actor { id: string; role: Role }

export interface StoredBandTag {
  id: number;
  runId: number;
  from: number;
  to: number;
  name: string;
  colour: string;
  note: string;
  createdBy: string | null;
  author: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface StoredComment {
  id: number;
  runId: number;
  modelId: number;
  modelName: string;
  target: { kind: 'run' | 'band' | 'special-point'; ref?: string };
  body: string;
  createdBy: string | null;
  author: string | null;
  resolved: boolean;
  resolvedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

type Row = Record<string, any>;
const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());

function toTag(r: Row): StoredBandTag {
  return {
    id: r.id, runId: r.run_id, from: r.range_from, to: r.range_to, name: r.name, colour: r.colour, note: r.note,
    createdBy: r.created_by, author: r.author ?? null, createdAt: iso(r.created_at)!, updatedAt: iso(r.updated_at)!,
  };
}

function toComment(r: Row): StoredComment {
  return {
    id: r.id, runId: r.run_id, modelId: r.model_id, modelName: r.model_name,
    target: r.target_kind === 'run' ? { kind: 'run' } : { kind: r.target_kind, ref: r.target_ref },
    body: r.body, createdBy: r.created_by, author: r.author ?? null,
    resolved: r.resolved_at !== null, resolvedAt: iso(r.resolved_at), createdAt: iso(r.created_at)!, updatedAt: iso(r.updated_at)!,
  };
}

async function requireRunRow(k: Knex, workspaceId: string, runId: number) {
  const run = Number.isSafeInteger(runId) ? await k('runs').where({ id: runId, workspace_id: workspaceId }).first('id', 'model_id') : null;
  if (!run) throw notFound('run');
  return run;
}

const tagQuery = (k: Knex, workspaceId: string) => k('band_tags as t')
  .leftJoin('users as u', 'u.id', 't.created_by')
  .where('t.workspace_id', workspaceId)
  .select('t.*', 'u.display_name as author');

export async function listBandTags(workspaceId: string, runId: number): Promise<StoredBandTag[]> {
  await requireRunRow(db, workspaceId, runId);
  const rows = await tagQuery(db, workspaceId).andWhere('t.run_id', runId).orderBy('t.range_from').orderBy('t.id');
  return rows.map(toTag);
}

export async function createBandTag(workspaceId: string, actor: Actor, runId: number, input: z.infer<typeof bandTagSchema>): Promise<StoredBandTag> {
  if (actor.role !== 'owner' && actor.role !== 'modeler') throw forbidden('Band tags are added by modelers and owners.');
  return db.transaction(async (trx) => {
    await requireRunRow(trx, workspaceId, runId);
    const [id] = await trx('band_tags').insert({
      workspace_id: workspaceId, run_id: runId, range_from: input.from, range_to: input.to,
      name: input.name, colour: input.colour.toLowerCase(), note: input.note, created_by: actor.id,
    });
    await recordAudit(trx, { workspaceId, actorId: actor.id, action: 'band_tag.create', targetType: 'band_tag', targetId: id, details: { runId, ...input } });
    return toTag(await tagQuery(trx, workspaceId).andWhere('t.id', id).first());
  });
}

async function lockTag(trx: Knex.Transaction, workspaceId: string, tagId: number, actor: Actor) {
  const tag = Number.isSafeInteger(tagId) ? await trx('band_tags').where({ id: tagId, workspace_id: workspaceId }).forUpdate().first() : null;
  if (!tag) throw notFound('band tag');
  const mayEdit = actor.role === 'owner' || (actor.role === 'modeler' && tag.created_by === actor.id);
  if (!mayEdit) throw forbidden(actor.role === 'modeler' ? 'Only the author or an owner may change this tag.' : 'Band tags are changed by their author or an owner.');
  return tag;
}

export async function updateBandTag(workspaceId: string, actor: Actor, tagId: number, patch: z.infer<typeof bandTagPatchSchema>): Promise<StoredBandTag> {
  return db.transaction(async (trx) => {
    const tag = await lockTag(trx, workspaceId, tagId, actor);
    const from = patch.from ?? tag.range_from;
    const to = patch.to ?? tag.range_to;
    if (!(from < to)) throw badRequest('to: must be greater than from', [{ field: 'to', message: 'must be greater than from' }]);
    await trx('band_tags').where({ id: tagId }).update({
      range_from: from, range_to: to,
      ...(patch.name !== undefined ? { name: patch.name } : {}),
      ...(patch.colour !== undefined ? { colour: patch.colour.toLowerCase() } : {}),
      ...(patch.note !== undefined ? { note: patch.note } : {}),
      updated_at: trx.raw('CURRENT_TIMESTAMP(3)'),
    });
    await recordAudit(trx, { workspaceId, actorId: actor.id, action: 'band_tag.update', targetType: 'band_tag', targetId: tagId, details: { ...patch } });
    return toTag(await tagQuery(trx, workspaceId).andWhere('t.id', tagId).first());
  });
}

export async function deleteBandTag(workspaceId: string, actor: Actor, tagId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const tag = await lockTag(trx, workspaceId, tagId, actor);
    await trx('band_tags').where({ id: tagId }).delete();
    await recordAudit(trx, { workspaceId, actorId: actor.id, action: 'band_tag.delete', targetType: 'band_tag', targetId: tagId, details: { runId: tag.run_id, name: tag.name } });
  });
}

const commentQuery = (k: Knex, workspaceId: string) => k('comments as c')
  .join('runs as r', 'r.id', 'c.run_id')
  .join('models as m', 'm.id', 'r.model_id')
  .leftJoin('users as u', 'u.id', 'c.created_by')
  .where('c.workspace_id', workspaceId)
  .select('c.*', 'r.model_id', 'm.name as model_name', 'u.display_name as author');

export async function listComments(workspaceId: string, filter: { runId?: number; modelId?: number; modelIds?: number[]; open?: boolean } = {}): Promise<StoredComment[]> {
  if (filter.runId !== undefined) await requireRunRow(db, workspaceId, filter.runId);
  const qb = commentQuery(db, workspaceId);
  if (filter.runId !== undefined) qb.andWhere('c.run_id', filter.runId);
  if (filter.modelId !== undefined) qb.andWhere('r.model_id', filter.modelId);
  if (filter.modelIds !== undefined) qb.whereIn('r.model_id', filter.modelIds.length ? filter.modelIds : [-1]);
  if (filter.open === true) qb.whereNull('c.resolved_at');
  if (filter.open === false) qb.whereNotNull('c.resolved_at');
  const rows = await qb.orderBy('c.id', 'desc').limit(500);
  return rows.map(toComment);
}

export async function createComment(workspaceId: string, actor: Actor, runId: number, input: z.infer<typeof commentSchema>): Promise<StoredComment> {
  if (actor.role !== 'owner' && actor.role !== 'reviewer') throw forbidden('Comments are written by reviewers and owners.');
  return db.transaction(async (trx) => {
    await requireRunRow(trx, workspaceId, runId);
    const [id] = await trx('comments').insert({
      workspace_id: workspaceId, run_id: runId, target_kind: input.target.kind,
      target_ref: 'ref' in input.target ? input.target.ref : null, body: input.body, created_by: actor.id,
    });
    await recordAudit(trx, { workspaceId, actorId: actor.id, action: 'comment.create', targetType: 'comment', targetId: id, details: { runId, target: input.target } });
    return toComment(await commentQuery(trx, workspaceId).andWhere('c.id', id).first());
  });
}

export async function updateComment(workspaceId: string, actor: Actor, commentId: number, patch: z.infer<typeof commentPatchSchema>): Promise<StoredComment> {
  return db.transaction(async (trx) => {
    const c = Number.isSafeInteger(commentId) ? await trx('comments').where({ id: commentId, workspace_id: workspaceId }).forUpdate().first() : null;
    if (!c) throw notFound('comment');
    const isAuthor = c.created_by === actor.id;
    if (patch.body !== undefined && !(actor.role === 'owner' || isAuthor)) throw forbidden('Only the author or an owner may edit this comment.');
    if (patch.resolved !== undefined && !(actor.role === 'owner' || actor.role === 'modeler' || isAuthor)) throw forbidden('Only the author, a modeler or an owner may resolve this comment.');
    await trx('comments').where({ id: commentId }).update({
      ...(patch.body !== undefined ? { body: patch.body } : {}),
      ...(patch.resolved !== undefined ? { resolved_at: patch.resolved ? (c.resolved_at ?? trx.raw('CURRENT_TIMESTAMP(3)')) : null } : {}),
      updated_at: trx.raw('CURRENT_TIMESTAMP(3)'),
    });
    await recordAudit(trx, { workspaceId, actorId: actor.id, action: 'comment.update', targetType: 'comment', targetId: commentId, details: { ...patch } });
    return toComment(await commentQuery(trx, workspaceId).andWhere('c.id', commentId).first());
  });
}

export async function deleteComment(workspaceId: string, actor: Actor, commentId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const c = Number.isSafeInteger(commentId) ? await trx('comments').where({ id: commentId, workspace_id: workspaceId }).forUpdate().first() : null;
    if (!c) throw notFound('comment');
    if (!(actor.role === 'owner' || c.created_by === actor.id)) throw forbidden('Only the author or an owner may delete this comment.');
    await trx('comments').where({ id: commentId }).delete();
    await recordAudit(trx, { workspaceId, actorId: actor.id, action: 'comment.delete', targetType: 'comment', targetId: commentId, details: { runId: c.run_id } });
  });
}
