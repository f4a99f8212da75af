/**
 * Helpers for integration tests: they talk HTTP to the running test server (BASE_URL, started by
 * scripts/test.sh) and read the test database directly to check what was (not) written.
 *
 *   const owner = await signedUpClient();                  // fresh account, signed in
 *   const res = await owner.post('/api/workspaces', { name: 'X' });
 *   expect(res.status).toBe(201); res.body.workspace.id
 *   const ws = await workspaceWithRoles();                 // owner + modeler + reviewer of one workspace
 *   await ws.modeler.get(`/api/...`)
 */
import { randomBytes } from 'node:crypto';
import { db } from '../../src/lib/server/db.ts';
import type { Role } from '../../src/lib/server/auth/roles.ts';

export const BASE_URL = (process.env.TEST_BASE_URL ?? 'http://127.0.0.1:4322').replace(/\/$/, '');
export { db };

export interface HttpResult<T = any> {
  status: number;
  /** The reason phrase of the status line ("Bad Request"). */
  statusText: string;
  headers: Headers;
  /** Parsed JSON when the response is JSON, else null. */
  body: T;
  text: string;
}

export interface RequestOptions {
  json?: unknown;
  /** Sent as application/x-www-form-urlencoded (like a browser form). */
  form?: Record<string, string>;
  /** Raw body string with the given headers (for malformed input tests). */
  raw?: string;
  headers?: Record<string, string>;
}

let counter = 0;
/** A unique address per call, e.g. "t-4f1a2b-3@test.brinkmap.invalid". */
export function uniqueEmail(prefix = 't'): string {
  counter += 1;
  return `${prefix}-${randomBytes(3).toString('hex')}-${counter}@test.brinkmap.invalid`;
}

/** A fake client address (the test server runs with TRUST_PROXY=1), so rate limits stay per test. */
export function uniqueAddress(): string {
  const b = randomBytes(3);
  return `10.${b[0]}.${b[1]}.${b[2]}`;
}

/** A cookie-keeping HTTP client, like one browser. Sends Origin so Astro's origin check passes form posts. */
export class Client {
  readonly cookies = new Map<string, string>();
  user: { id: string; email: string; displayName: string } | null = null;
  password: string | null = null;

  constructor(readonly address: string = uniqueAddress()) {}

  async request<T = any>(method: string, path: string, options: RequestOptions = {}): Promise<HttpResult<T>> {
    const headers: Record<string, string> = { 'x-forwarded-for': this.address, origin: BASE_URL, ...options.headers };
    let body: string | undefined;
    if (options.json !== undefined) {
      headers['content-type'] ??= 'application/json';
      body = JSON.stringify(options.json);
    } else if (options.form) {
      headers['content-type'] ??= 'application/x-www-form-urlencoded';
      body = new URLSearchParams(options.form).toString();
    } else if (options.raw !== undefined) {
      body = options.raw;
    }
    if (this.cookies.size) headers.cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
    const res = await fetch(BASE_URL + path, { method, headers, body, redirect: 'manual' });
    for (const line of res.headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /^\s*max-age=0\s*$/i.test(a)) || value === '';
      if (expired) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    const text = await res.text();
    let parsed: any = null;
    if ((res.headers.get('content-type') ?? '').includes('application/json') && text) parsed = JSON.parse(text);
    return { status: res.status, statusText: res.statusText, headers: res.headers, body: parsed, text };
  }

  get<T = any>(path: string, headers?: Record<string, string>) {
    return this.request<T>('GET', path, { headers });
  }
  post<T = any>(path: string, json?: unknown) {
    return this.request<T>('POST', path, json === undefined ? {} : { json });
  }
  patch<T = any>(path: string, json?: unknown) {
    return this.request<T>('PATCH', path, json === undefined ? {} : { json });
  }
  put<T = any>(path: string, json?: unknown) {
    return this.request<T>('PUT', path, json === undefined ? {} : { json });
  }
  delete<T = any>(path: string) {
    return this.request<T>('DELETE', path);
  }
}

/** Signs up a fresh account through the API and returns its signed-in client. */
export async function signedUpClient(options: { email?: string; password?: string; displayName?: string } = {}): Promise<Client> {
  const client = new Client();
  const email = options.email ?? uniqueEmail();
  const password = options.password ?? `pw-${randomBytes(6).toString('hex')}`;
  const res = await client.post('/api/auth/sign-up', { email, password, displayName: options.displayName ?? 'Test Person' });
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${res.text}`);
  client.user = res.body.user;
  client.password = password;
  return client;
}

/** Signs in an existing account through the API. */
export async function signedInClient(email: string, password: string): Promise<Client> {
  const client = new Client();
  const res = await client.post('/api/auth/sign-in', { email, password });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${res.text}`);
  client.user = res.body.user;
  client.password = password;
  return client;
}

export interface WorkspaceFixture {
  workspaceId: string;
  owner: Client;
  modeler: Client;
  reviewer: Client;
  /** The client for a role. */
  as(role: Role): Client;
}

/**
 * A new workspace created by a fresh owner through the API, with a fresh modeler and reviewer added
 * straight in the database (the invitation flow has its own test).
 */
export async function workspaceWithRoles(name = 'Test workspace'): Promise<WorkspaceFixture> {
  const [owner, modeler, reviewer] = await Promise.all([signedUpClient(), signedUpClient(), signedUpClient()]);
  const res = await owner.post('/api/workspaces', { name });
  if (res.status !== 201) throw new Error(`workspace create failed: ${res.status} ${res.text}`);
  const workspaceId: string = res.body.workspace.id;
  await db('memberships').insert([
    { workspace_id: workspaceId, user_id: modeler.user!.id, role: 'modeler' },
    { workspace_id: workspaceId, user_id: reviewer.user!.id, role: 'reviewer' },
  ]);
  const byRole = { owner, modeler, reviewer };
  return { workspaceId, owner, modeler, reviewer, as: (role: Role) => byRole[role] };
}

/** Adds a fresh account to a workspace with a role, straight in the database. */
export async function addMember(workspaceId: string, role: Role): Promise<Client> {
  const client = await signedUpClient();
  await db('memberships').insert({ workspace_id: workspaceId, user_id: client.user!.id, role });
  return client;
}

/** Row counts of the given tables, to prove that rejected input wrote nothing. */
export async function rowCounts(tables: string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) {
    const [{ n }] = await db(t).count({ n: '*' });
    out[t] = Number(n);
  }
  return out;
}

/** Waits for the newest mail to `email` caught by the fake SMTP server. */
export async function waitForMail(email: string, timeoutMs = 10_000): Promise<{ subject: string; text: string; links: string[] }> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const row = await db('dev_mail').where('rcpt_to', 'like', `%${email}%`).orderBy('id', 'desc').first();
    if (row) {
      const text = String(row.text_body ?? '');
      return { subject: row.subject, text, links: text.match(/https?:\/\/[^\s<>"]+/g) ?? [] };
    }
    if (Date.now() > until) throw new Error(`no mail to ${email} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** Call with vitest's afterAll in each integration test file: closes the test database pool. */
export function closeDbAfterAll(afterAll: (fn: () => Promise<void>) => void): void {
  afterAll(async () => {
    const { closeDb } = await import('../../src/lib/server/db.ts');
    await closeDb();
  });
}

/** PUBLIC_ORIGIN of the test server (links in mails start with it). */
export const TEST_ORIGIN = (process.env.PUBLIC_ORIGIN ?? BASE_URL).replace(/\/$/, '');
