import type { Knex } from 'knex';
import { db } from './db.ts';

export interface AuditEntry {
  workspaceId: string | null;
  actorId: string | null;
  /** dotted verb, e.g. "member.role_changed", "invitation.created", "model.version_created" */
  action: string;
  targetType?: string;
  targetId?: string;
  details?: Record<string, unknown>;
}

/** Appends one row to the audit log; pass the transaction so the record commits with the change. */
export async function audit(entry: AuditEntry, trx: Knex | Knex.Transaction = db): Promise<void> {
  await trx('audit_log').insert({
    workspace_id: entry.workspaceId,
    actor_id: entry.actorId,
    action: entry.action,
    target_type: entry.targetType ?? null,
    target_id: entry.targetId ?? null,
    details: entry.details ? JSON.stringify(entry.details) : null,
  });
}

export interface AuditRow {
  id: number;
  action: string;
  actorId: string | null;
  actorName: string | null;
  targetType: string | null;
  targetId: string | null;
  details: Record<string, unknown> | null;
  createdAt: string;
}

export async function listAudit(workspaceId: string, limit = 100): Promise<AuditRow[]> {
  const rows = await db('audit_log as a')
    .leftJoin('users as u', 'u.id', 'a.actor_id')
    .where('a.workspace_id', workspaceId)
    .orderBy('a.id', 'desc')
    .limit(limit)
    .select('a.id', 'a.action', 'a.actor_id', 'u.display_name', 'a.target_type', 'a.target_id', 'a.details', 'a.created_at');
  return rows.map((r) => ({
    id: Number(r.id),
    action: r.action,
    actorId: r.actor_id,
    actorName: r.display_name ?? null,
    targetType: r.target_type,
    targetId: r.target_id,
    details: typeof r.details === 'string' ? JSON.parse(r.details) : r.details,
    createdAt: new Date(r.created_at).toISOString(),
  }));
}
