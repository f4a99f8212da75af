import { handler, json, parseJson } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { commentPatchSchema } from '../../../lib/server/reviews/schemas.ts';
import { deleteComment, updateComment } from '../../../lib/server/reviews/repository.ts';
import { idParam } from '../../../lib/server/models/route-params.ts';

/** { body?, resolved? }: the author or an owner edits; modelers may also resolve or reopen. */
export const PATCH = handler(async ({ locals, params, request }) => {
  const { user, workspace, role } = requireRole(locals);
  const id = idParam(params.id, 'comment');
  const patch = await parseJson(request, commentPatchSchema);
  return json({ comment: await updateComment(workspace.id, { id: user.id, role }, id, patch) });
});

export const DELETE = handler(async ({ locals, params }) => {
  const { user, workspace, role } = requireRole(locals);
  await deleteComment(workspace.id, { id: user.id, role }, idParam(params.id, 'comment'));
  return json(null, 204);
});
