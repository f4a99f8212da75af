import { handler, json, parseJson } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { listSlices, startSlice, toSliceInfo } from '../../../../lib/server/maps/slices.ts';
import { startSliceSchema } from '../../../../lib/server/maps/schema.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/**
 * Slices of a map run (docs/maps.md, "From the map back to one parameter"): the one-parameter
 * diagrams computed at values of the map's second parameter, as trace runs of the same model version
 * with that parameter overridden. GET: any member, { slices: [{ id, value, status, progress, phrase }] }.
 * A run that is not a map: 409; another workspace's: 404.
 */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  return json({ slices: await listSlices(workspace.id, idParam(params.id, 'run')) });
});

/**
 * POST { value }: the slice at that value, started (201) or the one already queued, running or done
 * (200, `cached: true`). Modelers and owners (it starts a computation, as POST /api/runs does);
 * a value outside the map's range: 400 naming `value`.
 */
export const POST = handler(async ({ locals, params, request }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const runId = idParam(params.id, 'run');
  const { value } = await parseJson(request, startSliceSchema);
  const { run, cached } = await startSlice(workspace.id, user.id, runId, value);
  return json({ slice: toSliceInfo(run), run, cached }, cached ? 200 : 201);
});
