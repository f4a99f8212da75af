import { handler, json } from '../../../../../lib/server/http.ts';
import { requireWorkspaceRole } from '../../../../../lib/server/auth/guards.ts';
import { listMembers } from '../../../../../lib/server/workspaces/repository.ts';

export const GET = handler(async ({ params, locals }) => {
  await requireWorkspaceRole(locals, params.id!);
  return json({ members: await listMembers(params.id!) });
});
