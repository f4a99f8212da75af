import { handler, json } from '../../../../lib/server/http.ts';
import { requireWorkspaceRole } from '../../../../lib/server/auth/guards.ts';
import { listAudit } from '../../../../lib/server/audit.ts';

/** Who changed what in the workspace, newest first; owners only. */
export const GET = handler(async ({ params, locals }) => {
  await requireWorkspaceRole(locals, params.id!, 'owner');
  return json({ entries: await listAudit(params.id!) });
});
