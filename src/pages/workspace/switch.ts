import type { APIRoute } from 'astro';
import { WORKSPACE_COOKIE } from '../../lib/server/workspaces/cookie.ts';
import { formObject, HttpError, parseValue } from '../../lib/server/http.ts';
import { switchWorkspaceSchema } from '../../lib/server/auth/schemas.ts';
import { serverEnv } from '../../lib/server/env.ts';
import { safeNext } from '../../lib/server/forms.ts';

/** The workspace switcher's form: remembers the chosen workspace (if a member) in a cookie. */
export const POST: APIRoute = async ({ request, locals, cookies, redirect }) => {
  try {
    const input = parseValue(await formObject(request), switchWorkspaceSchema);
    if (!locals.memberships.some((m) => m.workspaceId === input.workspaceId)) {
      return new Response('Not a member of that workspace.', { status: 404 });
    }
    cookies.set(WORKSPACE_COOKIE, input.workspaceId, { path: '/', httpOnly: true, sameSite: 'lax', secure: serverEnv().secureCookies, maxAge: 365 * 24 * 3600 });
    return redirect(safeNext(input.next), 303);
  } catch (err) {
    if (err instanceof HttpError) return new Response(err.message, { status: err.status });
    throw err;
  }
};
