/**
 * THE ROLE MATRIX: one row per (API route, method) with the status each kind of caller must get.
 * tests/integration/route-matrix.test.ts runs every row against the test server and also fails when
 * a route file under src/pages/api/ exports a method that has no row here.
 *
 * Callers:
 *   signedOut  no session
 *   outsider   signed in, owner of ANOTHER workspace (B) — must get 404 for anything of workspace A
 *   owner / modeler / reviewer   members of workspace A, the workspace the path points into
 *
 * To add your routes: append rows to `routeMatrix` (or to a file of your own that you spread in at the
 * bottom, e.g. `...modelRoutes` from './route-matrix-models.ts'). `prepare` runs before EACH caller's
 * request, so destructive calls (DELETE, state changes) get a fresh resource every time; whatever it
 * returns arrives as `v` in `path` and `body`.
 */
import type { Client, WorkspaceFixture } from './helpers.ts';
import { serviceRoutes } from './route-matrix-service.ts';
import { editorRoutes } from './route-matrix-editor.ts';
import { compareRoutes } from './route-matrix-compare.ts';
import { escapeRoutes } from './route-matrix-escapes.ts';
import { mapRoutes } from './route-matrix-maps.ts';

export type Caller = 'signedOut' | 'outsider' | 'owner' | 'modeler' | 'reviewer';
export type Vars = Record<string, string>;

export interface MatrixContext {
  /** Workspace A: the one every path points into. */
  a: WorkspaceFixture;
  /** Workspace B: its owner is the outsider. */
  b: WorkspaceFixture;
}

export interface RouteCase {
  /** Route as its file names it under src/pages/api, e.g. '/api/workspaces/[id]/members'. */
  route: string;
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Concrete path into workspace A (add `?workspace=${ctx.a.workspaceId}` for active-workspace routes). */
  path: (ctx: MatrixContext, v: Vars) => string;
  /** JSON body; must be VALID input, so that the status shows the authorization decision. */
  body?: (ctx: MatrixContext, v: Vars, caller: Caller) => unknown;
  /** Runs before each caller's request; e.g. creates a fresh resource in workspace A. */
  prepare?: (ctx: MatrixContext, caller: Caller) => Promise<Vars>;
  /** Expected status per caller. */
  expect: Record<Caller, number>;
  /** Why the row looks the way it does, when not obvious. */
  note?: string;
}

/** Shorthand for the usual expectation: listed roles get `ok`, other members 403, outsider 404, signed-out 401. */
export function allow(ok: number, ...roles: ('owner' | 'modeler' | 'reviewer')[]): Record<Caller, number> {
  const r = (role: 'owner' | 'modeler' | 'reviewer') => (roles.includes(role) ? ok : 403);
  return { signedOut: 401, outsider: 404, owner: r('owner'), modeler: r('modeler'), reviewer: r('reviewer') };
}

export const ALL_ROLES = ['owner', 'modeler', 'reviewer'] as const;

let n = 0;
const unique = () => `matrix-${Date.now().toString(36)}-${++n}@test.brinkmap.invalid`;

async function freshMemberOfA(ctx: MatrixContext): Promise<Vars> {
  const { addMember } = await import('./helpers.ts');
  const c: Client = await addMember(ctx.a.workspaceId, 'reviewer');
  return { userId: c.user!.id };
}

async function freshInvitationOfA(ctx: MatrixContext): Promise<Vars> {
  const res = await ctx.a.owner.post(`/api/workspaces/${ctx.a.workspaceId}/invitations`, { email: unique(), role: 'reviewer' });
  if (res.status !== 201) throw new Error(`prepare invitation: ${res.status} ${res.text}`);
  return { invitationId: res.body.invitation.id };
}

export const routeMatrix: RouteCase[] = [
  // --- public ---
  {
    route: '/api/health', method: 'GET', path: () => '/api/health',
    expect: { signedOut: 200, outsider: 200, owner: 200, modeler: 200, reviewer: 200 },
  },
  {
    route: '/api/auth/sign-up', method: 'POST', path: () => '/api/auth/sign-up',
    body: () => ({ email: 'not-an-address', password: 'x', displayName: '' }),
    expect: { signedOut: 400, outsider: 400, owner: 400, modeler: 400, reviewer: 400 },
    note: 'public; invalid body on purpose so the matrix creates no accounts (sign-up has its own tests)',
  },
  {
    route: '/api/auth/sign-in', method: 'POST', path: () => '/api/auth/sign-in',
    body: () => ({ email: 'nobody' }),
    expect: { signedOut: 400, outsider: 400, owner: 400, modeler: 400, reviewer: 400 },
    note: 'public; invalid body on purpose (sign-in has its own tests)',
  },
  // --- signed in, no workspace role needed ---
  {
    route: '/api/auth/me', method: 'GET', path: () => '/api/auth/me',
    expect: { signedOut: 401, outsider: 200, owner: 200, modeler: 200, reviewer: 200 },
  },
  {
    route: '/api/auth/sign-out', method: 'POST', path: () => '/api/auth/sign-out',
    expect: { signedOut: 401, outsider: 204, owner: 204, modeler: 204, reviewer: 204 },
    note: 'the runner re-signs-in after a sign-out row (see route-matrix.test.ts)',
  },
  {
    route: '/api/auth/password', method: 'POST', path: () => '/api/auth/password',
    body: () => ({ currentPassword: 'wrong-on-purpose', newPassword: 'a-new-password-1' }),
    expect: { signedOut: 401, outsider: 400, owner: 400, modeler: 400, reviewer: 400 },
    note: 'wrong current password on purpose: nobody\'s password changes; success is tested in auth.test.ts',
  },
  {
    route: '/api/workspaces', method: 'GET', path: () => '/api/workspaces',
    expect: { signedOut: 401, outsider: 200, owner: 200, modeler: 200, reviewer: 200 },
  },
  {
    route: '/api/workspaces', method: 'POST', path: () => '/api/workspaces', body: () => ({ name: 'Matrix side workspace' }),
    expect: { signedOut: 401, outsider: 201, owner: 201, modeler: 201, reviewer: 201 },
    note: 'anyone signed in may start a workspace of their own',
  },
  {
    route: '/api/invitations/[token]/accept', method: 'POST', path: () => '/api/invitations/AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA/accept',
    expect: { signedOut: 401, outsider: 404, owner: 404, modeler: 404, reviewer: 404 },
    note: 'unknown token → 404 for everyone signed in; the happy path is in invitations.test.ts',
  },
  // --- workspace A ---
  {
    route: '/api/workspaces/[id]', method: 'GET', path: (c) => `/api/workspaces/${c.a.workspaceId}`,
    expect: allow(200, ...ALL_ROLES),
  },
  {
    route: '/api/workspaces/[id]', method: 'PATCH', path: (c) => `/api/workspaces/${c.a.workspaceId}`, body: () => ({ name: 'Workspace A' }),
    expect: allow(200, 'owner'),
  },
  {
    route: '/api/workspaces/[id]/members', method: 'GET', path: (c) => `/api/workspaces/${c.a.workspaceId}/members`,
    expect: allow(200, ...ALL_ROLES),
  },
  {
    route: '/api/workspaces/[id]/members/[userId]', method: 'PATCH', prepare: freshMemberOfA,
    path: (c, v) => `/api/workspaces/${c.a.workspaceId}/members/${v.userId}`, body: () => ({ role: 'modeler' }),
    expect: allow(200, 'owner'),
  },
  {
    route: '/api/workspaces/[id]/members/[userId]', method: 'DELETE', prepare: freshMemberOfA,
    path: (c, v) => `/api/workspaces/${c.a.workspaceId}/members/${v.userId}`,
    expect: allow(204, 'owner'),
  },
  {
    route: '/api/workspaces/[id]/invitations', method: 'GET', path: (c) => `/api/workspaces/${c.a.workspaceId}/invitations`,
    expect: allow(200, 'owner'),
  },
  {
    route: '/api/workspaces/[id]/invitations', method: 'POST', path: (c) => `/api/workspaces/${c.a.workspaceId}/invitations`,
    body: () => ({ email: unique(), role: 'reviewer' }),
    expect: allow(201, 'owner'),
  },
  {
    route: '/api/workspaces/[id]/invitations/[invitationId]', method: 'DELETE', prepare: freshInvitationOfA,
    path: (c, v) => `/api/workspaces/${c.a.workspaceId}/invitations/${v.invitationId}`,
    expect: allow(204, 'owner'),
  },
  {
    route: '/api/workspaces/[id]/audit', method: 'GET', path: (c) => `/api/workspaces/${c.a.workspaceId}/audit`,
    expect: allow(200, 'owner'),
  },
  {
    route: '/api/dev/mail', method: 'GET', path: (c) => `/api/dev/mail?workspace=${c.a.workspaceId}`,
    expect: allow(200, 'owner'),
    note: 'active-workspace route: the outsider names workspace A and is not a member → 404',
  },
  // Other engineers: spread your rows in here, e.g. ...modelRoutes,
  ...serviceRoutes,
  ...editorRoutes,
  ...compareRoutes,
  ...escapeRoutes,
  ...mapRoutes,
];
