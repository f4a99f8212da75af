/**
 * gatherReport / listReportChoices (src/lib/server/reports/report-data.ts) against the real database:
 * a computed run of an invented two-lake model comes back with node-named states, the model of its
 * exact version (equations, parameters, links) and only its open comments; missing runs, runs of
 * another workspace and runs without a result are problems in words, never entries.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { gatherReport, listReportChoices, reportRunIds, REPORT_MAX_RUNS } from '../../../src/lib/server/reports/report-data.ts';
import { createModel, runRow, spawnWorker, twoLakes, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

const queue = 'report-data-test';
let w: WorkspaceFixture;
let other: WorkspaceFixture;
let worker: SpawnedWorker;
let runId: number;
let queuedId: number;
let otherRunId: number;
let openId: number;
let resolvedId: number;

beforeAll(async () => {
  [w, other] = await Promise.all([workspaceWithRoles('Report data'), workspaceWithRoles('Report data, elsewhere')]);
  worker = spawnWorker(queue);
  const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0811 }), 'Reported lakes');
  runId = (await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: false, queue })).id;
  await until('the run is computed', async () => (await runRow(runId)).status === 'done', 60_000);
  // A run over another range that nobody computes (its queue has no worker): no result yet.
  queuedId = (await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: { to: 0.25 }, notify: false, queue: 'report-nobody' })).id;
  const elsewhere = await createModel(other.modeler, other.workspaceId, twoLakes(), 'Not yours');
  otherRunId = (await startRun(other.workspaceId, other.modeler.user!.id, { modelId: elsewhere.modelId, settings: {}, notify: false, queue: 'report-nobody' })).id;

  const post = async (body: unknown) => {
    const res = await w.reviewer.post(ws(`/api/runs/${runId}/comments`, w.workspaceId), body);
    if (res.status !== 201) throw new Error(`comment: ${res.status} ${res.text}`);
    return res.body.comment.id as number;
  };
  openId = await post({ target: { kind: 'band', ref: '0' }, body: 'Is the first band edge robust?' });
  resolvedId = await post({ body: 'Typo in the caption.' });
  const patched = await w.modeler.patch(ws(`/api/comments/${resolvedId}`, w.workspaceId), { resolved: true });
  expect(patched.status).toBe(200);
}, 120_000);

afterAll(async () => { await worker?.stop(); });

describe('reportRunIds(params)', () => {
  it('reads comma lists and repeated runs=, keeps positive integers once each, first occurrence first', () => {
    const p = new URLSearchParams('runs=3,1&runs=3&runs=abc&runs=-2&runs=1e3&runs=0&runs= 7 &runs=2.5');
    expect(reportRunIds(p)).toEqual([3, 1, 7]);
  });
  it(`caps the list at ${REPORT_MAX_RUNS} runs`, () => {
    const p = new URLSearchParams(`runs=${Array.from({ length: 20 }, (_, k) => k + 1).join(',')}`);
    expect(reportRunIds(p)).toEqual(Array.from({ length: REPORT_MAX_RUNS }, (_, k) => k + 1));
  });
});

describe('listReportChoices(workspaceId)', () => {
  it('offers the finished runs of the workspace only', async () => {
    const ids = (await listReportChoices(w.workspaceId)).map((c) => c.id);
    expect(ids).toContain(runId);
    expect(ids).not.toContain(queuedId);
    expect(ids).not.toContain(otherRunId);
    const mine = (await listReportChoices(w.workspaceId)).find((c) => c.id === runId)!;
    expect(mine).toMatchObject({ modelName: 'Reported lakes', versionNumber: 1 });
  });
});

describe('gatherReport(workspaceId, runIds)', () => {
  it('names each special point\'s state components by node id, in the order of the state vector', async () => {
    const { runs, problems } = await gatherReport(w.workspaceId, [runId]);
    expect(problems).toEqual([]);
    expect(runs).toHaveLength(1);
    const [r] = runs;
    expect(r.stateNames).toEqual(['upper', 'lower']);
    expect(r.diagram.bifurcations.length).toBeGreaterThan(0);
    for (const sp of r.diagram.bifurcations) expect(sp.x).toHaveLength(2);
  });

  it('describes the model of the run\'s version: the network equation, f and g as TeX, parameters, node values and links', async () => {
    const [r] = (await gatherReport(w.workspaceId, [runId])).runs;
    const m = r.model!;
    expect(m.kind).toBe('network');
    expect(m.equations.map((e) => e.label)).toEqual(['Each node i', 'Element rate', 'Coupling term']);
    expect(m.equations[0].tex).toBe('\\frac{\\mathrm{d}{P}_{i}}{\\mathrm{d}t} = f\\left({P}_{i}\\right) + \\beta \\sum_{j \\to i} w_{ji}\\, g\\left({P}_{j}, {P}_{i}\\right)');
    // The editor's preview printer (mathjs toTex, every symbol italic): P' = a - b P + P^8/(1+P^8).
    expect(m.equations[1].tex).toBe('f(P) = a-\\mathit{b}\\cdot P+\\frac{{ P}^{8}}{1+{ P}^{8}}');
    expect(m.equations[2].tex).toBe('g(\\mathit{source}, \\mathit{target}) = \\mathit{source}- \\mathit{target}');
    // twoLakes: a = 0.05 by default, both nodes set their own a; b = 0.6 everywhere; beta swept 0 to 0.3.
    expect(m.parameters.map((p) => [p.name, p.value])).toEqual([['beta', 'swept 0 to 0.3'], ['a', '0.05 (default)'], ['b', '0.6']]);
    expect(m.parameters[1].meaning).toBe('element parameter; set per node at 2 of 2 nodes (below)');
    expect(m.nodes).toEqual([{ id: 'upper', overrides: [{ name: 'a', value: 0.08 }] }, { id: 'lower', overrides: [{ name: 'a', value: 0.0811 }] }]);
    expect(m.links).toEqual([{ from: 'upper', to: 'lower', weight: 1, twoWay: false }]);
    expect(m.linkCount).toBe('1 directed link');
  });

  it('states the swept range of the run (its settings), not only the document\'s', async () => {
    const { modelId } = await createModel(w.modeler, w.workspaceId, twoLakes({ a2: 0.0633 }), 'Reported lakes, narrow');
    const narrow = (await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: { from: 0.05, to: 0.2 }, notify: false, queue })).id;
    await until('the narrow run is computed', async () => (await runRow(narrow)).status === 'done', 60_000);
    const [r] = (await gatherReport(w.workspaceId, [narrow])).runs;
    expect(r.model!.parameters[0]).toMatchObject({ name: 'beta', value: 'swept 0.05 to 0.2' });
    expect(r.model!.sweep).toEqual({ parameter: 'beta', from: 0.05, to: 0.2 });
  }, 90_000);

  it('lists only the open comments of the run, oldest first', async () => {
    const [r] = (await gatherReport(w.workspaceId, [runId])).runs;
    const ids = r.openComments.map((c) => c.id);
    expect(ids).toContain(openId);
    expect(ids).not.toContain(resolvedId);
    expect(r.openComments.every((c) => !c.resolved && c.runId === runId)).toBe(true);
    expect(r.openComments.find((c) => c.id === openId)).toMatchObject({ target: { kind: 'band', ref: '0' }, body: 'Is the first band edge robust?' });
  });

  it('turns missing runs, runs of another workspace and runs without a result into problems, keeping the order of the rest', async () => {
    const { runs, problems } = await gatherReport(w.workspaceId, [999_999_999, otherRunId, runId, queuedId]);
    expect(runs.map((r) => r.run.id)).toEqual([runId]);
    expect(problems).toEqual([
      'Run 999999999: no such run in this workspace',
      `Run ${otherRunId}: no such run in this workspace`,
      `Run ${queuedId}: run ${queuedId} has no result (it is queued)`,
    ]);
  });
});

describe('GET /report', () => {
  it('renders the run of the caller\'s workspace with node-named states, the typeset model and its open comment', async () => {
    const res = await w.reviewer.get(ws(`/report?runs=${runId}`, w.workspaceId));
    expect(res.status).toBe(200);
    expect(res.text).toContain(`Figure 1. Reported lakes, version 1 (run ${runId})`);
    expect(res.text).toContain('data-testid="report-state-entry"><span class="text-ink-soft">upper</span>');
    expect(res.text).toContain('Is the first band edge robust?');
    expect(res.text).not.toContain('Typo in the caption.');
    // KaTeX renders on the server: MathML with the TeX source as its annotation.
    expect(res.text).toContain('<annotation encoding="application/x-tex">\\frac{\\mathrm{d}{P}_{i}}{\\mathrm{d}t} = f\\left({P}_{i}\\right) + \\beta \\sum_{j \\to i}');
    // The picker lists this workspace's finished run as a ticked checkbox, and no other workspace's.
    expect(res.text).toMatch(new RegExp(`<input type="checkbox" name="runs" value="${runId}"[^>]*checked`));
    expect(res.text).not.toContain(`value="${otherRunId}"`);
  });

  it('answers another workspace\'s run as a problem without showing it, and sends a signed-out visitor to sign in', async () => {
    const res = await w.owner.get(ws(`/report?runs=${otherRunId}`, w.workspaceId));
    expect(res.status).toBe(200);
    expect(res.text).toContain(`Run ${otherRunId}: no such run in this workspace`);
    expect(res.text).not.toContain('Not yours');
    expect(res.text).not.toContain('data-testid="report-section"');
    const anonymous = await new Client().get(`/report?runs=${runId}`);
    expect(anonymous.status).toBe(303);
    expect(anonymous.headers.get('location')).toMatch(/^\/sign-in\?next=/);
  });
});
