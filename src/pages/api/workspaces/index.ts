import { handler, json, parseJson } from '../../../lib/server/http.ts';
import { requireUser } from '../../../lib/server/auth/guards.ts';
import { createWorkspaceSchema } from '../../../lib/server/auth/schemas.ts';
import { createWorkspace } from '../../../lib/server/workspaces/repository.ts';

/** The caller's workspaces with the role in each. */
export const GET = handler(async ({ locals }) => {
  requireUser(locals);
  return json({ workspaces: locals.memberships.map((m) => ({ id: m.workspaceId, name: m.workspaceName, role: m.role })) });
});

/** Any signed-in person may start a workspace; they become its owner. */
export const POST = handler(async ({ request, locals }) => {
  const user = requireUser(locals);
  const input = await parseJson(request, createWorkspaceSchema);
  const workspace = await createWorkspace(input.name, user.id);
  return json({ workspace: { ...workspace, role: 'owner' } }, 201);
});
