import { handler, json, parseJson } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { bandTagPatchSchema } from '../../../lib/server/reviews/schemas.ts';
import { deleteBandTag, updateBandTag } from '../../../lib/server/reviews/repository.ts';
import { idParam } from '../../../lib/server/models/route-params.ts';

/** The author (a modeler) or an owner. */
export const PATCH = handler(async ({ locals, params, request }) => {
  const { user, workspace, role } = requireRole(locals, 'owner', 'modeler');
  const id = idParam(params.id, 'band tag');
  const patch = await parseJson(request, bandTagPatchSchema);
  return json({ tag: await updateBandTag(workspace.id, { id: user.id, role }, id, patch) });
});

export const DELETE = handler(async ({ locals, params }) => {
  const { user, workspace, role } = requireRole(locals, 'owner', 'modeler');
  await deleteBandTag(workspace.id, { id: user.id, role }, idParam(params.id, 'band tag'));
  return json(null, 204);
});
