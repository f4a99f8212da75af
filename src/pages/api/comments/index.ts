import { handler, json, parseValue } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { listCommentsQuerySchema } from '../../../lib/server/reviews/schemas.ts';
import { listComments } from '../../../lib/server/reviews/repository.ts';
import { queryObject } from '../../../lib/server/models/route-params.ts';

/** Review comments of the workspace: ?runId=, ?modelId=, ?open=1 (unresolved only) or 0. */
export const GET = handler(async ({ locals, url }) => {
  const { workspace } = requireRole(locals);
  const q = parseValue(queryObject(url), listCommentsQuerySchema);
  const open = q.open === undefined ? undefined : q.open === '1' || q.open === 'true';
  return json({ comments: await listComments(workspace.id, { runId: q.runId, modelId: q.modelId, open }) });
});
