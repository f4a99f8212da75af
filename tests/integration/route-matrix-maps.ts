/** Role-matrix rows for the map routes (GET /api/runs/:id/map and .csv, GET/POST /api/runs/:id/slices, POST /api/runs of kind 'map'). */
// Only the hoisted function `allow` is imported: route-matrix.ts imports this file (its consts are not initialized yet).
import { allow, type MatrixContext, type RouteCase, type Vars } from './route-matrix.ts';

const ALL_ROLES = ['owner', 'modeler', 'reviewer'] as const;
const q = (c: MatrixContext) => `workspace=${c.a.workspaceId}`;
let serial = 0;

/** Symmetric cubic pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i) (tests/lib/regimes/fixtures.ts; invented). */
function pair(r: number) {
  return {
    format: 'brinkmap/network-1', name: 'Matrix map pair (invented)',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r } },
    nodes: [{ id: 'x1' }, { id: 'x2' }],
    links: [{ from: 'x1', to: 'x2', weight: 1, twoWay: true }],
    coupling: { parameter: 'beta', value: 0 },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  };
}

export const MATRIX_MAP_SETTINGS = { second: 'r', secondFrom: 0.05, secondTo: 0.25, seeds: 2, regionColumns: 0, regionRows: 0 };

async function model(c: MatrixContext): Promise<Vars> {
  const res = await c.a.modeler.post(`/api/models?${q(c)}`, { name: `Matrix map model ${Date.now()}-${++serial}`, document: pair(0.1 + serial * 1e-6) });
  if (res.status !== 201) throw new Error(`prepare model: ${res.status} ${res.text}`);
  return { modelId: String(res.body.model.id) };
}

let finished: Promise<Vars> | null = null;
/**
 * A finished map run without a worker: the run is queued on a queue nobody serves, its map computed
 * here by the worker thread's own function (computeMap) and stored under the run's cache key.
 */
function mapRun(c: MatrixContext): Promise<Vars> {
  finished ??= (async () => {
    const { modelId } = await model(c);
    const { startRun } = await import('../../src/lib/server/runs/repository.ts');
    const { computeMap } = await import('../../src/lib/server/maps/compute.ts');
    const { mapResultRow } = await import('../../src/lib/server/maps/repository.ts');
    const { db } = await import('./helpers.ts');
    const run = await startRun(c.a.workspaceId, c.a.modeler.user!.id, { modelId: Number(modelId), kind: 'map', notify: false, queue: 'matrix-idle', settings: { ...MATRIX_MAP_SETTINGS, maxPointsPerCurve: 400, maxCurves: 8 } });
    const row = await db('runs as r').join('model_versions as v', 'v.id', 'r.model_version_id').where('r.id', run.id).first('r.cache_key', 'r.settings', 'v.document');
    const out = computeMap(row.document, typeof row.settings === 'string' ? JSON.parse(row.settings) : row.settings, { onProgress: () => undefined, isCancelled: () => false });
    // Another test file importing these rows (write-routes-property) may have stored the same map already.
    const stored = await db('map_results').where({ cache_key: row.cache_key }).first('id');
    const id = stored ? stored.id : (await db('map_results').insert({ cache_key: row.cache_key, ...mapResultRow(out) }))[0];
    await db('runs').where({ id: run.id }).update({ status: 'done', progress: 1, map_result_id: id, finished_at: db.raw('NOW(3)') });
    return { modelId, runId: String(run.id) };
  })();
  return finished;
}

let sliceValue = 0;

export const mapRoutes: RouteCase[] = [
  { route: '/api/runs/[id]/slices', method: 'GET', prepare: mapRun, path: (c, v) => `/api/runs/${v.runId}/slices?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs/[id]/slices', method: 'POST', prepare: mapRun, path: (c, v) => `/api/runs/${v.runId}/slices?${q(c)}`,
    // A new value in the map's range (0.05 to 0.25) per call, so every allowed caller starts a slice (201, not the cached 200).
    body: () => ({ value: Number((0.06 + 0.01 * (++sliceValue % 19)).toFixed(2)) }), expect: allow(201, 'owner', 'modeler'),
    note: 'starts a computation like POST /api/runs: reviewers read slices (GET) but do not start them',
  },
  { route: '/api/runs/[id]/map', method: 'GET', prepare: mapRun, path: (c, v) => `/api/runs/${v.runId}/map?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/runs/[id]/map.csv', method: 'GET', prepare: mapRun, path: (c, v) => `/api/runs/${v.runId}/map.csv?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs', method: 'POST', prepare: model, path: (c) => `/api/runs?${q(c)}`,
    body: (_c, v) => ({ modelId: Number(v.modelId), kind: 'map', settings: MATRIX_MAP_SETTINGS }), expect: allow(201, 'owner', 'modeler'),
    note: "kind 'map': a small map queued on the default queue; reviewers cannot start one",
  },
];
