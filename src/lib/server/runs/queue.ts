/**
 * The worker side of the run queue. Every time comparison uses the database clock (NOW(3)), so
 * workers on machines with skewed clocks still agree on when a lease has expired.
 *
 * Life of a run: queued -> (claim) running -> done | failed | cancelled; a running run whose lease
 * expired (its worker died) is claimable again and counts one more attempt; at max_attempts it ends
 * failed with a diagnostic instead.
 */
import type { Knex } from 'knex';
import { db } from '../db.ts';
import { recordAudit } from '../models/audit.ts';
import { resultRow } from '../results/row.ts';
import type { ComputeOutput } from './compute.ts';
import type { RunSettings } from './schemas.ts';

export interface ClaimedRun {
  readonly id: number;
  readonly workspaceId: string;
  readonly modelId: number;
  readonly versionId: number;
  /** 'trace', 'escapes' (settings are then StoredEscapeSettings, src/lib/server/escapes/schema.ts) or 'map' (StoredMapSettings, src/lib/server/maps/schema.ts). */
  readonly kind: string;
  readonly versionHash: string;
  readonly cacheKey: string;
  readonly settings: RunSettings;
  readonly attempt: number;
  readonly documentText: string;
  readonly createdBy: string | null;
  readonly notify: boolean;
}

export interface RunError {
  readonly code: string;
  readonly message: string;
  readonly [k: string]: unknown;
}

const leaseExpiry = (k: Knex, leaseMs: number) => k.raw('DATE_ADD(NOW(3), INTERVAL ? MICROSECOND)', [Math.round(leaseMs * 1000)]);

/**
 * Claims the oldest claimable run of `queue` for `owner`, or returns null. Runs whose lease expired
 * too often are failed on the way. SKIP LOCKED makes concurrent claimers pass over each other's
 * candidate rows instead of waiting, so two workers never get the same run.
 */
export async function claimRun(owner: string, queue: string, leaseMs: number, k: Knex = db): Promise<ClaimedRun | null> {
  for (let guard = 0; guard < 20; guard++) {
    const outcome = await k.transaction(async (trx) => {
      const row = await trx('runs')
        .where('queue', queue)
        .andWhere((w) => w.where('status', 'queued')
          .orWhere((x) => x.where('status', 'running').andWhere('lease_expires_at', '<', trx.raw('NOW(3)'))))
        .orderBy('id', 'asc')
        .limit(1)
        .forUpdate()
        .skipLocked()
        .first();
      if (!row) return { kind: 'none' as const };
      if (row.status === 'running' && row.attempts >= row.max_attempts) {
        const error: RunError = {
          code: 'worker-lost',
          message: `the worker computing this run stopped answering (last: ${row.lease_owner ?? 'unknown'}); gave up after ${row.attempts} attempts`,
          attempts: row.attempts,
        };
        await trx('runs').where({ id: row.id }).update({
          status: 'failed', error: JSON.stringify(error), phrase: 'failed: worker lost', lease_owner: null, lease_expires_at: null,
          finished_at: trx.raw('NOW(3)'),
        });
        await recordAudit(trx, { workspaceId: row.workspace_id, actorId: null, action: 'run.failed', targetType: 'run', targetId: row.id, details: { ...error } });
        return { kind: 'failed' as const, id: row.id as number };
      }
      const reclaimed = row.status === 'running';
      await trx('runs').where({ id: row.id }).update({
        status: 'running',
        attempts: row.attempts + 1,
        lease_owner: owner,
        lease_expires_at: leaseExpiry(trx, leaseMs),
        heartbeat_at: trx.raw('NOW(3)'),
        started_at: row.started_at ?? trx.raw('NOW(3)'),
        progress: 0,
        phrase: reclaimed ? `restarted after a lost worker (attempt ${row.attempts + 1})` : 'starting',
      });
      const version = await trx('model_versions').where({ id: row.model_version_id }).first('document', 'hash');
      const settings = typeof row.settings === 'string' ? JSON.parse(row.settings) : row.settings;
      return {
        kind: 'claimed' as const,
        run: {
          id: row.id, workspaceId: row.workspace_id, modelId: row.model_id, versionId: row.model_version_id,
          kind: row.kind, versionHash: version.hash, cacheKey: row.cache_key, settings, attempt: row.attempts + 1, documentText: version.document,
          createdBy: row.created_by, notify: Boolean(row.notify),
        } satisfies ClaimedRun,
      };
    }, { isolationLevel: 'read committed' });
    if (outcome.kind === 'none') return null;
    if (outcome.kind === 'claimed') return outcome.run;
  }
  return null;
}

/**
 * Writes progress and renews the lease. Returns false when the run is no longer ours (cancelled,
 * or reclaimed by another worker after our lease lapsed): the caller must stop and store nothing.
 */
export async function heartbeat(runId: number, owner: string, leaseMs: number, progress: number, phrase: string, k: Knex = db, detail?: unknown): Promise<boolean> {
  const n = await k('runs').where({ id: runId, lease_owner: owner, status: 'running' }).update({
    progress: Math.min(1, Math.max(0, progress)),
    phrase: phrase.slice(0, 200),
    ...(detail !== undefined ? { progress_detail: JSON.stringify(detail) } : {}),
    heartbeat_at: k.raw('NOW(3)'),
    lease_expires_at: leaseExpiry(k, leaseMs),
  });
  return n === 1;
}

/** A stored result with the run's cache key, if any (another run may have computed it meanwhile). */
export async function findResultId(cacheKey: string, k: Knex = db): Promise<number | null> {
  const row = await k('results').where({ cache_key: cacheKey }).first('id');
  return row ? (row.id as number) : null;
}

/** InnoDB deadlock (1213) or lock wait timeout (1205): the transaction may simply be run again. */
function isRetryableLockError(e: unknown): boolean {
  const errno = (e as { errno?: number })?.errno;
  return errno === 1213 || errno === 1205;
}

/**
 * Stores the result and finishes the run in one transaction. Returns false (and stores nothing)
 * when the run stopped being ours. A result row with the same key written by a concurrent run is
 * reused rather than duplicated (the unique cache key refuses the second insert, which then reads
 * the first). READ COMMITTED keeps two such transactions from deadlocking on gap locks (they did,
 * under REPEATABLE READ, with a locking read of the not-yet-existing key); deadlocks and lock
 * timeouts are retried a few times anyway.
 */
export async function completeRun(run: ClaimedRun, owner: string, out: ComputeOutput | { reuse: number }, engineVersion: string, k: Knex = db): Promise<boolean> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await completeRunOnce(run, owner, out, engineVersion, k);
    } catch (e) {
      if (attempt >= 4 || !isRetryableLockError(e)) throw e;
      await new Promise((r) => setTimeout(r, 50 * attempt + Math.random() * 50));
    }
  }
}

/** The `results` row of a computed trace (without its cache key): src/lib/server/results/row.ts. */
export { resultRow };

/**
 * The row of `table` with this cache key: the one already stored (reused), else `row` inserted under
 * it. When another run stored the same key since the check, InnoDB rolls back just the insert (1062,
 * duplicate key) and theirs is used.
 */
export async function insertOrReuse(trx: Knex | Knex.Transaction, table: string, cacheKey: string, row: Record<string, unknown>): Promise<{ id: number; reused: boolean }> {
  const existing = await trx(table).where({ cache_key: cacheKey }).first('id');
  if (existing) return { id: existing.id, reused: true };
  try {
    const [id] = await trx(table).insert({ cache_key: cacheKey, ...row });
    return { id, reused: false };
  } catch (e) {
    if ((e as { errno?: number }).errno !== 1062) throw e;
    return { id: (await trx(table).where({ cache_key: cacheKey }).first('id')).id, reused: true };
  }
}

async function completeRunOnce(run: ClaimedRun, owner: string, out: ComputeOutput | { reuse: number }, engineVersion: string, k: Knex): Promise<boolean> {
  return k.transaction(async (trx) => {
    const row = await trx('runs').where({ id: run.id }).forUpdate().first('status', 'lease_owner');
    if (!row || row.status !== 'running' || row.lease_owner !== owner) return false;
    const { id: resultId, reused } = 'reuse' in out ? { id: out.reuse, reused: true } : await insertOrReuse(trx, 'results', run.cacheKey, resultRow(out, engineVersion));
    await trx('runs').where({ id: run.id }).update({
      status: 'done', progress: 1, phrase: reused ? 'reused a stored result of identical inputs' : 'finished',
      result_id: resultId, reused, lease_owner: null, lease_expires_at: null, error: null,
      finished_at: trx.raw('NOW(3)'), heartbeat_at: trx.raw('NOW(3)'),
    });
    await recordAudit(trx, { workspaceId: run.workspaceId, actorId: null, action: 'run.done', targetType: 'run', targetId: run.id, details: { resultId, reused, worker: owner } });
    return true;
  }, { isolationLevel: 'read committed' });
}

/**
 * Records a failed attempt. `retry` puts the run back in the queue while attempts remain;
 * otherwise (or when the failure is a property of the input) the run ends failed with `error`.
 * Returns the final status, or null when the run was not ours any more.
 */
export async function failRun(run: ClaimedRun, owner: string, error: RunError, retry: boolean, k: Knex = db): Promise<'queued' | 'failed' | null> {
  return k.transaction(async (trx) => {
    const row = await trx('runs').where({ id: run.id }).forUpdate().first('status', 'lease_owner', 'attempts', 'max_attempts');
    if (!row || row.status !== 'running' || row.lease_owner !== owner) return null;
    const again = retry && row.attempts < row.max_attempts;
    await trx('runs').where({ id: run.id }).update(again
      ? { status: 'queued', lease_owner: null, lease_expires_at: null, phrase: `attempt ${row.attempts} failed, waiting to retry: ${error.message}`.slice(0, 200), error: JSON.stringify(error) }
      : { status: 'failed', lease_owner: null, lease_expires_at: null, phrase: `failed: ${error.message}`.slice(0, 200), error: JSON.stringify(error), finished_at: trx.raw('NOW(3)') });
    if (!again) {
      await recordAudit(trx, { workspaceId: run.workspaceId, actorId: null, action: 'run.failed', targetType: 'run', targetId: run.id, details: { ...error, worker: owner } });
    }
    return again ? 'queued' : 'failed';
  });
}

/** Hands a run back to the queue without counting the attempt (clean worker shutdown). */
export async function releaseRun(run: ClaimedRun, owner: string, k: Knex = db): Promise<void> {
  await k('runs').where({ id: run.id, lease_owner: owner, status: 'running' }).update({
    status: 'queued', lease_owner: null, lease_expires_at: null, progress: 0,
    phrase: 'returned to the queue: its worker was stopped', attempts: k.raw('GREATEST(attempts - 1, 0)'),
  });
}

/** Current status of a run (the worker's cancellation check when a heartbeat fails). */
export async function runStatus(runId: number, k: Knex = db): Promise<string | null> {
  const row = await k('runs').where({ id: runId }).first('status');
  return row ? row.status : null;
}
