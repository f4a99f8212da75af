/**
 * Deletes expired sessions and spent rate-limit counters, at most once per interval per process,
 * piggy-backing on requests (no timer to keep a process alive). Safe with many processes: the
 * deletes are idempotent.
 */
import { db } from './db.ts';
import { lucia } from './auth/lucia.ts';

const INTERVAL_MS = 60 * 60 * 1000;
const state = { next: Date.now() + 60_000, running: false };

export function maybeHousekeep(now = Date.now()): void {
  if (now < state.next || state.running) return;
  state.running = true;
  state.next = now + INTERVAL_MS;
  Promise.all([lucia.deleteExpiredSessions(), db('rate_limits').where('expire', '<', now).delete()])
    .catch((err) => console.error('[brinkmap] housekeeping failed', err))
    .finally(() => {
      state.running = false;
    });
}
