import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, signedInClient, workspaceWithRoles } from './helpers.ts';
import { routeMatrix, type Caller, type MatrixContext } from './route-matrix.ts';

const CALLERS: Caller[] = ['signedOut', 'outsider', 'reviewer', 'modeler', 'owner'];

/** Every (route, method) exported by a file under src/pages/api. */
function apiRoutes(): { route: string; method: string; file: string }[] {
  const root = join(process.cwd(), 'src', 'pages');
  const out: { route: string; method: string; file: string }[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = join(dir, name);
      if (statSync(full).isDirectory()) walk(full);
      else if (/\.(ts|js)$/.test(name)) {
        let route = '/' + relative(root, full).split(sep).join('/').replace(/\.(ts|js)$/, '');
        route = route.replace(/\/index$/, '');
        const src = readFileSync(full, 'utf8');
        for (const m of src.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE|ALL)\b/g)) {
          out.push({ route, method: m[1], file: relative(process.cwd(), full) });
        }
      }
    }
  };
  walk(join(root, 'api'));
  return out;
}

describe('role matrix (tests/integration/route-matrix.ts)', () => {
  let ctx: MatrixContext;
  const clients = {} as Record<Caller, Client>;

  beforeAll(async () => {
    const [a, b] = await Promise.all([workspaceWithRoles('Matrix workspace A'), workspaceWithRoles('Matrix workspace B')]);
    ctx = { a, b };
    clients.signedOut = new Client();
    clients.outsider = b.owner;
    clients.owner = a.owner;
    clients.modeler = a.modeler;
    clients.reviewer = a.reviewer;
  }, 60_000);

  closeDbAfterAll(afterAll);

  it('has a row for every method of every route file under src/pages/api', () => {
    const missing = apiRoutes()
      .filter((r) => !routeMatrix.some((c) => c.route === r.route && c.method === r.method))
      .map((r) => `${r.method} ${r.route}  (${r.file})`);
    expect(missing, 'add these to tests/integration/route-matrix.ts').toEqual([]);
  });

  for (const row of routeMatrix) {
    it(`${row.method} ${row.route} answers ${CALLERS.map((c) => `${c} ${row.expect[c]}`).join(', ')}`, async () => {
      const got: Record<string, number> = {};
      for (const caller of CALLERS) {
        const v = row.prepare ? await row.prepare(ctx, caller) : {};
        const client = clients[caller];
        const body = row.body?.(ctx, v, caller);
        const res = await client.request(row.method, row.path(ctx, v), body === undefined ? {} : { json: body });
        got[caller] = res.status;
        if (res.status >= 400) {
          expect(res.body?.error?.code, `${caller}: JSON error body for ${res.status}`).toBeTypeOf('string');
        }
        if (row.route === '/api/auth/sign-out' && caller !== 'signedOut' && res.status === 204) {
          // Sign back in so the following rows still have this caller signed in.
          const again = await signedInClient(client.user!.email, client.password!);
          client.cookies.clear();
          for (const [k, val] of again.cookies) client.cookies.set(k, val);
        }
      }
      expect(got).toEqual(row.expect);
    });
  }
});
