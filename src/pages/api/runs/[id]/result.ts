import { z } from 'zod';
import { handler, parseValue } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getEncodedRunResult } from '../../../../lib/server/results/repository.ts';
import { PREVIEW_POINTS } from '../../../../lib/server/results/preview.ts';
import { idParam, queryObject } from '../../../../lib/server/models/route-params.ts';

const resultQuery = z.object({
  /** Point budget for drawing: the diagram is thinned to about this many points. */
  points: z.coerce.number().int().min(100, 'at least 100').max(1_000_000).optional(),
  /** 'preview': the diagram thinned to PREVIEW_POINTS (src/lib/server/results/preview.ts). */
  view: z.enum(['full', 'preview']).default('full'),
}).strict();

/**
 * One run's diagram and regime labels: { run, result: { id, engineVersion, computeMs, createdAt,
 * pointCount, viewPoints, diagram, regimes: { regimes, escapeGraphs, diagnostics } } }. The
 * diagram's JSON text (decoded once per result and process, then cached; stored text of older rows
 * passed through) is spliced in as is; ?points thins it to about that many points (cached per
 * budget too, results never change); ?view=preview serves the drawing preview (special points and
 * bands complete).
 */
export const GET = handler(async ({ locals, params, url }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const q = parseValue(queryObject(url), resultQuery);
  // A budget at or below the preview's size thins the (much smaller) preview instead of the full diagram.
  const usePreview = q.view === 'preview' || (q.points !== undefined && q.points <= PREVIEW_POINTS);
  const r = await getEncodedRunResult(workspace.id, runId, usePreview ? 'preview' : 'full', q.points);
  const head = new TextEncoder().encode(`{"run":${JSON.stringify(r.run)},"result":{${JSON.stringify(r.head).slice(1, -1)},`);
  const body = new Uint8Array(head.byteLength + r.tail.byteLength + 2);
  body.set(head, 0);
  body.set(r.tail, head.byteLength);
  body.set([0x7d, 0x7d], head.byteLength + r.tail.byteLength); // "}}"
  return new Response(body, { status: 200, headers: { 'Content-Type': 'application/json; charset=utf-8' } });
});
