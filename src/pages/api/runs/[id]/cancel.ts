import { handler, json } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { cancelRun } from '../../../../lib/server/runs/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/** Cancel a queued or running run (409 when it has already ended). */
export const POST = handler(async ({ locals, params }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  return json({ run: await cancelRun(workspace.id, user.id, idParam(params.id, 'run')) });
});
