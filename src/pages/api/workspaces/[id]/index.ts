import { handler, json, notFound, parseJson } from '../../../../lib/server/http.ts';
import { requireWorkspaceRole } from '../../../../lib/server/auth/guards.ts';
import { renameWorkspaceSchema } from '../../../../lib/server/auth/schemas.ts';
import { getWorkspace, renameWorkspace } from '../../../../lib/server/workspaces/repository.ts';

export const GET = handler(async ({ params, locals }) => {
  const { role } = await requireWorkspaceRole(locals, params.id!);
  const workspace = await getWorkspace(params.id!);
  if (!workspace) throw notFound();
  return json({ workspace: { ...workspace, role } });
});

export const PATCH = handler(async ({ params, request, locals }) => {
  const { user } = await requireWorkspaceRole(locals, params.id!, 'owner');
  const input = await parseJson(request, renameWorkspaceSchema);
  return json({ workspace: await renameWorkspace(params.id!, input.name, user.id) });
});
