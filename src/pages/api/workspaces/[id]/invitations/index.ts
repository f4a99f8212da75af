import { handler, json, parseJson } from '../../../../../lib/server/http.ts';
import { requireWorkspaceRole } from '../../../../../lib/server/auth/guards.ts';
import { inviteSchema } from '../../../../../lib/server/auth/schemas.ts';
import { createInvitation, listInvitations } from '../../../../../lib/server/workspaces/invitations.ts';

export const GET = handler(async ({ params, locals }) => {
  await requireWorkspaceRole(locals, params.id!, 'owner');
  return json({ invitations: await listInvitations(params.id!) });
});

export const POST = handler(async ({ params, request, locals }) => {
  const { user } = await requireWorkspaceRole(locals, params.id!, 'owner');
  const input = await parseJson(request, inviteSchema);
  const invitation = await createInvitation({ workspaceId: params.id!, email: input.email, role: input.role, invitedBy: user });
  return json({ invitation }, 201);
});
