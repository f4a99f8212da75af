/**
 * The service's audit calls, routed through the foundation's audit helper inside the same
 * transaction as the change, so a change and its record commit (or roll back) together.
 */
import type { Knex } from 'knex';
import { audit } from '../audit.ts';

export interface ServiceAuditEntry {
  readonly workspaceId: string;
  readonly actorId: string | null;
  readonly action: string;
  readonly targetType: string;
  readonly targetId: string | number;
  readonly details?: Record<string, unknown>;
}

export async function recordAudit(trx: Knex | Knex.Transaction, entry: ServiceAuditEntry): Promise<void> {
  await audit({ ...entry, targetId: String(entry.targetId) }, trx);
}
