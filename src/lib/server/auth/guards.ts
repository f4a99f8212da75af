/**
 * Authorization helpers for API routes and pages. Call one at the top of every handler.
 *
 *   const { user, workspace, role } = requireRole(locals, 'owner', 'modeler');   // active workspace
 *   const { role } = await requireWorkspaceRole(locals, params.id!, 'owner');     // workspace in the path
 *
 * Not signed in → 401. Not a member of the workspace (or it does not exist) → 404, so nobody learns
 * that another workspace's resource exists. Member with a role not listed → 403.
 */
import type { Role } from './roles.ts';
import { forbidden, notFound, unauthorized } from '../http.ts';
import { roleIn, getWorkspace } from '../workspaces/repository.ts';

export function requireUser(locals: App.Locals): App.User {
  if (!locals.user) throw unauthorized();
  return locals.user;
}

/** The active workspace (from ?workspace=, the X-Workspace header or the cookie) with one of `roles`. */
export function requireRole(locals: App.Locals, ...roles: Role[]): { user: App.User; workspace: App.ActiveWorkspace; role: Role } {
  const user = requireUser(locals);
  if (!locals.workspace || !locals.role) throw notFound('No such workspace, or you are not a member of it.');
  if (roles.length && !roles.includes(locals.role)) throw forbidden(`This needs the role ${roles.join(' or ')}; you are ${locals.role}.`);
  return { user, workspace: locals.workspace, role: locals.role };
}

/** A specific workspace (e.g. the one a resource belongs to) with one of `roles`; DB-checked. */
export async function requireWorkspaceRole(locals: App.Locals, workspaceId: string, ...roles: Role[]): Promise<{ user: App.User; role: Role }> {
  const user = requireUser(locals);
  const cached = locals.memberships.find((m) => m.workspaceId === workspaceId)?.role;
  const role = cached ?? (await roleIn(workspaceId, user.id));
  if (!role) throw notFound('No such workspace, or you are not a member of it.');
  if (roles.length && !roles.includes(role)) throw forbidden(`This needs the role ${roles.join(' or ')}; you are ${role}.`);
  return { user, role };
}

export { getWorkspace };
