import { z } from 'zod';
import { handler, json, parseValue } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunResult } from '../../../../lib/server/results/repository.ts';
import { thinDiagram } from '../../../../lib/server/results/thin.ts';
import { idParam, queryObject } from '../../../../lib/server/models/route-params.ts';

const resultQuery = z.object({
  /** Point budget for drawing: the diagram is thinned to about this many points. */
  points: z.coerce.number().int().min(100, 'at least 100').max(1_000_000).optional(),
}).strict();

/**
 * One run's diagram and regime labels: { run, result: { id, engineVersion, computeMs, createdAt,
 * diagram, regimes: { regimes, escapeGraphs, diagnostics } } }. Without ?points the stored JSON text
 * is passed through as is (no parse, no re-encode).
 */
export const GET = handler(async ({ locals, params, url }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const q = parseValue(queryObject(url), resultQuery);
  const r = await getRunResult(workspace.id, runId);
  const head = { id: r.resultId, engineVersion: r.engineVersion, computeMs: r.computeMs, createdAt: r.createdAt, pointCount: r.pointCount };
  if (q.points !== undefined && r.pointCount > q.points) {
    const diagram = thinDiagram(JSON.parse(r.diagramText), q.points);
    return json({ run: r.run, result: { ...head, diagram, regimes: JSON.parse(r.regimesText) } });
  }
  const body = `{"run":${JSON.stringify(r.run)},"result":{${JSON.stringify(head).slice(1, -1)},"diagram":${r.diagramText},"regimes":${r.regimesText}}}`;
  return new Response(body, { status: 200, headers: { 'Content-Type': 'application/json; charset=utf-8' } });
});
