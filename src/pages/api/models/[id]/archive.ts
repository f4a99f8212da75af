import { handler, json, parseJson } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { archiveSchema } from '../../../../lib/server/models/schemas.ts';
import { setArchived } from '../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/** { archived: true | false }. Archived models leave the default list and accept no new versions or runs. */
export const POST = handler(async ({ locals, params, request }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const id = idParam(params.id, 'model');
  const { archived } = await parseJson(request, archiveSchema);
  return json({ model: await setArchived(workspace.id, user.id, id, archived) });
});
