/**
 * Every error leaves with its standard reason phrase on the status line (RFC 9110 §15), from every
 * source: route handlers (json()), the body parser, the middleware, pages that set a status, Astro's
 * own answers for paths and methods no route serves. tests/integration/bad-input.test.ts covers
 * 400/401/403/404/415/303/200 on the common routes and tests/integration/compare.test.ts a 409; this file
 * adds the rest.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STATUS_CODES } from 'node:http';
import { Client, closeDbAfterAll, workspaceWithRoles, type HttpResult, type WorkspaceFixture } from './helpers.ts';

let ws: WorkspaceFixture;
const q = () => `workspace=${ws.workspaceId}`;
beforeAll(async () => { ws = await workspaceWithRoles('Status text'); }, 60_000);
closeDbAfterAll(afterAll);

describe('status line text of error responses', () => {
  const cases: { title: string; send: () => Promise<HttpResult>; status: number }[] = [
    { title: 'a 403 from a role guard on an API route', send: () => ws.reviewer.post(`/api/models?${q()}`, { name: 'x', document: {} }), status: 403 },
    { title: 'a 404 for an API path no route serves', send: () => ws.modeler.get(`/api/no-such-route?${q()}`), status: 404 },
    { title: 'a 404 for a page path no route serves', send: () => ws.modeler.get(`/no-such-page?${q()}`), status: 404 },
    { title: 'a 401 for an API path no route serves, signed out', send: () => new Client().get('/api/no-such-route'), status: 401 },
    { title: 'a 413 from the body parser', send: () => ws.modeler.request('POST', `/api/models?${q()}`, { raw: JSON.stringify({ name: 'x'.repeat(2_000_000) }), headers: { 'content-type': 'application/json' } }), status: 413 },
    { title: 'a 404 for a run id out of range', send: () => ws.modeler.get(`/api/runs/abc?${q()}`), status: 404 },
  ];
  for (const c of cases) {
    it(`${c.title} says "${c.status} ${STATUS_CODES[c.status]}"`, async () => {
      const res = await c.send();
      expect(res.status).toBe(c.status);
      expect(res.statusText).toBe(STATUS_CODES[c.status]);
    });
  }

  it('a method the route does not export is refused with its status text (whatever Astro answers)', async () => {
    const res = await ws.modeler.request('DELETE', `/api/health`);
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.statusText).toBe(STATUS_CODES[res.status]);
  });
});
