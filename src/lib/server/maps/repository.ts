/**
 * Map runs in the database: finishing a run with its map_results row (or reusing the row of an
 * identical computation) and reading a run's map for the API and the run page.
 */
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { recordAudit } from '../models/audit.ts';
import { conflict, notFound } from '../models/service-error.ts';
import { insertOrReuse, type ClaimedRun } from '../runs/queue.ts';
import { runQuery, toRunInfo, type RunInfo } from '../runs/repository.ts';
import { decodeMap, type MapComputeOutput, type MapDocument } from './compute.ts';
import { MAP_RESULT_ENGINE } from './settings.ts';

export async function findMapResultId(cacheKey: string, k: Knex = db): Promise<number | null> {
  const row = await k('map_results').where({ cache_key: cacheKey }).first('id');
  return row ? (row.id as number) : null;
}

export function mapResultRow(out: MapComputeOutput, engineVersion = MAP_RESULT_ENGINE): Record<string, unknown> {
  return {
    engine_version: engineVersion, second_parameter: out.second, second_value: out.secondValue,
    curve_count: out.curveCount, curve_point_count: out.curvePointCount, point_count: out.pointCount,
    json_bytes: out.jsonBytes, map_blob: Buffer.from(out.mapBlob), compute_ms: out.computeMs,
  };
}

/** Stores the map (or reuses the row of the same key) and finishes the run in one transaction; false when the run stopped being ours. */
export async function completeMapRun(run: ClaimedRun, owner: string, out: MapComputeOutput | { reuse: number }, k: Knex = db): Promise<boolean> {
  return k.transaction(async (trx) => {
    const row = await trx('runs').where({ id: run.id }).forUpdate().first('status', 'lease_owner');
    if (!row || row.status !== 'running' || row.lease_owner !== owner) return false;
    const { id, reused } = 'reuse' in out ? { id: out.reuse, reused: true } : await insertOrReuse(trx, 'map_results', run.cacheKey, mapResultRow(out));
    await trx('runs').where({ id: run.id }).update({
      status: 'done', progress: 1, phrase: reused ? 'reused a stored map of identical inputs' : 'finished',
      map_result_id: id, reused, lease_owner: null, lease_expires_at: null, error: null,
      finished_at: trx.raw('NOW(3)'), heartbeat_at: trx.raw('NOW(3)'),
    });
    await recordAudit(trx, { workspaceId: run.workspaceId, actorId: null, action: 'run.done', targetType: 'run', targetId: run.id, details: { mapResultId: id, reused, worker: owner } });
    return true;
  }, { isolationLevel: 'read committed' });
}

export interface StoredMapInfo {
  id: number;
  engineVersion: string;
  second: string;
  secondValue: number;
  curveCount: number;
  curvePointCount: number;
  pointCount: number;
  jsonBytes: number;
  blobBytes: number;
  computeMs: number;
  createdAt: string;
}

export interface StoredRunMap {
  run: RunInfo;
  /** Null until the run is done. */
  info: StoredMapInfo | null;
  map: MapDocument | null;
}

/** A run's map. Another workspace's run, or a missing one: 404; a run of another kind: 409. */
export async function getRunMap(workspaceId: string, runId: number, k: Knex = db): Promise<StoredRunMap> {
  if (!Number.isSafeInteger(runId)) throw notFound('run');
  const row = await runQuery(k, workspaceId).andWhere('r.id', runId).first();
  if (!row) throw notFound('run');
  const run = toRunInfo(row);
  if (run.kind !== 'map') throw conflict(`run ${runId} is a ${run.kind} run, not a map`);
  const m = row.map_result_id ? await k('map_results').where({ id: row.map_result_id }).first() : null;
  if (!m) return { run, info: null, map: null };
  const blob = new Uint8Array(m.map_blob);
  return {
    run,
    info: {
      id: m.id, engineVersion: m.engine_version, second: m.second_parameter, secondValue: Number(m.second_value),
      curveCount: m.curve_count, curvePointCount: m.curve_point_count, pointCount: m.point_count,
      jsonBytes: m.json_bytes, blobBytes: blob.byteLength, computeMs: m.compute_ms, createdAt: new Date(m.created_at).toISOString(),
    },
    map: decodeMap(blob),
  };
}
