/**
 * Stored results. A run's diagram and regime labels come back with the run in ONE query (runs
 * joined to results). The diagram is stored encoded (`diagram_blob`, docs/storage.md) or, for rows
 * written before that, as JSON text; either way callers get the same JSON text (byte for byte what
 * JSON.stringify of the engine's diagram gave) or the same objects. See docs/architecture.md
 * ("Storing results") for why the result is one row rather than rows per point.
 */
import type { Diagram } from '../../atlas/types.ts';
import { db } from '../db.ts';
import { runQuery, toRunInfo, type RunInfo } from '../runs/repository.ts';
import { notFound, conflict } from '../models/service-error.ts';
import { cachedBody, rememberBody } from './body-cache.ts';
import { storedDiagram, storedDiagramText, type ResultView, type StoredDiagramColumns } from './stored-diagram.ts';
import { thinDiagram } from './thin.ts';

export interface StoredResult {
  run: RunInfo;
  resultId: number;
  engineVersion: string;
  computeMs: number;
  createdAt: string;
  pointCount: number;
  /** JSON text of the Diagram (view 'full'), or of its drawing preview (view 'preview'); decoded on first use. */
  readonly diagramText: string;
  /** The same as objects (decoded straight from the columns for encoded rows, no JSON text in between). */
  diagram(): Diagram;
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
export async function getRunResult(workspaceId: string, runId: number, view: ResultView = 'full'): Promise<StoredResult> {
  if (!Number.isSafeInteger(runId)) throw notFound('run');
  // The JSON text only for rows without an encoded diagram (COALESCE stays on the server).
  const textColumn = db.raw(view === 'preview'
    ? 'CASE WHEN res.diagram_blob IS NULL THEN COALESCE(res.preview, res.diagram) END as res_diagram'
    : 'CASE WHEN res.diagram_blob IS NULL THEN res.diagram END as res_diagram');
  const viewPoints = view === 'preview' ? db.raw('COALESCE(res.preview_points, res.point_count) as res_view_points') : 'res.point_count as res_view_points';
  const row = await runQuery(db, workspaceId)
    .leftJoin('results as res', 'res.id', 'r.result_id')
    .andWhere('r.id', runId)
    .first('res.id as res_id', textColumn, 'res.diagram_blob as res_blob', viewPoints, 'res.regimes as res_regimes', 'res.engine_version as res_engine',
      'res.compute_ms as res_ms', 'res.created_at as res_created', 'res.point_count as res_points');
  if (!row) throw notFound('run');
  const run = toRunInfo(row);
  if (row.res_id == null) throw conflict(`run ${runId} has no result (it is ${run.status})`);
  const columns: StoredDiagramColumns = { blob: row.res_blob, text: row.res_diagram };
  let text: string | undefined;
  let objects: Diagram | undefined;
  return {
    viewPoints: Number(row.res_view_points),
    run,
    resultId: run.resultId!,
    engineVersion: row.res_engine,
    computeMs: row.res_ms,
    createdAt: new Date(row.res_created).toISOString(),
    pointCount: row.res_points,
    get diagramText() {
      text ??= decodedText(run.resultId!, columns, view);
      return text;
    },
    diagram() {
      objects ??= text !== undefined ? (JSON.parse(text) as Diagram) : storedDiagram(columns, view);
      return objects;
    },
    regimesText: row.res_regimes,
  };
}

/**
 * The view's JSON text; for an encoded row, kept in the immutable-result cache as UTF-8 so that
 * pages reading the same result again (the run page reads the preview) do not decode it again.
 */
function decodedText(resultId: number, columns: StoredDiagramColumns, view: ResultView): string {
  if (!columns.blob) return storedDiagramText(columns, view);
  const key = `text:${resultId}:${view}`;
  const hit = cachedBody(key);
  if (hit) return new TextDecoder().decode(hit);
  const text = storedDiagramText(columns, view);
  rememberBody(key, new TextEncoder().encode(text));
  return text;
}

export interface EncodedResult {
  run: RunInfo;
  head: { id: number; engineVersion: string; computeMs: number; createdAt: string; pointCount: number };
  /** UTF-8 of `"viewPoints":n,"diagram":<JSON text>,"regimes":<stored text>` (without braces), ready to splice after the head. */
  tail: Uint8Array;
}

/**
 * The run (checked against the workspace on every call) and its result's JSON text, UTF-8 encoded.
 * With `points` below the view's size the diagram is thinned to about that many points
 * (thinDiagram; `thinned: { from: all stored points, to: kept }`), as GET /api/runs/:id/result?points=
 * serves it. The run and the result's small columns come in one query; the large part comes from
 * the immutable-result cache (one entry per view and budget), or from a second query (and decoding)
 * on a miss.
 */
export async function getEncodedRunResult(workspaceId: string, runId: number, view: ResultView, points?: number): Promise<EncodedResult> {
  if (!Number.isSafeInteger(runId)) throw notFound('run');
  const row = await runQuery(db, workspaceId)
    .leftJoin('results as res', 'res.id', 'r.result_id')
    .andWhere('r.id', runId)
    .first('res.id as res_id', 'res.engine_version as res_engine', 'res.compute_ms as res_ms', 'res.created_at as res_created',
      'res.point_count as res_points', db.raw(view === 'preview' ? 'COALESCE(res.preview_points, res.point_count) as res_view_points' : 'res.point_count as res_view_points'));
  if (!row) throw notFound('run');
  const run = toRunInfo(row);
  if (row.res_id == null) throw conflict(`run ${runId} has no result (it is ${run.status})`);
  const viewPoints = Number(row.res_view_points);
  const thin = points !== undefined && viewPoints > points;
  const key = thin ? `${row.res_id}:${view}:${points}` : `${row.res_id}:${view}`;
  let tail = cachedBody(key);
  if (!tail) {
    const big = await db('results').where({ id: row.res_id }).first(
      db.raw(view === 'preview'
        ? 'CASE WHEN diagram_blob IS NULL THEN COALESCE(preview, diagram) END as d'
        : 'CASE WHEN diagram_blob IS NULL THEN diagram END as d'),
      'diagram_blob as b', 'regimes as g');
    const columns = { blob: big.b, text: big.d };
    if (thin) {
      const thinned = thinDiagram(storedDiagram(columns, view), points);
      const kept = thinned.branches.reduce((n, b) => n + b.points.length, 0);
      tail = new TextEncoder().encode(`"viewPoints":${kept},"diagram":${JSON.stringify({ ...thinned, thinned: { from: Number(row.res_points), to: kept } })},"regimes":${big.g}`);
    } else {
      tail = new TextEncoder().encode(`"viewPoints":${viewPoints},"diagram":${storedDiagramText(columns, view)},"regimes":${big.g}`);
    }
    rememberBody(key, tail);
  }
  return {
    run,
    head: { id: row.res_id, engineVersion: row.res_engine, computeMs: row.res_ms, createdAt: new Date(row.res_created).toISOString(), pointCount: row.res_points },
    tail,
  };
}

/**
 * A stored trace result with this cache key: its id and full diagram as JSON text (the atlas an
 * escape study stands on; reads either stored form, unlike a query of the `diagram` column alone).
 */
export async function findResultDiagram(cacheKey: string): Promise<{ id: number; diagramJson: string } | null> {
  const row = await db('results').where({ cache_key: cacheKey })
    .first('id', db.raw('CASE WHEN diagram_blob IS NULL THEN diagram END as d'), 'diagram_blob as b');
  return row ? { id: row.id, diagramJson: storedDiagramText({ blob: row.b, text: row.d }, 'full') } : null;
}
