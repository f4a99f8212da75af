import { handler, json } from '../../../lib/server/http.ts';
import { requireUser } from '../../../lib/server/auth/guards.ts';
import { signOut } from '../../../lib/server/auth/service.ts';
import { applyCookie } from '../../../lib/server/auth/cookies.ts';

export const POST = handler(async ({ locals, cookies }) => {
  requireUser(locals);
  applyCookie(cookies, await signOut(locals.sessionId ?? undefined));
  return json(null, 204);
});
