import type { APIRoute } from 'astro';
import { db } from '../../lib/server/db.ts';
import { json } from '../../lib/server/http.ts';

// Liveness for scripts and load balancers: answers 200 when the database answers.
export const GET: APIRoute = async () => {
  try {
    await db.raw('SELECT 1');
    return json({ ok: true, database: 'up' });
  } catch {
    return json({ ok: false, database: 'down' }, 503);
  }
};
