/** Role-matrix rows for the escape study routes (GET /api/runs/:id/escapes, .csv and /paths, POST /api/runs of kind 'escapes'). */
// Only the hoisted function `allow` is imported: route-matrix.ts imports this file (its consts are not initialized yet).
import { allow, type MatrixContext, type RouteCase, type Vars } from './route-matrix.ts';

const ALL_ROLES = ['owner', 'modeler', 'reviewer'] as const;

const q = (c: MatrixContext) => `workspace=${c.a.workspaceId}`;
let serial = 0;

function lakes(a2: number) {
  return {
    format: 'brinkmap/network-1', name: 'Matrix escape lakes (invented)',
    element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
    nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'lower', parameters: { a: a2 } }],
    links: [{ from: 'upper', to: 'lower', weight: 1 }],
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 0.3 },
    noise: { amplitude: 0.45 },
  };
}

async function model(c: MatrixContext): Promise<Vars> {
  const res = await c.a.modeler.post(`/api/models?${q(c)}`, { name: `Matrix escape model ${Date.now()}-${++serial}`, document: lakes(0.05 + serial * 1e-6 + 3e-4) });
  if (res.status !== 201) throw new Error(`prepare model: ${res.status} ${res.text}`);
  return { modelId: String(res.body.model.id) };
}

let queued: Promise<Vars> | null = null;
/** An escape run on a queue no worker serves: the routes answer with the run and no rows yet. */
function escapeRun(c: MatrixContext): Promise<Vars> {
  queued ??= (async () => {
    const { modelId } = await model(c);
    const { startRun } = await import('../../src/lib/server/runs/repository.ts');
    const run = await startRun(c.a.workspaceId, c.a.modeler.user!.id, {
      modelId: Number(modelId), kind: 'escapes', notify: false, queue: 'matrix-idle',
      settings: { values: [0.1], paths: 10, seed: 1, start: 'all-base', threads: 1, atlas: {} },
    });
    return { modelId, runId: String(run.id) };
  })();
  return queued;
}

export const escapeRoutes: RouteCase[] = [
  { route: '/api/runs/[id]/escapes', method: 'GET', prepare: escapeRun, path: (c, v) => `/api/runs/${v.runId}/escapes?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs/[id]/escapes/paths', method: 'GET', prepare: escapeRun, path: (c, v) => `/api/runs/${v.runId}/escapes/paths?p=0.1&${q(c)}`, expect: allow(409, ...ALL_ROLES),
    note: 'every role reaches the handler; the run is still queued, so 409 (the 200 is in tests/integration/service/escape-paths.test.ts)',
  },
  { route: '/api/runs/[id]/escapes.csv', method: 'GET', prepare: escapeRun, path: (c, v) => `/api/runs/${v.runId}/escapes.csv?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs', method: 'POST', prepare: model, path: (c) => `/api/runs?${q(c)}`,
    body: (_c, v) => ({ modelId: Number(v.modelId), kind: 'escapes', settings: { values: [0.1], paths: 20 } }), expect: allow(201, 'owner', 'modeler'),
    note: "kind 'escapes': a small study queued on the default queue (the document's noise amplitude)",
  },
];
