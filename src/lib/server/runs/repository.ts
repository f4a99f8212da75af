/**
 * Runs as the API and the pages see them: start (queue, or reuse a stored result), list, read,
 * cancel. The worker side of the queue (claim, heartbeat, complete) is in ./queue.ts.
 */
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { ENGINE_VERSION } from '../../atlas/engine-version.ts';
import { recordAudit } from '../models/audit.ts';
import { requireVersion } from '../models/repository.ts';
import { conflict, notFound } from '../models/service-error.ts';
import { resultCacheKey } from './cache-key.ts';
import { normalizeSettings } from './normalize-settings.ts';
import { checkOverride } from './override.ts';
import type { ListRunsQuery, RunSettings, RunStatus } from './schemas.ts';
import type { EscapeSettings } from '../escapes/schema.ts';
import { checkRequestBudget, normalizeEscapeSettings } from '../escapes/settings.ts';
import type { MapRunSettings } from '../maps/schema.ts';
import { MAP_RESULT_ENGINE, normalizeMapSettings } from '../maps/settings.ts';

export interface RunInfo {
  id: number;
  modelId: number;
  modelName: string;
  versionId: number;
  versionNumber: number;
  versionHash: string;
  kind: string;
  settings: RunSettings;
  status: RunStatus;
  progress: number;
  phrase: string;
  createdBy: string | null;
  createdByName: string | null;
  notify: boolean;
  attempts: number;
  maxAttempts: number;
  engineVersion: string;
  resultId: number | null;
  /** Escape runs: the stored study (rows in escape_points under the run's cache key). */
  escapeStudyId: number | null;
  /** Map runs: the stored map (map_results). */
  mapResultId: number | null;
  /** A trace run cut from a map at one value of its second parameter (settings.override holds it): the map run. */
  sliceOf: number | null;
  reused: boolean;
  error: { code: string; message: string; [k: string]: unknown } | null;
  queuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  heartbeatAt: string | null;
}

type Row = Record<string, any>;
const iso = (d: Date | string | null): string | null => (d === null || d === undefined ? null : new Date(d).toISOString());
const parseJson = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v ?? null);

export function toRunInfo(r: Row): RunInfo {
  return {
    id: r.id,
    modelId: r.model_id,
    modelName: r.model_name,
    versionId: r.model_version_id,
    versionNumber: r.version_number,
    versionHash: r.version_hash,
    kind: r.kind,
    settings: parseJson(r.settings) ?? {},
    status: r.status,
    progress: Number(r.progress),
    phrase: r.phrase,
    createdBy: r.created_by,
    createdByName: r.created_by_name ?? null,
    notify: Boolean(r.notify),
    attempts: r.attempts,
    maxAttempts: r.max_attempts,
    engineVersion: r.engine_version,
    resultId: r.result_id,
    escapeStudyId: r.escape_study_id ?? null,
    mapResultId: r.map_result_id ?? null,
    sliceOf: r.slice_of_run_id ?? null,
    reused: Boolean(r.reused),
    error: parseJson(r.error),
    queuedAt: iso(r.queued_at)!,
    startedAt: iso(r.started_at),
    finishedAt: iso(r.finished_at),
    heartbeatAt: iso(r.heartbeat_at),
  };
}

export function runQuery(k: Knex, workspaceId: string) {
  return k('runs as r')
    .join('model_versions as v', 'v.id', 'r.model_version_id')
    .join('models as m', 'm.id', 'r.model_id')
    .leftJoin('users as u', 'u.id', 'r.created_by')
    .where('r.workspace_id', workspaceId)
    .select('r.*', 'v.number as version_number', 'v.hash as version_hash', 'm.name as model_name', 'u.display_name as created_by_name');
}

export async function getRun(workspaceId: string, runId: number, k: Knex = db): Promise<RunInfo | null> {
  if (!Number.isSafeInteger(runId)) return null;
  const row = await runQuery(k, workspaceId).andWhere('r.id', runId).first();
  return row ? toRunInfo(row) : null;
}

export async function requireRun(workspaceId: string, runId: number, k: Knex = db): Promise<RunInfo> {
  const run = await getRun(workspaceId, runId, k);
  if (!run) throw notFound('run');
  return run;
}

export async function listRuns(
  workspaceId: string,
  query: Partial<ListRunsQuery> = {},
): Promise<{ items: RunInfo[]; total: number; page: number; pageSize: number }> {
  const page = query.page ?? 1;
  const pageSize = query.pageSize ?? 20;
  const filter = (qb: Knex.QueryBuilder) => {
    if (query.modelId !== undefined) qb.andWhere('r.model_id', query.modelId);
    if (query.status !== undefined) qb.andWhere('r.status', query.status);
    if (query.kind !== undefined) qb.andWhere('r.kind', query.kind);
    return qb;
  };
  const [{ total }] = await filter(db('runs as r').where('r.workspace_id', workspaceId)).count({ total: '*' });
  const rows = await filter(runQuery(db, workspaceId)).orderBy('r.id', 'desc').limit(pageSize).offset((page - 1) * pageSize);
  return { items: rows.map(toRunInfo), total: Number(total), page, pageSize };
}

export type StartRunInput = {
  modelId: number;
  version?: number;
  notify: boolean;
  /** Worker queue name; the API always uses 'default' (tests and deployments may route elsewhere). */
  queue?: string;
  maxAttempts?: number;
  /** Trace runs only: the map run this one is a slice of (src/lib/server/maps/slices.ts). */
  sliceOf?: number;
} & ({ kind?: 'trace'; settings: RunSettings } | { kind: 'escapes'; settings: EscapeSettings } | { kind: 'map'; settings: MapRunSettings });

/**
 * Queues a run of one model version. When a result with the same (version hash, settings, engine
 * version) is already stored, the run is created finished and points at that result: no recompute.
 */
export async function startRun(workspaceId: string, actorId: string | null, input: StartRunInput): Promise<RunInfo> {
  const version = await requireVersion(workspaceId, input.modelId, input.version ?? 'latest');
  const kind = input.kind ?? 'trace';
  let settings: unknown;
  let cacheKey: string;
  if (input.kind === 'escapes') {
    // Escape study: values spelled out, noise resolved, budget checked; threads are not part of the identity.
    const n = normalizeEscapeSettings(version.document, input.settings);
    checkRequestBudget(version.document, n.stored);
    settings = n.stored;
    cacheKey = resultCacheKey('escapes', version.hash, n.identity, ENGINE_VERSION);
  } else if (input.kind === 'map') {
    // Two-parameter map: the second parameter checked by the engine's compiler, defaults dropped.
    settings = normalizeMapSettings(version.document, input.settings);
    cacheKey = resultCacheKey('map', version.hash, settings, MAP_RESULT_ENGINE);
  } else {
    const { threads, ...s } = input.settings as RunSettings;
    if (s.override) checkOverride(version.document, s.override);
    // Threads are kept with the run (the worker reads them) but not in the identity: the same diagram on any count.
    const identity = normalizeSettings(version.document, s);
    settings = threads !== undefined && threads > 1 ? { ...identity, threads } : identity;
    cacheKey = resultCacheKey(kind, version.hash, identity, ENGINE_VERSION);
  }
  const runId = await db.transaction(async (trx) => {
    const model = await trx('models').where({ id: input.modelId, workspace_id: workspaceId }).first();
    if (!model) throw notFound('model');
    if (model.archived_at) throw conflict('model is archived; unarchive it before starting runs');
    const storeTable = kind === 'escapes' ? 'escape_studies' : kind === 'map' ? 'map_results' : 'results';
    const storeColumn = kind === 'escapes' ? 'escape_study_id' : kind === 'map' ? 'map_result_id' : 'result_id';
    const stored = await trx(storeTable).where({ cache_key: cacheKey }).first('id');
    const base = {
      workspace_id: workspaceId,
      model_id: input.modelId,
      model_version_id: version.id,
      kind,
      settings: JSON.stringify(settings),
      cache_key: cacheKey,
      queue: input.queue ?? 'default',
      created_by: actorId,
      notify: input.notify,
      max_attempts: input.maxAttempts ?? 3,
      engine_version: ENGINE_VERSION,
      ...(input.sliceOf !== undefined && kind === 'trace' ? { slice_of_run_id: input.sliceOf } : {}),
    };
    const [id] = await trx('runs').insert(stored
      ? { ...base, status: 'done', progress: 1, phrase: 'reused a stored result of identical inputs', [storeColumn]: stored.id, reused: true,
          started_at: trx.raw('CURRENT_TIMESTAMP(3)'), finished_at: trx.raw('CURRENT_TIMESTAMP(3)') }
      : { ...base, status: 'queued', phrase: 'waiting for a worker' });
    await recordAudit(trx, { workspaceId, actorId, action: 'run.start', targetType: 'run', targetId: id,
      details: { modelId: input.modelId, version: version.number, kind, reusedResult: stored?.id ?? null } });
    return id as number;
  });
  return (await getRun(workspaceId, runId))!;
}

/**
 * Cancels a queued or running run. A running run is marked cancelled at once; its worker sees the
 * status change at its next heartbeat, stops the computation and stores nothing.
 */
export async function cancelRun(workspaceId: string, actorId: string, runId: number): Promise<RunInfo> {
  await db.transaction(async (trx) => {
    const run = await trx('runs').where({ id: runId, workspace_id: workspaceId }).forUpdate().first();
    if (!run) throw notFound('run');
    if (run.status !== 'queued' && run.status !== 'running') throw conflict(`run is already ${run.status}`);
    await trx('runs').where({ id: runId }).update({
      status: 'cancelled', cancel_requested: true, phrase: 'cancelled', lease_owner: null, lease_expires_at: null,
      finished_at: trx.raw('CURRENT_TIMESTAMP(3)'),
    });
    await recordAudit(trx, { workspaceId, actorId, action: 'run.cancel', targetType: 'run', targetId: runId, details: { was: run.status } });
  });
  return (await getRun(workspaceId, runId))!;
}

/** The fields a progress poll or event stream needs, in one cheap query. */
export async function getRunProgress(workspaceId: string, runId: number) {
  if (!Number.isSafeInteger(runId)) return null;
  const r = await db('runs').where({ id: runId, workspace_id: workspaceId })
    .first('id', 'kind', 'status', 'progress', 'phrase', 'progress_detail', 'error', 'result_id', 'escape_study_id', 'map_result_id', 'attempts', 'heartbeat_at', 'finished_at');
  if (!r) return null;
  return {
    id: r.id as number,
    status: r.status as RunStatus,
    progress: Number(r.progress),
    phrase: r.phrase as string,
    error: parseJson(r.error),
    resultId: r.result_id as number | null,
    kind: r.kind as string,
    /** Escape runs: paths done per parameter value ({ values: [{ p, pathsDone, paths, status }] }). */
    detail: parseJson(r.progress_detail),
    escapeStudyId: (r.escape_study_id ?? null) as number | null,
    mapResultId: (r.map_result_id ?? null) as number | null,
    attempts: r.attempts as number,
    heartbeatAt: iso(r.heartbeat_at),
    finishedAt: iso(r.finished_at),
  };
}
