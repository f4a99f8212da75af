import { handler, json, parseJson, parseValue } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { listRunsQuerySchema, startRunSchema } from '../../../lib/server/runs/schemas.ts';
import { listRuns, startRun } from '../../../lib/server/runs/repository.ts';
import { queryObject } from '../../../lib/server/models/route-params.ts';

/** Runs of the active workspace, newest first: ?modelId=, ?status=, ?kind= (trace | escapes), ?page=, ?pageSize=. */
export const GET = handler(async ({ locals, url }) => {
  const { workspace } = requireRole(locals);
  const q = parseValue(queryObject(url), listRunsQuerySchema);
  return json(await listRuns(workspace.id, q));
});

/**
 * Start a run: { modelId, version?, kind? ('trace' default, or 'escapes': docs/noise.md), settings?, notify? }. 201 with the run, queued for a worker, or
 * already done when a stored result of identical inputs exists (`reused: true`).
 */
export const POST = handler(async ({ locals, request }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const input = await parseJson(request, startRunSchema);
  const run = await startRun(workspace.id, user.id, input);
  return json({ run }, 201);
});
