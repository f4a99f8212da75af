/**
 * Property: no JSON body sent to a write route makes the server answer 5xx (issue 11). The write
 * routes are the POST/PUT/PATCH/DELETE rows of the role matrix, so a new route is fuzzed as soon as it
 * has its matrix row. Each is sent, by a caller allowed to use it, (1) arbitrary JSON, (2) its valid
 * body with one field replaced by arbitrary JSON, (3) its valid body with one field wrapped in up
 * to 300 000 levels of arrays and (4) for object fields (a document), such a nest added inside.
 * Strings mix any code point with lone UTF-16 surrogates. Without the json-shape checks this file
 * finds both 500s of issue 11 (stack overflow in JSON.stringify, MariaDB refusing "\ud800" in a JSON
 * column). Set FC_SEED (and FC_RUNS) to replay a failure that fast-check reports.
 */
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, signedUpClient, workspaceWithRoles } from './helpers.ts';
import { routeMatrix, type Caller, type MatrixContext, type RouteCase } from './route-matrix.ts';

closeDbAfterAll(afterAll);

const RUNS = Number(process.env.FC_RUNS ?? 20);
const SEED = process.env.FC_SEED === undefined ? undefined : Number(process.env.FC_SEED);

/** One code point of any plane, or now and then a lone surrogate (which JSON may carry escaped). */
const unit = fc.oneof(
  { weight: 1, arbitrary: fc.constantFrom('\ud800', '\udbff', '\udc00', '\udfff') },
  { weight: 6, arbitrary: fc.integer({ min: 0, max: 0x10ffff }).filter((cp) => cp < 0xd800 || cp > 0xdfff).map((cp) => String.fromCodePoint(cp)) },
  { weight: 6, arbitrary: fc.string({ minLength: 1, maxLength: 1 }) },
);
const anyJson = fc.jsonValue({ maxDepth: 6, stringUnit: unit });

const writeRows = routeMatrix.filter((r) => r.method !== 'GET');

/** A caller whose request gets past authorization, so the body is really read. */
function callerFor(row: RouteCase): Caller {
  if (row.expect.signedOut !== 401) return 'signedOut'; // a public route (sign-up, sign-in)
  const allowed = (['owner', 'modeler', 'reviewer'] as const).find((c) => row.expect[c] < 400);
  return allowed ?? 'owner';
}

/**
 * `body` as JSON text with the value at `key` wrapped in `depth` arrays or, with `inside`, with an
 * extra field `inside` of `depth` nested arrays added to the object at `key` (spliced in as text, so
 * neither this file nor fast-check recurses through it).
 */
function nestedText(body: Record<string, unknown>, key: string, depth: number, inside?: string): string {
  const marker = `"__nest_${Math.random().toString(36).slice(2)}__"`;
  const placeholder = JSON.parse(marker);
  const value = inside ? { ...(body[key] as object), [inside]: placeholder } : placeholder;
  const deep = '['.repeat(depth) + (inside ? '' : JSON.stringify(body[key] ?? null)) + ']'.repeat(depth);
  return JSON.stringify({ ...body, [key]: value }).replace(marker, deep);
}

const depths = fc.oneof(fc.integer({ min: 1, max: 5000 }), fc.integer({ min: 5000, max: 300_000 }));

describe('random JSON on every write route never gets a 5xx', () => {
  let ctx: MatrixContext;

  beforeAll(async () => {
    const [a, b] = await Promise.all([workspaceWithRoles('Fuzz workspace A'), workspaceWithRoles('Fuzz workspace B')]);
    ctx = { a, b };
  }, 60_000);

  it('covers every write route of the matrix', () => {
    expect(writeRows.length).toBeGreaterThanOrEqual(20);
  });

  for (const row of writeRows) {
    const caller = callerFor(row);
    it(`${row.method} ${row.route} (as ${caller})`, async () => {
      const v = row.prepare ? await row.prepare(ctx, caller) : {};
      const path = row.path(ctx, v);
      const valid = row.body?.(ctx, v, caller);
      const validObject = valid && typeof valid === 'object' && !Array.isArray(valid) ? (valid as Record<string, unknown>) : null;
      const keys = validObject ? Object.keys(validObject) : [];
      // Sign-out ends the session it is sent with, so it gets a fresh one each time.
      const client = async (): Promise<Client> =>
        caller === 'signedOut' ? new Client() : row.route === '/api/auth/sign-out' ? signedUpClient() : ctx.a.as(caller as 'owner' | 'modeler' | 'reviewer');

      // Bodies are generated as JSON text, so fast-check never has to print a 300 000-level value.
      const bodies: fc.Arbitrary<{ kind: string; text: string }>[] = [anyJson.map((body) => ({ kind: 'random', text: JSON.stringify(body) }))];
      if (validObject && keys.length) {
        bodies.push(fc.tuple(fc.constantFrom(...keys), anyJson).map(([k, x]) => ({ kind: `${k} replaced`, text: JSON.stringify({ ...validObject, [k]: x }) })));
        bodies.push(fc.tuple(fc.constantFrom(...keys), depths).map(([k, d]) => ({ kind: `${k} nested ${d} deep`, text: nestedText(validObject, k, d) })));
      }
      const objectKeys = keys.filter((k) => validObject![k] && typeof validObject![k] === 'object' && !Array.isArray(validObject![k]));
      if (objectKeys.length) {
        bodies.push(fc.tuple(fc.constantFrom(...objectKeys), fc.constantFrom('start', 'junk', 'name'), depths)
          .map(([k, f, d]) => ({ kind: `${k}.${f} nested ${d} deep`, text: nestedText(validObject!, k, d, f) })));
      }

      await fc.assert(
        fc.asyncProperty(fc.oneof(...bodies), async ({ kind, text }) => {
          const res = await (await client()).request(row.method, path, { raw: text, headers: { 'content-type': 'application/json' } });
          expect(res.status, `${kind}: ${text.slice(0, 200)} -> ${res.text.slice(0, 300)}`).toBeLessThan(500);
          if (res.status >= 400) expect(res.body?.error?.code, `${kind}: JSON error body for ${res.status}`).toBeTypeOf('string');
        }),
        { numRuns: RUNS * bodies.length, seed: SEED, endOnFailure: true },
      );
    }, 120_000);
  }
});
