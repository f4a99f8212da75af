/**
 * Escape studies in the database: the atlas a study stands on (a stored trace result of the same
 * version and trace settings), the per-value rows written while the run goes on, finishing the run
 * with its study row, and reading a run's study for the API.
 */
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { ENGINE_VERSION } from '../../atlas/engine-version.ts';
import { recordAudit } from '../models/audit.ts';
import { conflict, notFound } from '../models/service-error.ts';
import { resultCacheKey } from '../runs/cache-key.ts';
import { normalizeSettings } from '../runs/normalize-settings.ts';
import type { ComputeOutput } from '../runs/compute.ts';
import { insertOrReuse, resultRow, type ClaimedRun } from '../runs/queue.ts';
import { runQuery, toRunInfo, type RunInfo } from '../runs/repository.ts';
import type { RunSettings } from '../runs/schemas.ts';
import type { EscapeStudySummary } from './compute.ts';
import { decodePoint, type EscapePoint, type EscapePointDbRow } from './rows.ts';

/** The cache key of the atlas: exactly a trace run's of the same version and (normalized) trace settings. */
export function atlasCacheKey(versionHash: string, document: unknown, atlas: RunSettings): string {
  return resultCacheKey('trace', versionHash, normalizeSettings(document, atlas), ENGINE_VERSION);
}

/** Stores a trace result computed as the first part of an escape run (or reads the one a concurrent run stored). */
export async function storeAtlas(cacheKey: string, out: ComputeOutput, k: Knex = db): Promise<number> {
  return (await insertOrReuse(k, 'results', cacheKey, resultRow(out, ENGINE_VERSION))).id;
}

/** Indices of the values stored under this key (what a retry does not compute again). */
export async function storedValueIndices(cacheKey: string, k: Knex = db): Promise<number[]> {
  const rows = await k('escape_points').where({ cache_key: cacheKey }).select('idx').orderBy('idx');
  return rows.map((r) => Number(r.idx));
}

/** One finished value. A row already there (another attempt or run of the same inputs) is kept: the numbers are the same. */
export async function storeValue(cacheKey: string, row: EscapePointDbRow, k: Knex = db): Promise<void> {
  await k('escape_points').insert({ ...row, cache_key: cacheKey }).onConflict(['cache_key', 'idx']).ignore();
}

/**
 * Writes the study row (or reuses the one with the same key) and finishes the run, in one
 * transaction; false when the run stopped being ours (cancelled, or taken over).
 */
export async function completeEscapeRun(run: ClaimedRun, owner: string, summary: EscapeStudySummary | { reuse: number }, atlasResultId: number | null, k: Knex = db): Promise<boolean> {
  return k.transaction(async (trx) => {
    const row = await trx('runs').where({ id: run.id }).forUpdate().first('status', 'lease_owner');
    if (!row || row.status !== 'running' || row.lease_owner !== owner) return false;
    const { id: studyId, reused } = 'reuse' in summary ? { id: summary.reuse, reused: true } : await insertOrReuse(trx, 'escape_studies', run.cacheKey, {
      engine_version: ENGINE_VERSION, atlas_result_id: atlasResultId, parameter: summary.parameter,
      noise: summary.noise, start: summary.start, value_count: summary.valueCount,
      exit_switches: JSON.stringify(summary.exitSwitches), band_edges: JSON.stringify(summary.bandEdges),
      diagnostics: JSON.stringify(summary.diagnostics), compute_ms: summary.computeMs,
    });
    // The last word on paths done per value: the stored rows (the last heartbeat may predate the last value).
    const stored = await trx('escape_points').where({ cache_key: run.cacheKey }).orderBy('idx').select('p', 'paths', 'status');
    const values = stored.map((r) => ({ p: Number(r.p), paths: Number(r.paths), pathsDone: Number(r.paths), status: r.status }));
    await trx('runs').where({ id: run.id }).update({
      status: 'done', progress: 1, phrase: reused ? 'reused a stored study of identical inputs' : 'finished',
      progress_detail: JSON.stringify({ values }),
      escape_study_id: studyId, reused, lease_owner: null, lease_expires_at: null, error: null,
      finished_at: trx.raw('NOW(3)'), heartbeat_at: trx.raw('NOW(3)'),
    });
    await recordAudit(trx, { workspaceId: run.workspaceId, actorId: null, action: 'run.done', targetType: 'run', targetId: run.id, details: { escapeStudyId: studyId, reused, worker: owner } });
    return true;
  }, { isolationLevel: 'read committed' });
}

export async function findStudyId(cacheKey: string, k: Knex = db): Promise<number | null> {
  const row = await k('escape_studies').where({ cache_key: cacheKey }).first('id');
  return row ? (row.id as number) : null;
}

export interface StoredEscapeStudy {
  run: RunInfo;
  study: {
    id: number; engineVersion: string; atlasResultId: number | null; parameter: string; noise: number; start: string;
    valueCount: number; exitSwitches: unknown[]; bandEdges: unknown[]; diagnostics: unknown[]; computeMs: number; createdAt: string;
  } | null;
  /** Values stored so far, in parameter order (a running study shows the finished ones). */
  points: EscapePoint[];
}

const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v ?? null);

/**
 * A run's escape study: the run, the study row once finished, and every stored value (also while
 * the run is going on). Another workspace's run, or a missing one: 404; a trace run: 409.
 */
export async function getRunEscapes(workspaceId: string, runId: number): Promise<StoredEscapeStudy> {
  if (!Number.isSafeInteger(runId)) throw notFound('run');
  const row = await runQuery(db, workspaceId).andWhere('r.id', runId).first();
  if (!row) throw notFound('run');
  const run = toRunInfo(row);
  if (run.kind !== 'escapes') throw conflict(`run ${runId} is a ${run.kind} run, not an escape study`);
  const s = run.escapeStudyId !== null ? await db('escape_studies').where({ id: run.escapeStudyId }).first() : null;
  const rows = await db('escape_points').where({ cache_key: row.cache_key }).orderBy('idx');
  return {
    run,
    study: s ? {
      id: s.id, engineVersion: s.engine_version, atlasResultId: s.atlas_result_id, parameter: s.parameter, noise: Number(s.noise), start: s.start,
      valueCount: s.value_count, exitSwitches: parse(s.exit_switches) ?? [], bandEdges: parse(s.band_edges) ?? [],
      diagnostics: parse(s.diagnostics) ?? [], computeMs: s.compute_ms, createdAt: new Date(s.created_at).toISOString(),
    } : null,
    points: rows.map(decodePoint),
  };
}

/** A finished escape study of one model version, for the band links of the diagram view (src/components/diagram/band-studies.ts). */
export interface VersionStudySummary {
  runId: number;
  noise: number;
  start: string;
  paths: number | null;
  /** Every stored value, in parameter order, with the prediction's escape orders (most probable first, at most `orders`). */
  points: { p: number; orders: { order: string[]; probability: number | null }[] }[];
}

/**
 * The finished escape studies of a model version in this workspace, newest run first, one per
 * stored study (runs of identical inputs share one), at most `limit`. Another workspace's version
 * yields nothing.
 */
export async function listVersionStudies(workspaceId: string, versionId: number, opts: { limit?: number; orders?: number } = {}, k: Knex = db): Promise<VersionStudySummary[]> {
  const limit = opts.limit ?? 10;
  const keep = opts.orders ?? 3;
  const rows = await k('runs as r').join('escape_studies as s', 's.id', 'r.escape_study_id')
    .where({ 'r.workspace_id': workspaceId, 'r.model_version_id': versionId, 'r.kind': 'escapes', 'r.status': 'done' })
    .orderBy('r.id', 'desc').limit(limit * 4)
    .select('r.id as run_id', 'r.settings', 's.id as study_id', 's.cache_key', 's.noise', 's.start');
  const seen = new Set<number>();
  const studies = rows.filter((r) => !seen.has(r.study_id) && seen.add(r.study_id)).slice(0, limit);
  if (!studies.length) return [];
  const points = await k('escape_points').whereIn('cache_key', studies.map((s) => s.cache_key)).orderBy(['cache_key', 'p']).select('cache_key', 'p', 'status', 'prediction');
  return studies.map((s) => {
    const settings = parse(s.settings) as { paths?: number } | null;
    return {
      runId: Number(s.run_id), noise: Number(s.noise), start: s.start, paths: typeof settings?.paths === 'number' ? settings.paths : null,
      points: points.filter((pt) => pt.cache_key === s.cache_key && pt.status === 'done').map((pt) => {
        const prediction = parse(pt.prediction) as { sequences?: { order: string[]; probability: number | null }[] } | null;
        const orders = [...(prediction?.sequences ?? [])].sort((a, b) => (b.probability ?? -1) - (a.probability ?? -1)).slice(0, keep);
        return { p: Number(pt.p), orders };
      }),
    };
  });
}
