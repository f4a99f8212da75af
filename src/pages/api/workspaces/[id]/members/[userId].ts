import { handler, json, parseJson } from '../../../../../lib/server/http.ts';
import { requireWorkspaceRole } from '../../../../../lib/server/auth/guards.ts';
import { changeRoleSchema } from '../../../../../lib/server/auth/schemas.ts';
import { changeRole, removeMember } from '../../../../../lib/server/workspaces/repository.ts';

export const PATCH = handler(async ({ params, request, locals }) => {
  const { user } = await requireWorkspaceRole(locals, params.id!, 'owner');
  const input = await parseJson(request, changeRoleSchema);
  await changeRole(params.id!, params.userId!, input.role, user.id);
  return json({ member: { userId: params.userId, role: input.role } });
});

export const DELETE = handler(async ({ params, locals }) => {
  const { user } = await requireWorkspaceRole(locals, params.id!, 'owner');
  await removeMember(params.id!, params.userId!, user.id);
  return json(null, 204);
});
