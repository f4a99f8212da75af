import { handler, json, parseJson } from '../../../lib/server/http.ts';
import { requireUser } from '../../../lib/server/auth/guards.ts';
import { changePasswordSchema } from '../../../lib/server/auth/schemas.ts';
import { changePassword } from '../../../lib/server/auth/service.ts';
import { applyCookie } from '../../../lib/server/auth/cookies.ts';

export const POST = handler(async ({ request, locals, cookies }) => {
  const user = requireUser(locals);
  const input = await parseJson(request, changePasswordSchema);
  applyCookie(cookies, await changePassword(user.id, input));
  return json(null, 204);
});
