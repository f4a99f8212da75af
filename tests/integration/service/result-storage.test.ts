/**
 * Stored results in the encoded form (docs/storage.md): what the API serves for a run equals, byte
 * for byte, the JSON text of the diagram the engine computes for the run's document and settings;
 * rows stored as JSON text before the encoded form are served the same way; the encoded row is
 * smaller than the JSON text it stands for.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { startRun } from '../../../src/lib/server/runs/repository.ts';
import { compileModelJson } from '../../../src/lib/model/index.ts';
import { traceDiagram, type Diagram } from '../../../src/lib/atlas/index.ts';
import { previewOf, PREVIEW_POINTS } from '../../../src/lib/server/results/preview.ts';
import { thinDiagram } from '../../../src/lib/server/results/thin.ts';
import { diagramToCsv } from '../../../src/lib/plot/data-export.ts';
import { createModel, runRow, spawnWorker, until, ws, type SpawnedWorker } from './fixtures.ts';

closeDbAfterAll(afterAll);

/** Invented three-node cubic chain (x' = r_i + x - x^3, two-way diffusive links): 27 starting patterns, a few thousand points. */
function threeCubics(name: string, r0: number) {
  return {
    format: 'brinkmap/network-1', name,
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: [0, 1, 2].map((i) => ({ id: `n${i + 1}`, parameters: { r: r0 + 0.05 * i } })),
    links: [{ from: 'n1', to: 'n2', weight: 1, twoWay: true }, { from: 'n2', to: 'n3', weight: 1, twoWay: true }],
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  };
}

let w: WorkspaceFixture;
let worker: SpawnedWorker;
const queue = `storage-${Date.now()}`;
beforeAll(async () => {
  w = await workspaceWithRoles('Service result storage');
  worker = spawnWorker(queue);
}, 60_000);
afterAll(async () => {
  const code = await worker.stop();
  expect(code, worker.output()).toBe(0);
});

/** Runs the document through the worker; returns the run id, its result row and the engine's own diagram for the run's stored inputs. */
async function computed(name: string, r0: number): Promise<{ runId: number; row: Record<string, any>; engine: Diagram }> {
  const { modelId } = await createModel(w.modeler, w.workspaceId, threeCubics(name, r0), name);
  const run = await startRun(w.workspaceId, w.modeler.user!.id, { modelId, settings: {}, notify: false, queue });
  const done = await until(`run ${run.id} done`, async () => {
    const r = await runRow(run.id);
    if (r.status === 'failed') throw new Error(`run failed: ${r.error}\n${worker.output()}`);
    return r.status === 'done' && r;
  }, 120_000);
  const version = await db('model_versions').where({ id: done.model_version_id }).first('document');
  const settings = typeof done.settings === 'string' ? JSON.parse(done.settings) : done.settings;
  // The engine itself, in this process, on the run's stored document and settings (what computeTrace traces).
  const engine = traceDiagram(compileModelJson(JSON.parse(version.document)), { ...settings });
  const row = await db('results').where({ id: done.result_id }).first();
  return { runId: run.id, row, engine };
}

/** Where two texts first differ, with some context, for a readable failure. */
function firstDifference(a: string, b: string): string {
  let i = 0;
  while (i < a.length && i < b.length && a[i] === b[i]) i++;
  return i === a.length && i === b.length ? 'same' : `first difference at ${i} of ${a.length}/${b.length}: …${a.slice(Math.max(0, i - 80), i + 80)}… vs …${b.slice(Math.max(0, i - 80), i + 80)}…`;
}

/** The JSON text of ?points=budget as the route built it before the encoded form: the view thinned, `thinned.from` = all stored points. */
function thinnedText(engine: Diagram, budget: number): string {
  const all = engine.branches.reduce((n, b) => n + b.points.length, 0);
  const view = budget <= PREVIEW_POINTS ? previewOf(engine) : engine;
  if (view.branches.reduce((n, b) => n + b.points.length, 0) <= budget) return JSON.stringify(view);
  const t = thinDiagram(view, budget);
  return JSON.stringify({ ...t, thinned: { from: all, to: t.branches.reduce((n, b) => n + b.points.length, 0) } });
}

/** The bytes between `"diagram":` and `,"regimes":` in a response body. */
function servedDiagram(text: string): string {
  const from = text.indexOf('"diagram":') + '"diagram":'.length;
  const to = text.lastIndexOf(',"regimes":');
  return text.slice(from, to);
}

describe('encoded results through the API', () => {
  it('the worker stores the encoded form; result, preview, thinned result, download and CSV serve what the engine computed', async () => {
    const { runId, row, engine } = await computed('Storage cubics A (invented)', 0.05);
    const engineText = JSON.stringify(engine);
    const points = engine.branches.reduce((n, b) => n + b.points.length, 0);
    expect(points, 'the preview has to thin this diagram').toBeGreaterThan(PREVIEW_POINTS);
    expect(row.diagram).toBeNull();
    expect(row.preview).toBeNull();
    expect(row.diagram_blob).toBeTruthy();
    // Derived, not a fixed size: the encoded diagram is a fraction of its JSON text.
    expect(row.diagram_blob.byteLength).toBeLessThan(Buffer.byteLength(engineText) / 3);

    const full = await w.reviewer.get(ws(`/api/runs/${runId}/result`, w.workspaceId));
    expect(full.status).toBe(200);
    expect(firstDifference(servedDiagram(full.text), engineText)).toBe('same');
    expect(full.body.result.pointCount).toBe(points);

    const previewText = JSON.stringify(previewOf(engine));
    const preview = await w.reviewer.get(ws(`/api/runs/${runId}/result?view=preview`, w.workspaceId));
    expect(servedDiagram(preview.text)).toBe(previewText);
    expect(preview.body.result.viewPoints).toBe(previewOf(engine).branches.reduce((n, b) => n + b.points.length, 0));

    for (const budget of [5000, 2000]) {
      const thin = await w.reviewer.get(ws(`/api/runs/${runId}/result?points=${budget}`, w.workspaceId));
      expect(thin.body.result.diagram.thinned.from).toBe(points);
      expect(servedDiagram(thin.text)).toBe(thinnedText(engine, budget));
      expect(thin.body.result.viewPoints).toBe(thin.body.result.diagram.thinned.to);
      expect(thin.body.result.diagram.bifurcations).toEqual(JSON.parse(engineText).bifurcations);
    }

    const download = await w.reviewer.get(ws(`/api/runs/${runId}/result.json`, w.workspaceId));
    expect(servedDiagram(download.text)).toBe(engineText);

    const csv = await w.reviewer.get(ws(`/api/runs/${runId}/result.csv`, w.workspaceId));
    const p = download.body.provenance;
    const expectedCsv = diagramToCsv(engine, { modelName: p.model, versionHash: p.versionHash, runId: String(runId), engineVersion: p.engineVersion, date: p.computedAt });
    expect(csv.text).toBe(expectedCsv);
  }, 180_000);

  it('a result row stored as JSON text (before the encoded form) is served with the same bytes', async () => {
    const { runId, row, engine } = await computed('Storage cubics B (invented)', 0.06);
    const engineText = JSON.stringify(engine);
    const previewText = JSON.stringify(previewOf(engine));
    // The row as the JSON-text storage wrote it: diagram and preview text, no blob.
    await db('results').where({ id: row.id }).update({ diagram: engineText, preview: previewText, diagram_blob: null });
    const full = await w.reviewer.get(ws(`/api/runs/${runId}/result`, w.workspaceId));
    expect(servedDiagram(full.text)).toBe(engineText);
    const preview = await w.reviewer.get(ws(`/api/runs/${runId}/result?view=preview`, w.workspaceId));
    expect(servedDiagram(preview.text)).toBe(previewText);
    const thin = await w.reviewer.get(ws(`/api/runs/${runId}/result?points=5000`, w.workspaceId));
    expect(servedDiagram(thin.text)).toBe(thinnedText(engine, 5000));
    const download = await w.reviewer.get(ws(`/api/runs/${runId}/result.json`, w.workspaceId));
    expect(servedDiagram(download.text)).toBe(engineText);
    const csv = await w.reviewer.get(ws(`/api/runs/${runId}/result.csv`, w.workspaceId));
    const lines = csv.text.trim().split('\n').filter((l: string) => !l.startsWith('#'));
    expect(lines.length - 1).toBe(engine.branches.reduce((n, b) => n + b.points.length, 0));
    expect(csv.text).toContain(`# run: ${runId}`);
  }, 180_000);
});
