import { handler, json } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { requireRun } from '../../../../lib/server/runs/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  return json({ run: await requireRun(workspace.id, idParam(params.id, 'run')) });
});
