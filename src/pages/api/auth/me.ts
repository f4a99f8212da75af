import { handler, json } from '../../../lib/server/http.ts';
import { requireUser } from '../../../lib/server/auth/guards.ts';

export const GET = handler(async ({ locals }) => {
  const user = requireUser(locals);
  return json({ user, memberships: locals.memberships, workspace: locals.workspace, role: locals.role });
});
