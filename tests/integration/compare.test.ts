/**
 * GET /api/compare (the compare page's data) and the compare page: sign-in, role and workspace are
 * checked (a signed-out caller gets 401, another workspace's runs are a 404 indistinguishable from
 * runs that do not exist), bad queries are a 400 naming the field, the page HTML carries no diagram,
 * and every error leaves with its standard status text.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, workspaceWithRoles, type WorkspaceFixture } from './helpers.ts';
import { compareLakes, finishedRun, queuedRun } from './compare-fixtures.ts';

let a: WorkspaceFixture;
let b: WorkspaceFixture;
let runA1 = 0, runA2 = 0, runA3 = 0, runB1 = 0, runGamma = 0, runQueued = 0;
const inA = (path: string) => `${path}${path.includes('?') ? '&' : '?'}workspace=${a.workspaceId}`;
const inB = (path: string) => `${path}${path.includes('?') ? '&' : '?'}workspace=${b.workspaceId}`;

beforeAll(async () => {
  [a, b] = await Promise.all([workspaceWithRoles('Compare A'), workspaceWithRoles('Compare B')]);
  runA1 = (await finishedRun(a, compareLakes(0.05))).runId;
  runA2 = (await finishedRun(a, compareLakes(0.03))).runId;
  runA3 = (await finishedRun(a, compareLakes(0.04))).runId;
  runGamma = (await finishedRun(a, compareLakes(0.05, 'gamma'))).runId;
  runB1 = (await finishedRun(b, compareLakes(0.045))).runId;
  runQueued = await queuedRun(a, compareLakes(0.035));
}, 120_000);
closeDbAfterAll(afterAll);

describe('GET /api/compare', () => {
  it('answers a signed-out caller 401 "Unauthorized" with a JSON error, before anything is read', async () => {
    const res = await new Client().get(inA(`/api/compare?runs=${runA1},${runA2}`));
    expect(res.status).toBe(401);
    expect(res.statusText).toBe('Unauthorized');
    expect(res.body.error.code).toBe('unauthenticated');
    expect(res.text).not.toContain('branches');
  });

  it('gives a reviewer of the workspace both diagrams, thinned, labelled, with provenance, not cached', async () => {
    const res = await a.reviewer.get(inA(`/api/compare?runs=${runA1},${runA2}`));
    expect(res.status).toBe(200);
    expect(res.headers.get('cache-control')).toBe('no-store');
    expect(res.body.items.map((i: { runId: number }) => i.runId)).toEqual([runA1, runA2]);
    const [first] = res.body.items;
    expect(first.shortLabel).toBe(`run ${runA1}`);
    expect(first.label).toMatch(new RegExp(`v1 \\(run ${runA1}\\)$`));
    expect(first.diagram.parameter).toBe('beta');
    expect(first.diagram.branches.length).toBeGreaterThan(0);
    const run = await a.reviewer.get(inA(`/api/runs/${runA1}`));
    expect(first.provenance.versionHash).toBe(run.body.run.versionHash);
    // The same special points as the run's own result.
    const own = await a.reviewer.get(inA(`/api/runs/${runA1}/result`));
    expect(first.diagram.bifurcations.map((s: { id: string }) => s.id)).toEqual(own.body.result.diagram.bifurcations.map((s: { id: string }) => s.id));
  });

  it('thins each diagram to ?points= and keeps the order of ?runs= (comma list or repeated)', async () => {
    const res = await a.modeler.get(inA(`/api/compare?runs=${runA3}&runs=${runA1}&points=200`));
    expect(res.status).toBe(200);
    expect(res.body.items.map((i: { runId: number }) => i.runId)).toEqual([runA3, runA1]);
    for (const it of res.body.items) {
      const n = it.diagram.branches.reduce((s: number, br: { points: unknown[] }) => s + br.points.length, 0);
      expect(n).toBeLessThanOrEqual(400);
    }
  });

  it('refuses another workspace: its owner gets 404 asking in workspace A, and A\'s runs are "not found" from workspace B', async () => {
    const intoA = await b.owner.get(inA(`/api/compare?runs=${runA1},${runA2}`));
    expect(intoA.status).toBe(404);
    expect(intoA.statusText).toBe('Not Found');
    expect(JSON.stringify(intoA.body)).not.toContain('branches');

    const fromB = await b.owner.get(inB(`/api/compare?runs=${runB1},${runA1}`));
    expect(fromB.status).toBe(404);
    expect(fromB.body.error).toMatchObject({ code: 'not_found', message: `run ${runA1} not found` });
    expect(fromB.text).not.toContain('branches');
    // Exactly what a run id that exists nowhere answers, so nothing tells that A's run exists.
    const nowhere = 999_999_000 + (runA1 % 1000);
    const missing = await b.owner.get(inB(`/api/compare?runs=${runB1},${nowhere}`));
    expect(missing.status).toBe(404);
    expect(missing.body.error.message).toBe(`run ${nowhere} not found`);
    expect(Object.keys(missing.body.error).sort()).toEqual(Object.keys(fromB.body.error).sort());
  });

  it('refuses a member of A asking in workspace A for a run of B', async () => {
    const res = await a.owner.get(inA(`/api/compare?runs=${runA1},${runB1}`));
    expect(res.status).toBe(404);
    expect(res.body.error.message).toBe(`run ${runB1} not found`);
  });

  const bad: { title: string; query: () => string; field: string; message: RegExp }[] = [
    { title: 'no runs', query: () => '', field: 'runs', message: /runs: choose two to four/ },
    { title: 'one run', query: () => `runs=${runA1}`, field: 'runs', message: /at least two different runs/ },
    { title: 'the same run twice', query: () => `runs=${runA1},${runA1}`, field: 'runs', message: /at least two different runs to compare \(got 1\)/ },
    { title: 'five runs', query: () => `runs=1,2,3,4,5`, field: 'runs', message: /at most 4 runs/ },
    { title: 'a word for an id', query: () => `runs=${runA1},two`, field: 'runs', message: /run ids separated by commas/ },
    { title: 'a budget below 100', query: () => `runs=${runA1},${runA2}&points=5`, field: 'points', message: /points: at least 100/ },
    { title: 'an unknown key', query: () => `runs=${runA1},${runA2}&zoom=2`, field: 'zoom', message: /unknown field "zoom"/ },
  ];
  for (const c of bad) {
    it(`answers ${c.title} with 400 "Bad Request" naming ${c.field}`, async () => {
      const res = await a.modeler.get(inA(`/api/compare?${c.query()}`));
      expect(res.status).toBe(400);
      expect(res.statusText).toBe('Bad Request');
      expect(res.body.error.code).toBe('invalid_input');
      expect(res.body.error.field).toBe(c.field);
      expect(res.body.error.message).toMatch(c.message);
    });
  }

  it('answers a run without a result 409 "Conflict", naming the run and its state', async () => {
    const res = await a.modeler.get(inA(`/api/compare?runs=${runA1},${runQueued}`));
    expect(res.status).toBe(409);
    expect(res.statusText).toBe('Conflict');
    expect(res.body.error.message).toBe(`run ${runQueued} has no result (it is queued)`);
  });

  it('refuses runs that sweep different parameters (400 naming runs and both parameters)', async () => {
    const res = await a.modeler.get(inA(`/api/compare?runs=${runA1},${runGamma}`));
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('runs');
    expect(res.body.error.message).toContain('(beta, gamma)');
  });
});

describe('the compare page', () => {
  it('ships no diagram in its HTML: the island fetches it', async () => {
    const res = await a.reviewer.get(inA(`/compare?runs=${runA1},${runA2}`));
    expect(res.status).toBe(200);
    expect(res.text).toContain('CompareLoader');
    expect(res.text).not.toContain('&quot;branches&quot;');
    expect(res.text).not.toContain('"branches"');
    expect(res.text.length).toBeLessThan(100_000);
  });

  it('names a run of another workspace as "no such run" and one still queued, and compares none with fewer than two left', async () => {
    const res = await a.reviewer.get(inA(`/compare?runs=${runA1},${runB1},${runQueued}`));
    expect(res.status).toBe(200);
    expect(res.text).toContain(`Run ${runB1}: no such run in this workspace.`);
    expect(res.text).toMatch(new RegExp(`Run ${runQueued} \\(.*\\) is queued; only finished runs can be compared\\.`));
    expect(res.text).toContain('Fewer than two of the chosen runs can be compared.');
    expect(res.text).not.toContain('CompareLoader');
  });

  it('sends a signed-out visitor to sign in (303 "See Other")', async () => {
    const res = await new Client().get(`/compare?runs=${runA1},${runA2}`);
    expect(res.status).toBe(303);
    expect(res.statusText).toBe('See Other');
    expect(res.headers.get('location')).toMatch(/^\/sign-in\?next=/);
  });
});
