/**
 * Bad input on every foundation route and form: missing fields, oversized fields, wrong types and
 * unknown keys all answer 400 naming the field, and nothing is written (scoped row counts before and
 * after, so test files running in parallel do not disturb the check).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, db, signedUpClient, uniqueEmail, workspaceWithRoles, type WorkspaceFixture } from './helpers.ts';

closeDbAfterAll(afterAll);

let ws: WorkspaceFixture;
let freshEmail: string;

beforeAll(async () => {
  ws = await workspaceWithRoles('Bad input workspace');
  freshEmail = uniqueEmail('never-created');
}, 60_000);

/** Everything a rejected request could have written, scoped to this file's fixture. */
async function footprint(): Promise<Record<string, number>> {
  const ids = [ws.owner, ws.modeler, ws.reviewer].map((c) => c.user!.id);
  const count = async (q: any) => Number((await q.count({ n: '*' }))[0].n);
  return {
    users: await count(db('users').where('email', 'like', '%never-created%').orWhere('email', freshEmail)),
    workspaces: await count(db('workspaces').whereIn('created_by', ids).orWhereIn('created_by', db('users').select('id').where('email', 'like', '%never-created%'))),
    workspaceName: await count(db('workspaces').where({ id: ws.workspaceId, name: 'Bad input workspace' })),
    memberships: await count(db('memberships').where({ workspace_id: ws.workspaceId })),
    roles: await count(db('memberships').where({ workspace_id: ws.workspaceId, role: 'reviewer' })),
    invitations: await count(db('invitations').where({ workspace_id: ws.workspaceId })),
    audit: await count(db('audit_log').where({ workspace_id: ws.workspaceId }).orWhereIn('actor_id', ids)),
    passwords: await count(db('users').whereIn('id', ids).whereNotNull('password_changed_at')),
  };
}

interface FieldSpec {
  /** A value too long for the field. */
  oversized?: unknown;
  /** A value of the wrong JSON type. */
  wrongType: unknown;
  required?: boolean;
}

interface BodyRoute {
  name: string;
  method: string;
  path: () => string;
  client: () => Client;
  valid: () => Record<string, unknown>;
  fields: Record<string, FieldSpec>;
}

const long = (n: number) => 'x'.repeat(n);

const routes: BodyRoute[] = [
  {
    name: 'sign-up', method: 'POST', path: () => '/api/auth/sign-up', client: () => new Client(),
    valid: () => ({ email: freshEmail, password: 'valid-password', displayName: 'Valid Name' }),
    fields: {
      email: { oversized: `${long(250)}@never-created.invalid`, wrongType: 42 },
      password: { oversized: long(201), wrongType: ['a'] },
      displayName: { oversized: long(101), wrongType: { a: 1 } },
    },
  },
  {
    name: 'sign-in', method: 'POST', path: () => '/api/auth/sign-in', client: () => new Client(),
    valid: () => ({ email: ws.reviewer.user!.email, password: ws.reviewer.password }),
    fields: {
      email: { oversized: `${long(250)}@x.invalid`, wrongType: true },
      password: { oversized: long(201), wrongType: 12345678901 },
    },
  },
  {
    name: 'password change', method: 'POST', path: () => '/api/auth/password', client: () => ws.modeler,
    valid: () => ({ currentPassword: ws.modeler.password, newPassword: 'a-valid-new-password' }),
    fields: {
      currentPassword: { oversized: long(201), wrongType: null },
      newPassword: { oversized: long(201), wrongType: 1234567890123 },
    },
  },
  {
    name: 'create workspace', method: 'POST', path: () => '/api/workspaces', client: () => ws.owner,
    valid: () => ({ name: 'A valid name' }),
    fields: { name: { oversized: long(101), wrongType: 7 } },
  },
  {
    name: 'rename workspace', method: 'PATCH', path: () => `/api/workspaces/${ws.workspaceId}`, client: () => ws.owner,
    valid: () => ({ name: 'A valid new name' }),
    fields: { name: { oversized: long(101), wrongType: false } },
  },
  {
    name: 'change role', method: 'PATCH', path: () => `/api/workspaces/${ws.workspaceId}/members/${ws.reviewer.user!.id}`, client: () => ws.owner,
    valid: () => ({ role: 'modeler' }),
    fields: { role: { oversized: long(300), wrongType: 3 } },
  },
  {
    name: 'invite', method: 'POST', path: () => `/api/workspaces/${ws.workspaceId}/invitations`, client: () => ws.owner,
    valid: () => ({ email: uniqueEmail('never-created'), role: 'reviewer' }),
    fields: {
      email: { oversized: `${long(250)}@x.invalid`, wrongType: ['a@b.c'] },
      role: { oversized: long(300), wrongType: { role: 'owner' } },
    },
  },
];

interface Case {
  title: string;
  /** Built when the test runs (the fixture exists only after beforeAll). */
  body: () => unknown;
  field: string;
}

function without(o: Record<string, unknown>, key: string): Record<string, unknown> {
  const copy = { ...o };
  delete copy[key];
  return copy;
}

function casesFor(route: BodyRoute): Case[] {
  const out: Case[] = [];
  for (const [field, spec] of Object.entries(route.fields)) {
    out.push({ title: `missing ${field}`, body: () => without(route.valid(), field), field });
    if (spec.oversized !== undefined) out.push({ title: `oversized ${field}`, body: () => ({ ...route.valid(), [field]: spec.oversized }), field });
    out.push({ title: `${field} of the wrong type`, body: () => ({ ...route.valid(), [field]: spec.wrongType }), field });
  }
  out.push({ title: 'an unknown key', body: () => ({ ...route.valid(), isAdmin: true }), field: 'isAdmin' });
  out.push({ title: 'an array instead of an object', body: () => [route.valid()], field: '(body)' });
  return out;
}

describe('bad input on API routes answers 400 naming the field and writes nothing', () => {
  for (const route of routes) {
    for (const c of casesFor(route)) {
      it(`${route.method} ${route.name} with ${c.title}`, async () => {
        const before = await footprint();
        const res = await route.client().request(route.method, route.path(), { json: c.body() });
        expect(res.status).toBe(400);
        expect(res.body.error.code).toBe('invalid_input');
        expect(res.body.error.field).toBe(c.field);
        expect(res.body.error.message).toContain(c.field);
        expect(await footprint()).toEqual(before);
      });
    }
    it(`${route.method} ${route.name} with malformed JSON answers 400 invalid_json`, async () => {
      const before = await footprint();
      const res = await route.client().request(route.method, route.path(), { raw: '{"email": ', headers: { 'content-type': 'application/json' } });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_json');
      expect(await footprint()).toEqual(before);
    });
    it(`${route.method} ${route.name} with a non-JSON content type answers 415`, async () => {
      const res = await route.client().request(route.method, route.path(), { raw: 'email=x', headers: { 'content-type': 'text/plain' } });
      expect(res.status).toBe(415);
    });
    it(`${route.method} ${route.name} with a body over 64 KiB answers 413`, async () => {
      const before = await footprint();
      const res = await route.client().request(route.method, route.path(), { json: { ...route.valid(), pad: long(70_000) } });
      expect(res.status).toBe(413);
      expect(await footprint()).toEqual(before);
    });
  }

  it('the valid bodies above really are accepted (so the 400s are about the fault, not the route)', async () => {
    const r = await ws.owner.post('/api/workspaces', { name: 'A valid name' });
    expect(r.status).toBe(201);
    await db('memberships').where({ workspace_id: r.body.workspace.id }).delete();
    await db('workspaces').where({ id: r.body.workspace.id }).delete();
  });
});

interface FormRoute {
  name: string;
  path: () => string;
  client: () => Promise<Client> | Client;
  valid: () => Record<string, string>;
  fields: Record<string, string>; // field -> oversized value
  extra?: Record<string, string>;
}

const forms: FormRoute[] = [
  {
    name: 'sign-up form', path: () => '/sign-up', client: () => new Client(),
    valid: () => ({ email: freshEmail, password: 'valid-password', displayName: 'Form Person' }),
    fields: { email: `${long(250)}@never-created.invalid`, password: long(201), displayName: long(101) },
  },
  {
    name: 'sign-in form', path: () => '/sign-in', client: () => new Client(),
    valid: () => ({ email: ws.reviewer.user!.email, password: ws.reviewer.password! }),
    fields: { email: `${long(250)}@x.invalid`, password: long(201) },
  },
  {
    name: 'password form', path: () => '/account/password', client: () => ws.modeler,
    valid: () => ({ currentPassword: ws.modeler.password!, newPassword: 'a-valid-new-password' }),
    fields: { currentPassword: long(201), newPassword: long(201) },
  },
  {
    name: 'new workspace form', path: () => '/', client: () => signedUpClient({ email: uniqueEmail('never-created') }),
    valid: () => ({ name: 'Form workspace' }),
    fields: { name: long(101) },
  },
  {
    name: 'invite form', path: () => `/members?workspace=${ws.workspaceId}`, client: () => ws.owner,
    valid: () => ({ intent: 'invite', email: uniqueEmail('never-created'), role: 'modeler' }),
    fields: { email: `${long(250)}@x.invalid`, role: long(300) },
  },
  {
    name: 'workspace settings form', path: () => `/members?workspace=${ws.workspaceId}`, client: () => ws.owner,
    valid: () => ({ intent: 'rename', name: 'Renamed by a form' }),
    fields: { name: long(101) },
  },
  {
    name: 'role form', path: () => `/members?workspace=${ws.workspaceId}`, client: () => ws.owner,
    valid: () => ({ intent: 'role', userId: ws.reviewer.user!.id, role: 'modeler' }),
    fields: { userId: long(40), role: long(300) },
  },
];

describe('bad input on form pages answers 400 with a message naming the field and writes nothing', () => {
  for (const f of forms) {
    const cases: { title: string; form: () => Record<string, string>; field: string }[] = [];
    for (const [field, oversized] of Object.entries(f.fields)) {
      cases.push({ title: `missing ${field}`, form: () => without(f.valid(), field) as Record<string, string>, field });
      cases.push({ title: `oversized ${field}`, form: () => ({ ...f.valid(), [field]: oversized }), field });
    }
    cases.push({ title: 'an unknown field', form: () => ({ ...f.valid(), isAdmin: '1' }), field: 'isAdmin' });
    for (const c of cases) {
      it(`${f.name} with ${c.title}`, async () => {
        const client = await f.client();
        const before = await footprint();
        const res = await client.request('POST', f.path(), { form: c.form() });
        expect(res.status).toBe(400);
        const shown = /data-testid="form-error"[^>]*>([^<]*)</.exec(res.text)?.[1] ?? '';
        expect(shown).toContain(c.field);
        expect(await footprint()).toEqual(before);
      });
    }
  }
});
