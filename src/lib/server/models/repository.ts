/**
 * Models and their immutable versions. Every function is scoped by workspace: a model of another
 * workspace is "not found", never "forbidden", so ids do not leak across workspaces.
 */
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { recordAudit } from './audit.ts';
import { type CheckedDocument } from './document.ts';
import { conflict, HttpError, notFound } from './service-error.ts';
import type { ListModelsQuery } from './schemas.ts';
import { diffDocuments, type DiffEntry } from './document-diff.ts';
import { modelNameKey, nameBase, nextFreeName } from '../../editor/unique-name.ts';

export interface ModelSummary {
  id: number;
  name: string;
  description: string;
  tags: string[];
  createdBy: string | null;
  createdByName: string | null;
  latestVersion: number;
  archived: boolean;
  createdAt: string;
  updatedAt: string;
  latestHash: string | null;
  latestRun: { id: number; status: string; progress: number } | null;
}

export interface VersionInfo {
  id: number;
  modelId: number;
  number: number;
  format: string;
  hash: string;
  parentVersionId: number | null;
  parentNumber: number | null;
  changeNote: string;
  createdBy: string | null;
  createdByName: string | null;
  createdAt: string;
}

export interface VersionWithDocument extends VersionInfo {
  /** The stored text, byte for byte. */
  documentText: string;
  document: unknown;
}

type Row = Record<string, any>;

const iso = (d: Date | string | null): string | null => (d === null ? null : new Date(d).toISOString());

function parseTags(v: unknown): string[] {
  if (Array.isArray(v)) return v as string[];
  if (typeof v === 'string') { try { return JSON.parse(v); } catch { return []; } }
  return [];
}

function toSummary(r: Row): ModelSummary {
  return {
    id: r.id,
    name: r.name,
    description: r.description,
    tags: parseTags(r.tags),
    createdBy: r.created_by,
    createdByName: r.created_by_name ?? null,
    latestVersion: r.latest_version,
    archived: r.archived_at !== null,
    createdAt: iso(r.created_at)!,
    updatedAt: iso(r.updated_at)!,
    latestHash: r.latest_hash ?? null,
    latestRun: r.latest_run_id ? { id: r.latest_run_id, status: r.latest_run_status, progress: Number(r.latest_run_progress) } : null,
  };
}

function toVersion(r: Row): VersionInfo {
  return {
    id: r.id,
    modelId: r.model_id,
    number: r.number,
    format: r.format,
    hash: r.hash,
    parentVersionId: r.parent_version_id,
    parentNumber: r.parent_number ?? null,
    changeNote: r.change_note,
    createdBy: r.created_by,
    createdByName: r.created_by_name ?? null,
    createdAt: iso(r.created_at)!,
  };
}

function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => `\\${c}`);
}

function summaryQuery(k: Knex, workspaceId: string) {
  return k('models')
    .leftJoin('users', 'users.id', 'models.created_by')
    .leftJoin('model_versions as lv', function () {
      this.on('lv.model_id', '=', 'models.id').andOn('lv.number', '=', 'models.latest_version');
    })
    .leftJoin('runs as lr', function () {
      this.on('lr.id', '=', k.raw('(SELECT MAX(r2.id) FROM runs r2 WHERE r2.model_id = models.id)'));
    })
    .where('models.workspace_id', workspaceId)
    .select('models.*', 'users.display_name as created_by_name', 'lv.hash as latest_hash',
      'lr.id as latest_run_id', 'lr.status as latest_run_status', 'lr.progress as latest_run_progress');
}

export async function listModels(
  workspaceId: string,
  query: Partial<ListModelsQuery> & { search?: string } = {},
): Promise<{ items: ModelSummary[]; total: number; page: number; pageSize: number }> {
  const q: ListModelsQuery = {
    sort: 'updated', page: 1, pageSize: 20, archived: 'exclude', ...query, q: query.q ?? query.search,
  } as ListModelsQuery;
  const base = db('models').where('models.workspace_id', workspaceId);
  const filter = (qb: Knex.QueryBuilder) => {
    if (q.archived === 'exclude') qb.whereNull('models.archived_at');
    if (q.archived === 'only') qb.whereNotNull('models.archived_at');
    if (q.q) {
      const like = `%${escapeLike(q.q)}%`;
      qb.where((w) => w.where('models.name', 'like', like).orWhere('models.description', 'like', like));
    }
    if (q.tag) qb.whereRaw('JSON_CONTAINS(models.tags, ?)', [JSON.stringify(q.tag)]);
    return qb;
  };
  const [{ total }] = await filter(base.clone()).count({ total: '*' });
  const column = { name: 'models.name', created: 'models.created_at', updated: 'models.updated_at' }[q.sort];
  const order = q.order ?? (q.sort === 'name' ? 'asc' : 'desc');
  const rows = await filter(summaryQuery(db, workspaceId))
    .orderBy(column, order).orderBy('models.id', order)
    .limit(q.pageSize).offset((q.page - 1) * q.pageSize);
  return { items: rows.map(toSummary), total: Number(total), page: q.page, pageSize: q.pageSize };
}

/** The model, or null when it does not exist in this workspace. */
export async function getModel(workspaceId: string, modelId: number, k: Knex = db): Promise<ModelSummary | null> {
  if (!Number.isSafeInteger(modelId)) return null;
  const row = await summaryQuery(k, workspaceId).andWhere('models.id', modelId).first();
  return row ? toSummary(row) : null;
}

/** Like getModel, but a missing model is a 404. */
export async function requireModel(workspaceId: string, modelId: number, k: Knex = db): Promise<ModelSummary> {
  const model = await getModel(workspaceId, modelId, k);
  if (!model) throw notFound('model');
  return model;
}

export interface CreateModelInput {
  name: string;
  description: string;
  tags: string[];
  changeNote: string;
  checked: CheckedDocument;
}

/**
 * A new model with its first version. A name the workspace already has becomes the first free
 * "name (2)" (uniqueModelName) and `renamedFrom` says what was asked for; the workspace row is locked
 * while the name is chosen, so two imports of one file at once cannot both take "name (2)".
 */
export async function createModel(workspaceId: string, actorId: string, input: CreateModelInput): Promise<{ model: ModelSummary; version: VersionInfo; renamedFrom?: string }> {
  return db.transaction(async (trx) => {
    await trx('workspaces').where({ id: workspaceId }).forUpdate().first();
    const name = await uniqueModelName(workspaceId, input.name, trx);
    const [modelId] = await trx('models').insert({
      workspace_id: workspaceId,
      name,
      description: input.description,
      tags: JSON.stringify(input.tags),
      created_by: actorId,
      latest_version: 1,
    });
    const [versionId] = await trx('model_versions').insert({
      model_id: modelId,
      number: 1,
      format: input.checked.format,
      document: input.checked.text,
      hash: input.checked.hash,
      parent_version_id: null,
      change_note: input.changeNote,
      created_by: actorId,
    });
    await recordAudit(trx, { workspaceId, actorId, action: 'model.create', targetType: 'model', targetId: modelId, details: { name, versionId, hash: input.checked.hash, ...(name !== input.name ? { renamedFrom: input.name } : {}) } });
    const model = await requireModel(workspaceId, modelId, trx);
    const version = toVersion(await trx('model_versions').where({ id: versionId }).first());
    return { model, version, ...(name !== input.name ? { renamedFrom: input.name } : {}) };
  });
}

/**
 * `name` if no model of the workspace (archived ones included) has it, else the first free
 * "name (2)", "name (3)", … (nextFreeName) — so an import or a new model never silently makes a
 * second model of the same name.
 */
export async function uniqueModelName(workspaceId: string, name: string, k: Knex = db): Promise<string> {
  const base = nameBase(name);
  const rows = await k('models').where({ workspace_id: workspaceId })
    .andWhere((q) => q.where('name', name).orWhere('name', base).orWhere('name', 'like', `${base.replace(/[\\%_]/g, '\\$&')} (%)`))
    .select('name');
  return nextFreeName(name, rows.map((r: Row) => String(r.name)));
}

export async function updateModelMeta(workspaceId: string, actorId: string, modelId: number, patch: { name?: string; description?: string; tags?: string[] }): Promise<ModelSummary> {
  return db.transaction(async (trx) => {
    const row = await trx('models').where({ id: modelId, workspace_id: workspaceId }).forUpdate().first();
    if (!row) throw notFound('model');
    if (patch.name !== undefined && modelNameKey(patch.name) !== modelNameKey(String(row.name))) {
      // A rename onto another model's name would make two models no one can tell apart. The
      // workspace lock (as in createModel) keeps a model created meanwhile from taking it too.
      await trx('workspaces').where({ id: workspaceId }).forUpdate().first();
      const others = await trx('models').where({ workspace_id: workspaceId }).andWhere('name', patch.name).whereNot({ id: modelId }).select('name');
      if (others.some((o: Row) => modelNameKey(String(o.name)) === modelNameKey(patch.name!))) {
        const message = `the workspace already has a model named "${patch.name}"; choose another name`;
        throw new HttpError(409, 'name_taken', `name: ${message}`, { field: 'name', issues: [{ field: 'name', message }] });
      }
    }
    const update: Row = { updated_at: trx.raw('CURRENT_TIMESTAMP(3)') };
    if (patch.name !== undefined) update.name = patch.name;
    if (patch.description !== undefined) update.description = patch.description;
    if (patch.tags !== undefined) update.tags = JSON.stringify(patch.tags);
    await trx('models').where({ id: modelId }).update(update);
    await recordAudit(trx, { workspaceId, actorId, action: 'model.update', targetType: 'model', targetId: modelId, details: { ...patch } });
    return requireModel(workspaceId, modelId, trx);
  });
}

export async function setArchived(workspaceId: string, actorId: string, modelId: number, archived: boolean): Promise<ModelSummary> {
  return db.transaction(async (trx) => {
    const row = await trx('models').where({ id: modelId, workspace_id: workspaceId }).forUpdate().first();
    if (!row) throw notFound('model');
    await trx('models').where({ id: modelId }).update({
      archived_at: archived ? (row.archived_at ?? trx.raw('CURRENT_TIMESTAMP(3)')) : null,
      updated_at: trx.raw('CURRENT_TIMESTAMP(3)'),
    });
    await recordAudit(trx, { workspaceId, actorId, action: archived ? 'model.archive' : 'model.unarchive', targetType: 'model', targetId: modelId });
    return requireModel(workspaceId, modelId, trx);
  });
}

/**
 * Adds a version. When the document's hash equals the latest version's, nothing is inserted and the
 * latest version is returned with `created: false` (saving an unchanged editor twice makes no noise).
 */
export async function addVersion(
  workspaceId: string, actorId: string, modelId: number,
  input: { checked: CheckedDocument; changeNote: string; baseVersion?: number; action?: string },
): Promise<{ version: VersionInfo; created: boolean }> {
  return db.transaction(async (trx) => {
    // The row lock serialises concurrent saves of one model, so version numbers never collide.
    const model = await trx('models').where({ id: modelId, workspace_id: workspaceId }).forUpdate().first();
    if (!model) throw notFound('model');
    if (model.archived_at) throw conflict('model is archived; unarchive it before adding versions');
    const latest = await trx('model_versions').where({ model_id: modelId, number: model.latest_version }).first();
    if (input.baseVersion !== undefined && input.baseVersion !== model.latest_version) {
      throw conflict(`baseVersion: version ${input.baseVersion} is not the latest (${model.latest_version}); reload and apply your change again`);
    }
    if (latest && latest.hash === input.checked.hash) {
      return { version: toVersion(latest), created: false };
    }
    const number = model.latest_version + 1;
    const [versionId] = await trx('model_versions').insert({
      model_id: modelId,
      number,
      format: input.checked.format,
      document: input.checked.text,
      hash: input.checked.hash,
      parent_version_id: latest ? latest.id : null,
      change_note: input.changeNote,
      created_by: actorId,
    });
    await trx('models').where({ id: modelId }).update({ latest_version: number, updated_at: trx.raw('CURRENT_TIMESTAMP(3)') });
    await recordAudit(trx, { workspaceId, actorId, action: input.action ?? 'model.version', targetType: 'model_version', targetId: versionId, details: { modelId, number, hash: input.checked.hash } });
    const row = await trx('model_versions').where({ id: versionId }).first();
    return { version: toVersion({ ...row, parent_number: latest?.number ?? null }), created: true };
  });
}

function versionQuery(k: Knex, workspaceId: string) {
  return k('model_versions as v')
    .join('models as m', 'm.id', 'v.model_id')
    .leftJoin('model_versions as pv', 'pv.id', 'v.parent_version_id')
    .leftJoin('users as u', 'u.id', 'v.created_by')
    .where('m.workspace_id', workspaceId)
    .select('v.id', 'v.model_id', 'v.number', 'v.format', 'v.hash', 'v.parent_version_id', 'v.change_note',
      'v.created_by', 'v.created_at', 'pv.number as parent_number', 'u.display_name as created_by_name');
}

export async function listVersions(workspaceId: string, modelId: number): Promise<VersionInfo[]> {
  await requireModel(workspaceId, modelId);
  const rows = await versionQuery(db, workspaceId).andWhere('v.model_id', modelId).orderBy('v.number', 'desc');
  return rows.map(toVersion);
}

/** One version with its document (`number` may be 'latest'), or null. */
export async function getVersion(workspaceId: string, modelId: number, number: number | 'latest', k: Knex = db): Promise<VersionWithDocument | null> {
  if (!Number.isSafeInteger(modelId) || (number !== 'latest' && !Number.isSafeInteger(number))) return null;
  const qb = versionQuery(k, workspaceId).andWhere('v.model_id', modelId).select('v.document');
  if (number === 'latest') qb.orderBy('v.number', 'desc');
  else qb.andWhere('v.number', number);
  const row = await qb.first();
  return row ? { ...toVersion(row), documentText: row.document, document: JSON.parse(row.document) } : null;
}

export async function requireVersion(workspaceId: string, modelId: number, number: number | 'latest', k: Knex = db): Promise<VersionWithDocument> {
  const v = await getVersion(workspaceId, modelId, number, k);
  if (!v) throw notFound('model version');
  return v;
}

export async function getVersionById(workspaceId: string, versionId: number, k: Knex = db): Promise<VersionWithDocument | null> {
  if (!Number.isSafeInteger(versionId)) return null;
  const row = await versionQuery(k, workspaceId).andWhere('v.id', versionId).select('v.document').first();
  return row ? { ...toVersion(row), documentText: row.document, document: JSON.parse(row.document) } : null;
}

export async function diffVersions(workspaceId: string, modelId: number, from: number, to: number): Promise<{ from: VersionInfo; to: VersionInfo; changes: DiffEntry[] }> {
  const [a, b] = await Promise.all([requireVersion(workspaceId, modelId, from), requireVersion(workspaceId, modelId, to)]);
  const { documentText: _a, document: docA, ...infoA } = a;
  const { documentText: _b, document: docB, ...infoB } = b;
  return { from: infoA, to: infoB, changes: diffDocuments(docA, docB) };
}
