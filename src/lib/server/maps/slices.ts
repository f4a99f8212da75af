/**
 * Slices of a map run (docs/maps.md, "From the map back to one parameter"): the one-parameter diagram
 * at one value of the map's second parameter, computed on demand as an ordinary trace run of the
 * map's own model version with that parameter overridden (settings.override) over the map's range of
 * the swept parameter, and flagged as a slice of the map (runs.slice_of_run_id). No model version is
 * saved. Asking again for the same value answers the slice already queued, running or done (`cached`);
 * a slice whose computation is stored under the same cache key (any run, any map of this version) is
 * finished at once on that result by startRun.
 */
import { db } from '../db.ts';
import { ENGINE_VERSION } from '../../atlas/engine-version.ts';
import { HttpError } from '../http.ts';
import { conflict } from '../models/service-error.ts';
import { requireVersion } from '../models/repository.ts';
import { resultCacheKey } from '../runs/cache-key.ts';
import { normalizeSettings } from '../runs/normalize-settings.ts';
import { checkOverride } from '../runs/override.ts';
import { getRun, requireRun, runQuery, startRun, toRunInfo, type RunInfo } from '../runs/repository.ts';
import type { RunSettings } from '../runs/schemas.ts';
import type { StoredMapSettings } from './schema.ts';

/** A slice as the map view needs it. */
export interface SliceInfo {
  readonly id: number;
  readonly value: number;
  readonly status: RunInfo['status'];
  readonly progress: number;
  readonly phrase: string;
  readonly reused: boolean;
}

const invalid = (field: string, message: string) =>
  new HttpError(400, 'invalid_input', `${field}: ${message}`, { field, issues: [{ field, message: `${field}: ${message}` }] });

/** The map run itself: 404 for a missing run or another workspace's, 409 for another kind of run. */
async function requireMapRun(workspaceId: string, mapRunId: number): Promise<RunInfo> {
  const run = await requireRun(workspaceId, mapRunId);
  if (run.kind !== 'map') throw conflict(`run ${mapRunId} is a ${run.kind} run, not a map`);
  return run;
}

/** The trace settings of the slice at `value`: the map's range of the swept parameter and the override. */
export function sliceSettings(map: StoredMapSettings, value: number): RunSettings {
  return {
    ...(map.from !== undefined && map.to !== undefined ? { from: map.from, to: map.to } : {}),
    override: { parameter: map.second, value },
  };
}

export function toSliceInfo(run: RunInfo): SliceInfo {
  const value = (run.settings as RunSettings).override?.value ?? Number.NaN;
  return { id: run.id, value, status: run.status, progress: run.progress, phrase: run.phrase, reused: run.reused };
}

/** The slices of a map run that did not fail or get cancelled, newest first (one per value). */
export async function listSlices(workspaceId: string, mapRunId: number): Promise<SliceInfo[]> {
  await requireMapRun(workspaceId, mapRunId);
  const rows = await runQuery(db, workspaceId).andWhere('r.slice_of_run_id', mapRunId)
    .whereIn('r.status', ['queued', 'running', 'done']).orderBy('r.id', 'desc').limit(200);
  const seen = new Set<number>();
  const out: SliceInfo[] = [];
  for (const row of rows) {
    const s = toSliceInfo(toRunInfo(row));
    if (!Number.isFinite(s.value) || seen.has(s.value)) continue;
    seen.add(s.value);
    out.push(s);
  }
  return out;
}

/**
 * The slice at `value`: the one already queued, running or done for this map and value (`cached`),
 * else a new trace run (finished at once when its result is stored). The value must lie in the map's
 * range of the second parameter (400, field `value`): the slice is drawn on the map and its figure is
 * labelled as a cut of it.
 */
export async function startSlice(workspaceId: string, actorId: string, mapRunId: number, value: number): Promise<{ run: RunInfo; cached: boolean }> {
  const map = await requireMapRun(workspaceId, mapRunId);
  const ms = map.settings as unknown as StoredMapSettings;
  const lo = Math.min(ms.secondFrom, ms.secondTo), hi = Math.max(ms.secondFrom, ms.secondTo);
  if (!(value >= lo && value <= hi)) throw invalid('value', `must lie in the map's range of ${ms.second}, ${lo} to ${hi} (got ${value})`);
  const version = await requireVersion(workspaceId, map.modelId, map.versionNumber);
  const settings = sliceSettings(ms, value);
  checkOverride(version.document, settings.override!, { parameter: 'value', value: 'value' });
  const cacheKey = resultCacheKey('trace', version.hash, normalizeSettings(version.document, settings), ENGINE_VERSION);
  const existing = await db('runs').where({ workspace_id: workspaceId, slice_of_run_id: mapRunId, cache_key: cacheKey })
    .whereIn('status', ['queued', 'running', 'done']).orderBy('id', 'desc').first('id');
  if (existing) {
    const run = await getRun(workspaceId, existing.id as number);
    if (run) return { run, cached: true };
  }
  const run = await startRun(workspaceId, actorId, { modelId: map.modelId, version: map.versionNumber, kind: 'trace', settings, notify: false, sliceOf: mapRunId });
  return { run, cached: false };
}
