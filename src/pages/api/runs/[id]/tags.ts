import { handler, json, parseJson } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { bandTagSchema } from '../../../../lib/server/reviews/schemas.ts';
import { createBandTag, listBandTags } from '../../../../lib/server/reviews/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/** Manual band tags of a run (every member reads them). */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  return json({ tags: await listBandTags(workspace.id, idParam(params.id, 'run')) });
});

/** { from, to, name, colour: "#rrggbb", note? }: modelers and owners. */
export const POST = handler(async ({ locals, params, request }) => {
  const { user, workspace, role } = requireRole(locals, 'owner', 'modeler');
  const runId = idParam(params.id, 'run');
  const input = await parseJson(request, bandTagSchema);
  return json({ tag: await createBandTag(workspace.id, { id: user.id, role }, runId, input) }, 201);
});
