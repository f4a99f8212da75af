import { handler, json, parseJson } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { updateModelSchema } from '../../../../lib/server/models/schemas.ts';
import { requireModel, updateModelMeta } from '../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  return json({ model: await requireModel(workspace.id, idParam(params.id, 'model')) });
});

/** Name, description and tags only: the document changes through a new version. */
export const PATCH = handler(async ({ locals, params, request }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const id = idParam(params.id, 'model');
  const patch = await parseJson(request, updateModelSchema);
  return json({ model: await updateModelMeta(workspace.id, user.id, id, patch) });
});
