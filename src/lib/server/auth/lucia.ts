/**
 * lucia 3 sessions stored in MariaDB through @lucia-auth/adapter-mysql, driven over the app's single
 * knex pool (the adapter only needs `query`/`execute` returning mysql2-style `[rows]`).
 */
import { Lucia, TimeSpan } from 'lucia';
import { Mysql2Adapter } from '@lucia-auth/adapter-mysql';
import { db } from '../db.ts';
import { serverEnv } from '../env.ts';

const overKnex = {
  async query(sql: string, args: unknown[]) {
    const [rows] = (await db.raw(sql, args as never[])) as unknown as [unknown[]];
    return [rows];
  },
  async execute(sql: string, args: unknown[]) {
    const [rows] = (await db.raw(sql, args as never[])) as unknown as [unknown];
    return [rows];
  },
};

const adapter = new Mysql2Adapter(overKnex as never, { user: 'users', session: 'sessions' });

export const SESSION_COOKIE = 'bm_session';

export const lucia = new Lucia(adapter, {
  sessionExpiresIn: new TimeSpan(14, 'd'),
  sessionCookie: {
    name: SESSION_COOKIE,
    expires: true,
    attributes: {
      // Follows the configured origin, not NODE_ENV: plain-http loopback works, https deployments stay Secure.
      secure: serverEnv().secureCookies,
      sameSite: 'lax',
      path: '/',
    },
  },
  getUserAttributes(attributes) {
    return { email: attributes.email, displayName: attributes.display_name };
  },
});

declare module 'lucia' {
  interface Register {
    Lucia: typeof lucia;
    DatabaseUserAttributes: { email: string; display_name: string };
  }
}
