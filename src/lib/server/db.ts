/**
 * The application's single knex instance (one connection pool per process). Everything server-side
 * that talks to MariaDB imports `db` from here; nothing else creates a pool. Knex connects lazily,
 * so importing this module opens no connection.
 */
import knexFactory, { type Knex } from 'knex';
import { knexConfig } from './db-config.ts';

const globalKey = Symbol.for('brinkmap.db');
type Holder = { [globalKey]?: Knex };
const holder = globalThis as Holder;

// Kept on globalThis so Vite's dev-mode module reloads reuse one pool instead of leaking one per edit.
export const db: Knex = (holder[globalKey] ??= knexFactory(knexConfig()));

/** Closes the pool (end of a test file, a script, graceful shutdown). `db` is unusable afterwards. */
export async function closeDb(): Promise<void> {
  if (holder[globalKey]) {
    delete holder[globalKey];
    await db.destroy();
  }
}
