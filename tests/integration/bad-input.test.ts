/**
 * Bad input on every foundation route and form: missing fields, oversized fields, wrong types and
 * unknown keys all answer 400 naming the field, and nothing is written (scoped row counts before and
 * after, so test files running in parallel do not disturb the check).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, db, signedUpClient, uniqueEmail, workspaceWithRoles, type HttpResult, type WorkspaceFixture } from './helpers.ts';
import { twoLakes } from './service/fixtures.ts';

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

/**
 * Hostile documents found by fuzzing the model routes (issue 11): nesting deep enough to overflow
 * any recursive walk (JSON.parse itself is iterative and takes it), and a lone UTF-16 surrogate,
 * which MariaDB's JSON columns refuse. Each was a 500; each must be a 400 naming the field.
 */
describe('hostile JSON on the model write routes answers 400 naming the field and writes nothing', () => {
  let modelId: number;
  const q = () => `workspace=${ws.workspaceId}`;

  beforeAll(async () => {
    const res = await ws.modeler.post(`/api/models?${q()}`, { name: 'Hostile input target', document: twoLakes() });
    if (res.status !== 201) throw new Error(`create model: ${res.status} ${res.text}`);
    modelId = res.body.model.id;
  }, 60_000);

  /** Models, versions and audit rows of this file's workspace. */
  async function modelFootprint(): Promise<Record<string, number>> {
    const count = async (query: any) => Number((await query.count({ n: '*' }))[0].n);
    return {
      ...(await footprint()),
      models: await count(db('models').where({ workspace_id: ws.workspaceId })),
      versions: await count(db('model_versions').whereIn('model_id', db('models').select('id').where({ workspace_id: ws.workspaceId }))),
    };
  }

  /** `depth` nested arrays (2 bytes a level) or objects ({"a": …}, 6 bytes a level) as raw JSON text. */
  const nestedText = (depth: number, kind: 'array' | 'object') =>
    kind === 'array' ? '['.repeat(depth) + ']'.repeat(depth) : '{"a":'.repeat(depth) + '0' + '}'.repeat(depth);

  /** A valid body whose document gets one extra raw-JSON field, spliced in as text (JSON.stringify would overflow). */
  const withDocumentField = (body: Record<string, unknown>, key: string, rawValue: string) => {
    const text = JSON.stringify(body);
    const at = text.indexOf('"document":{') + '"document":{'.length;
    return `${text.slice(0, at)}"${key}":${rawValue},${text.slice(at)}`;
  };

  const deepCases = [
    { depth: 50_000, kind: 'array' as const, key: 'start', field: 'document.start' },
    { depth: 100_000, kind: 'object' as const, key: 'element2', field: 'document.element2.a.a' },
    { depth: 500_000, kind: 'array' as const, key: 'junk', field: 'document.junk' },
  ];
  const writeRoutes = [
    { name: 'POST /api/models', path: () => `/api/models?${q()}`, body: () => ({ name: 'Never stored', document: twoLakes() }) },
    { name: 'POST /api/models/[id]/versions', path: () => `/api/models/${modelId}/versions?${q()}`, body: () => ({ document: twoLakes({ a2: 0.07 }), changeNote: 'never stored' }) },
  ];

  for (const route of writeRoutes) {
    for (const c of deepCases) {
      it(`${route.name} with ${c.depth} levels of nested ${c.kind}s in document.${c.key}`, async () => {
        const before = await modelFootprint();
        const raw = withDocumentField(route.body(), c.key, nestedText(c.depth, c.kind));
        const res = await ws.modeler.request('POST', route.path(), { raw, headers: { 'content-type': 'application/json' } });
        expect(res.status).toBe(400);
        expect(res.body.error.code).toBe('invalid_input');
        expect(res.body.error.field).toBe(c.field);
        expect(res.body.error.message).toContain(`${c.field}: nested more than 32 levels deep`);
        expect(await modelFootprint()).toEqual(before);
      });
    }
  }

  it('POST /api/models/import with a file nested 400 000 levels deep answers 400 naming the file', async () => {
    const before = await modelFootprint();
    const text = JSON.stringify(twoLakes());
    const raw = `${text.slice(0, -1)},"junk":${nestedText(400_000, 'array')}}`;
    const res = await ws.modeler.request('POST', `/api/models/import?${q()}`, { raw, headers: { 'content-type': 'application/json' } });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('file.junk');
    expect(res.body.error.message).toContain('file.junk: nested more than 32 levels deep');
    expect(await modelFootprint()).toEqual(before);
  });

  it('a document nested just within the cap still reaches the model validator (the cap is not a blanket refusal)', async () => {
    const res = await ws.modeler.request('POST', `/api/models?${q()}`, {
      raw: withDocumentField({ name: 'Never stored', document: twoLakes() }, 'junk', nestedText(20, 'array')),
      headers: { 'content-type': 'application/json' },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/unknown field "junk"|junk/);
    expect(res.body.error.message).not.toContain('levels deep');
  });

  const lone = '\ud800lone';
  const surrogateCases = [
    { title: 'a model name', method: 'POST', path: () => `/api/models?${q()}`, body: () => ({ name: lone, document: twoLakes() }), field: 'name' },
    { title: 'a document name', method: 'POST', path: () => `/api/models?${q()}`, body: () => ({ name: 'Fine', document: twoLakes({ name: lone }) }), field: 'document.name' },
    { title: 'a tag', method: 'POST', path: () => `/api/models?${q()}`, body: () => ({ name: 'Fine', tags: ['ok', 'x\udc00'], document: twoLakes() }), field: 'tags.1' },
    { title: 'a node id in a new version', method: 'POST', path: () => `/api/models/${modelId}/versions?${q()}`, body: () => ({ document: { ...twoLakes(), nodes: [{ id: 'upper' }, { id: lone }] }, changeNote: 'x' }), field: 'document.nodes.1.id' },
    { title: 'a change note', method: 'POST', path: () => `/api/models/${modelId}/versions?${q()}`, body: () => ({ document: twoLakes({ a2: 0.07 }), changeNote: lone }), field: 'changeNote' },
    { title: 'a renamed model', method: 'PATCH', path: () => `/api/models/${modelId}?${q()}`, body: () => ({ name: lone }), field: 'name' },
    { title: 'a parameter name (a key)', method: 'POST', path: () => `/api/models?${q()}`, body: () => ({ name: 'Fine', document: { ...twoLakes(), element: { variable: 'P', rate: 'P', parameters: { [lone]: 1 } } } }), field: 'document.element.parameters.\ud800lone' },
  ];
  for (const c of surrogateCases) {
    it(`${c.method} with a lone UTF-16 surrogate in ${c.title} answers 400 naming ${c.field}`, async () => {
      const before = await modelFootprint();
      const name = (await db('models').where({ id: modelId }).first()).name;
      const res = await ws.modeler.request(c.method, c.path(), { json: c.body() });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_input');
      expect(res.body.error.field).toBe(c.field);
      expect(res.body.error.message).toContain('lone UTF-16 surrogate');
      expect(await modelFootprint()).toEqual(before);
      expect((await db('models').where({ id: modelId }).first()).name).toBe(name);
    });
  }

  it('POST /api/models/import with a lone surrogate in the file\'s name answers 400 naming file.name', async () => {
    const before = await modelFootprint();
    const res = await ws.modeler.request('POST', `/api/models/import?${q()}`, { raw: JSON.stringify(twoLakes({ name: lone })), headers: { 'content-type': 'application/json' } });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('file.name');
    expect(await modelFootprint()).toEqual(before);
  });

  it('a well-formed astral character (a surrogate pair) is accepted and stored intact', async () => {
    const name = 'Lakes \u{1F30A} pair';
    const res = await ws.modeler.post(`/api/models?${q()}`, { name, document: twoLakes({ name }) });
    expect(res.status).toBe(201);
    expect((await db('models').where({ id: res.body.model.id }).first()).name).toBe(name);
  });
});

describe('error responses carry their standard status text', () => {
  const cases: { title: string; send: () => Promise<HttpResult>; status: number; text: string }[] = [
    { title: 'a 400 from a route', send: () => ws.modeler.request('POST', `/api/models?workspace=${ws.workspaceId}`, { json: { name: '' } }), status: 400, text: 'Bad Request' },
    { title: 'a 401 from the middleware', send: () => new Client().get('/api/models'), status: 401, text: 'Unauthorized' },
    { title: 'a 404 from a route', send: () => ws.modeler.get(`/api/models/999999999?workspace=${ws.workspaceId}`), status: 404, text: 'Not Found' },
    { title: 'a 415 from the body parser', send: () => ws.owner.request('POST', '/api/workspaces', { raw: 'x', headers: { 'content-type': 'text/plain' } }), status: 415, text: 'Unsupported Media Type' },
    { title: 'a 404 page', send: () => ws.modeler.get(`/models/999999999?workspace=${ws.workspaceId}`), status: 404, text: 'Not Found' },
    { title: 'a 403 page', send: () => ws.reviewer.get(`/models/new?workspace=${ws.workspaceId}`), status: 403, text: 'Forbidden' },
    { title: 'a 400 form page', send: () => new Client().request('POST', '/sign-in', { form: { email: 'x' } }), status: 400, text: 'Bad Request' },
    { title: 'a redirect', send: () => new Client().get('/models'), status: 303, text: 'See Other' },
    { title: 'a page that is fine', send: () => new Client().get('/sign-in'), status: 200, text: 'OK' },
  ];
  for (const c of cases) {
    it(`${c.title} says "${c.status} ${c.text}" on the status line`, async () => {
      const res = await c.send();
      expect(res.status).toBe(c.status);
      expect(res.statusText).toBe(c.text);
    });
  }
});
