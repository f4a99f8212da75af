import { handler, json, parseJson } from '../../../lib/server/http.ts';
import { signUpSchema } from '../../../lib/server/auth/schemas.ts';
import { signUp } from '../../../lib/server/auth/service.ts';
import { applyCookie } from '../../../lib/server/auth/cookies.ts';

export const POST = handler(async ({ request, locals, cookies }) => {
  const input = await parseJson(request, signUpSchema);
  const { user, cookie } = await signUp(input, locals.clientAddress);
  applyCookie(cookies, cookie);
  return json({ user }, 201);
});
