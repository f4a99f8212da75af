/**
 * Stored results. A run's diagram and regime labels come back with the run in ONE query (runs
 * joined to results), as the stored JSON text, so the common read path does not parse and re-encode
 * large diagrams. See docs/architecture.md ("Storing results") for why the result is one row of
 * JSON text rather than rows per point.
 */
import { db } from '../db.ts';
import { runQuery, toRunInfo, type RunInfo } from '../runs/repository.ts';
import { notFound, conflict } from '../models/service-error.ts';
import { cachedBody, rememberBody } from './body-cache.ts';

export interface StoredResult {
  run: RunInfo;
  resultId: number;
  engineVersion: string;
  computeMs: number;
  createdAt: string;
  pointCount: number;
  /** Stored JSON text of the Diagram (view 'full'), or of its drawing preview (view 'preview'). */
  diagramText: string;
  /** Points in diagramText. */
  viewPoints: number;
  /** Stored JSON text of { regimes, escapeGraphs, diagnostics }. */
  regimesText: string;
}

/**
 * The run with its result in one query. `view` 'preview' reads the stored drawing preview instead of
 * the full diagram (results computed before previews existed fall back to the full diagram).
 * Missing run: 404; run without a result yet: 409.
 */
export async function getRunResult(workspaceId: string, runId: number, view: 'full' | 'preview' = 'full'): Promise<StoredResult> {
  if (!Number.isSafeInteger(runId)) throw notFound('run');
  const diagramColumn = view === 'preview'
    ? db.raw('COALESCE(res.preview, res.diagram) as res_diagram')
    : 'res.diagram as res_diagram';
  const viewPoints = view === 'preview' ? db.raw('COALESCE(res.preview_points, res.point_count) as res_view_points') : 'res.point_count as res_view_points';
  const row = await runQuery(db, workspaceId)
    .leftJoin('results as res', 'res.id', 'r.result_id')
    .andWhere('r.id', runId)
    .first(diagramColumn, viewPoints, 'res.regimes as res_regimes', 'res.engine_version as res_engine',
      'res.compute_ms as res_ms', 'res.created_at as res_created', 'res.point_count as res_points');
  if (!row) throw notFound('run');
  const run = toRunInfo(row);
  if (row.res_diagram == null) throw conflict(`run ${runId} has no result (it is ${run.status})`);
  return {
    viewPoints: Number(row.res_view_points),
    run,
    resultId: run.resultId!,
    engineVersion: row.res_engine,
    computeMs: row.res_ms,
    createdAt: new Date(row.res_created).toISOString(),
    pointCount: row.res_points,
    diagramText: row.res_diagram,
    regimesText: row.res_regimes,
  };
}

export interface EncodedResult {
  run: RunInfo;
  head: { id: number; engineVersion: string; computeMs: number; createdAt: string; pointCount: number; viewPoints: number };
  /** UTF-8 of `"diagram":<stored text>,"regimes":<stored text>` (without braces), ready to splice. */
  tail: Uint8Array;
}

/**
 * The run (checked against the workspace on every call) and its result's stored text, encoded.
 * The run and the result's small columns come in one query; the large text comes from the
 * immutable-result cache, or from a second query on a miss.
 */
export async function getEncodedRunResult(workspaceId: string, runId: number, view: 'full' | 'preview'): Promise<EncodedResult> {
  if (!Number.isSafeInteger(runId)) throw notFound('run');
  const row = await runQuery(db, workspaceId)
    .leftJoin('results as res', 'res.id', 'r.result_id')
    .andWhere('r.id', runId)
    .first('res.id as res_id', 'res.engine_version as res_engine', 'res.compute_ms as res_ms', 'res.created_at as res_created',
      'res.point_count as res_points', db.raw(view === 'preview' ? 'COALESCE(res.preview_points, res.point_count) as res_view_points' : 'res.point_count as res_view_points'));
  if (!row) throw notFound('run');
  const run = toRunInfo(row);
  if (row.res_id == null) throw conflict(`run ${runId} has no result (it is ${run.status})`);
  const key = `${row.res_id}:${view}`;
  let tail = cachedBody(key);
  if (!tail) {
    const big = await db('results').where({ id: row.res_id })
      .first(db.raw(view === 'preview' ? 'COALESCE(preview, diagram) as d' : 'diagram as d'), 'regimes as g');
    tail = new TextEncoder().encode(`"diagram":${big.d},"regimes":${big.g}`);
    rememberBody(key, tail);
  }
  return {
    run,
    head: { id: row.res_id, engineVersion: row.res_engine, computeMs: row.res_ms, createdAt: new Date(row.res_created).toISOString(), pointCount: row.res_points, viewPoints: Number(row.res_view_points) },
    tail,
  };
}
