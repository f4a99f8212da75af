import { handler, json, parseJson } from '../../../lib/server/http.ts';
import { signInSchema } from '../../../lib/server/auth/schemas.ts';
import { signIn } from '../../../lib/server/auth/service.ts';
import { applyCookie } from '../../../lib/server/auth/cookies.ts';

export const POST = handler(async ({ request, locals, cookies }) => {
  const input = await parseJson(request, signInSchema);
  const { user, cookie } = await signIn(input, locals.clientAddress);
  applyCookie(cookies, cookie);
  return json({ user });
});
