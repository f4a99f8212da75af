/**
 * Every request: resolve the lucia session, the user's memberships and the active workspace onto
 * Astro.locals; send signed-out visitors of private pages to /sign-in and answer private API calls
 * with 401 JSON. Routes still check roles themselves (src/lib/server/auth/guards.ts).
 */
import { defineMiddleware } from 'astro:middleware';
import { lucia } from './lib/server/auth/lucia.ts';
import { clientAddress } from './lib/server/auth/client-address.ts';
import { listMemberships } from './lib/server/workspaces/repository.ts';
import { jsonError, statusText } from './lib/server/http.ts';
import { maybeHousekeep } from './lib/server/housekeeping.ts';

import { WORKSPACE_COOKIE } from './lib/server/workspaces/cookie.ts';

const PUBLIC_PAGES = [/^\/sign-in\/?$/, /^\/sign-up\/?$/, /^\/invitations\/[^/]+\/?$/, /^\/favicon\.(svg|ico)$/, /^\/_astro\//, /^\/fonts\//];
const PUBLIC_API = [/^\/api\/auth\/sign-in\/?$/, /^\/api\/auth\/sign-up\/?$/, /^\/api\/health\/?$/];

export const onRequest = defineMiddleware(async (context, next) => {
  const { locals, cookies, url, request } = context;
  let socketAddress: string | undefined;
  try {
    socketAddress = context.clientAddress;
  } catch {
    socketAddress = undefined;
  }
  locals.clientAddress = clientAddress(request, socketAddress);
  locals.user = null;
  locals.sessionId = null;
  locals.memberships = [];
  locals.workspace = null;
  locals.role = null;

  maybeHousekeep();
  const sessionId = cookies.get(lucia.sessionCookieName)?.value ?? null;
  if (sessionId) {
    const { session, user } = await lucia.validateSession(sessionId);
    if (session && session.fresh) {
      const c = lucia.createSessionCookie(session.id);
      cookies.set(c.name, c.value, c.attributes);
    }
    if (!session) {
      const c = lucia.createBlankSessionCookie();
      cookies.set(c.name, c.value, c.attributes);
    }
    if (session && user) {
      locals.user = { id: user.id, email: user.email, displayName: user.displayName };
      locals.sessionId = session.id;
    }
  }

  if (locals.user) {
    locals.memberships = await listMemberships(locals.user.id);
    const explicit = url.searchParams.get('workspace') ?? request.headers.get('x-workspace');
    const remembered = cookies.get(WORKSPACE_COOKIE)?.value;
    let chosen = explicit ? locals.memberships.find((m) => m.workspaceId === explicit) : undefined;
    if (!explicit) {
      chosen = locals.memberships.find((m) => m.workspaceId === remembered) ?? locals.memberships[0];
    }
    if (chosen) {
      locals.workspace = { id: chosen.workspaceId, name: chosen.workspaceName };
      locals.role = chosen.role;
    }
  }

  const path = url.pathname;
  const isApi = path.startsWith('/api/');
  if (!locals.user) {
    if (isApi && !PUBLIC_API.some((re) => re.test(path))) {
      return jsonError(401, 'unauthenticated', 'Sign in first.');
    }
    if (!isApi && !PUBLIC_PAGES.some((re) => re.test(path))) {
      const nextPath = path + url.search;
      return withStatusText(context.redirect(`/sign-in${nextPath === '/' ? '' : `?next=${encodeURIComponent(nextPath)}`}`, 303));
    }
  }

  const response = await next();
  try {
    response.headers.set('X-Content-Type-Options', 'nosniff');
    response.headers.set('Referrer-Policy', 'same-origin');
    response.headers.set('X-Frame-Options', 'DENY');
    if (isApi && !response.headers.has('Cache-Control')) response.headers.set('Cache-Control', 'no-store');
  } catch {
    // Responses built by Response.redirect() have immutable headers; they carry no content anyway.
  }
  return withStatusText(response);
});

/**
 * Pages that set Astro.response.status keep Astro's "OK" ("HTTP/1.1 404 OK") and redirects leave the
 * reason phrase empty; the Node adapter copies either onto the status line. Give it the standard text.
 */
function withStatusText(response: Response): Response {
  const text = statusText(response.status);
  if (!text || response.statusText === text) return response;
  return new Response(response.body, { status: response.status, statusText: text, headers: response.headers });
}
