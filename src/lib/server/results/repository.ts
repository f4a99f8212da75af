/**
 * Stored results. A run's diagram and regime labels come back with the run in ONE query (runs
 * joined to results), as the stored JSON text, so the common read path does not parse and re-encode
 * large diagrams. See docs/architecture.md ("Storing results") for why the result is one row of
 * JSON text rather than rows per point.
 */
import { db } from '../db.ts';
import { runQuery, toRunInfo, type RunInfo } from '../runs/repository.ts';
import { notFound, conflict } from '../models/service-error.ts';

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
