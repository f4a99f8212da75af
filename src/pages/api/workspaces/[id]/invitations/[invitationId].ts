import { handler, json } from '../../../../../lib/server/http.ts';
import { requireWorkspaceRole } from '../../../../../lib/server/auth/guards.ts';
import { revokeInvitation } from '../../../../../lib/server/workspaces/invitations.ts';

export const DELETE = handler(async ({ params, locals }) => {
  const { user } = await requireWorkspaceRole(locals, params.id!, 'owner');
  await revokeInvitation(params.id!, params.invitationId!, user.id);
  return json(null, 204);
});
