import { handler, json } from '../../../../lib/server/http.ts';
import { requireUser } from '../../../../lib/server/auth/guards.ts';
import { acceptInvitation } from '../../../../lib/server/workspaces/invitations.ts';

export const POST = handler(async ({ params, locals }) => {
  const user = requireUser(locals);
  const joined = await acceptInvitation(params.token!, user);
  return json({ workspaceId: joined.workspaceId, role: joined.role });
});
