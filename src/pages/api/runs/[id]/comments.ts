import { handler, json, parseJson } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { commentSchema } from '../../../../lib/server/reviews/schemas.ts';
import { createComment, listComments } from '../../../../lib/server/reviews/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  return json({ comments: await listComments(workspace.id, { runId: idParam(params.id, 'run') }) });
});

/** { target?: { kind: "run" } | { kind: "band" | "special-point", ref }, body }: reviewers and owners. */
export const POST = handler(async ({ locals, params, request }) => {
  const { user, workspace, role } = requireRole(locals, 'owner', 'reviewer');
  const runId = idParam(params.id, 'run');
  const input = await parseJson(request, commentSchema);
  return json({ comment: await createComment(workspace.id, { id: user.id, role }, runId, input) }, 201);
});
