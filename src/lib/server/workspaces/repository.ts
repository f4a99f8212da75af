/** Workspaces and memberships in MariaDB. */
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { newId } from '../ids.ts';
import { audit } from '../audit.ts';
import { conflict, notFound } from '../http.ts';
import type { Role } from '../auth/roles.ts';

export interface MembershipSummary {
  workspaceId: string;
  workspaceName: string;
  role: Role;
}

export interface Member {
  userId: string;
  email: string;
  displayName: string;
  role: Role;
  joinedAt: string;
}

export interface Workspace {
  id: string;
  name: string;
  createdAt: string;
}

export async function listMemberships(userId: string): Promise<MembershipSummary[]> {
  const rows = await db('memberships as m')
    .join('workspaces as w', 'w.id', 'm.workspace_id')
    .where('m.user_id', userId)
    .orderBy([{ column: 'w.name' }, { column: 'w.id' }])
    .select('w.id', 'w.name', 'm.role');
  return rows.map((r) => ({ workspaceId: r.id, workspaceName: r.name, role: r.role }));
}

export async function roleIn(workspaceId: string, userId: string): Promise<Role | null> {
  const row = await db('memberships').where({ workspace_id: workspaceId, user_id: userId }).first('role');
  return row ? (row.role as Role) : null;
}

export async function getWorkspace(workspaceId: string): Promise<Workspace | null> {
  const row = await db('workspaces').where({ id: workspaceId }).first('id', 'name', 'created_at');
  return row ? { id: row.id, name: row.name, createdAt: new Date(row.created_at).toISOString() } : null;
}

export async function createWorkspace(name: string, ownerId: string): Promise<Workspace> {
  const id = newId();
  await db.transaction(async (trx) => {
    await trx('workspaces').insert({ id, name, created_by: ownerId });
    await trx('memberships').insert({ workspace_id: id, user_id: ownerId, role: 'owner' });
    await audit({ workspaceId: id, actorId: ownerId, action: 'workspace.created', targetType: 'workspace', targetId: id, details: { name } }, trx);
  });
  return (await getWorkspace(id))!;
}

export async function renameWorkspace(workspaceId: string, name: string, actorId: string): Promise<Workspace> {
  await db.transaction(async (trx) => {
    const before = await trx('workspaces').where({ id: workspaceId }).forUpdate().first('name');
    if (!before) throw notFound('No such workspace.');
    await trx('workspaces').where({ id: workspaceId }).update({ name, updated_at: new Date() });
    await audit({ workspaceId, actorId, action: 'workspace.renamed', targetType: 'workspace', targetId: workspaceId, details: { from: before.name, to: name } }, trx);
  });
  return (await getWorkspace(workspaceId))!;
}

export async function listMembers(workspaceId: string): Promise<Member[]> {
  const rows = await db('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where('m.workspace_id', workspaceId)
    .orderByRaw("FIELD(m.role, 'owner', 'modeler', 'reviewer'), u.display_name")
    .select('u.id', 'u.email', 'u.display_name', 'm.role', 'm.created_at');
  return rows.map((r) => ({ userId: r.id, email: r.email, displayName: r.display_name, role: r.role, joinedAt: new Date(r.created_at).toISOString() }));
}

async function ownerCount(trx: Knex.Transaction, workspaceId: string): Promise<number> {
  const rows = await trx('memberships').where({ workspace_id: workspaceId, role: 'owner' }).forUpdate().select('user_id');
  return rows.length;
}

export async function changeRole(workspaceId: string, userId: string, role: Role, actorId: string): Promise<void> {
  await db.transaction(async (trx) => {
    const current = await trx('memberships').where({ workspace_id: workspaceId, user_id: userId }).forUpdate().first('role');
    if (!current) throw notFound('No such member in this workspace.');
    if (current.role === role) return;
    if (current.role === 'owner' && (await ownerCount(trx, workspaceId)) <= 1) {
      throw conflict('A workspace needs at least one owner; make someone else owner first.');
    }
    await trx('memberships').where({ workspace_id: workspaceId, user_id: userId }).update({ role });
    await audit({ workspaceId, actorId, action: 'member.role_changed', targetType: 'user', targetId: userId, details: { from: current.role, to: role } }, trx);
  });
}

export async function removeMember(workspaceId: string, userId: string, actorId: string): Promise<void> {
  await db.transaction(async (trx) => {
    const current = await trx('memberships').where({ workspace_id: workspaceId, user_id: userId }).forUpdate().first('role');
    if (!current) throw notFound('No such member in this workspace.');
    if (current.role === 'owner' && (await ownerCount(trx, workspaceId)) <= 1) {
      throw conflict('A workspace needs at least one owner; make someone else owner first.');
    }
    await trx('memberships').where({ workspace_id: workspaceId, user_id: userId }).delete();
    await audit({ workspaceId, actorId, action: 'member.removed', targetType: 'user', targetId: userId, details: { role: current.role } }, trx);
  });
}
