/**
 * Role-matrix rows for the service routes (models, versions, runs, results, band tags, comments),
 * spread into routeMatrix in route-matrix.ts. Resources are made in workspace A through the API by
 * its modeler (tags) or reviewer (comments), so "author" rules show up in the expected statuses.
 */
// Only the hoisted function `allow` is imported: route-matrix.ts imports this file, so its consts
// are not initialised yet while this module's rows are built.
import { allow, type MatrixContext, type RouteCase, type Vars } from './route-matrix.ts';

const ALL_ROLES = ['owner', 'modeler', 'reviewer'] as const;

const q = (c: MatrixContext) => `workspace=${c.a.workspaceId}`;
let serial = 0;

/** An invented two-lake model; `a2` makes each document (and its hash) distinct. */
function lakes(a2: number) {
  return {
    format: 'brinkmap/network-1', name: 'Matrix lakes (invented)',
    element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
    nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'lower', parameters: { a: a2 } }],
    links: [{ from: 'upper', to: 'lower', weight: 1 }],
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 0.2 },
  };
}

async function freshModel(c: MatrixContext): Promise<Vars> {
  const res = await c.a.modeler.post(`/api/models?${q(c)}`, { name: `Matrix model ${++serial}`, document: lakes(0.05 + serial * 1e-6) });
  if (res.status !== 201) throw new Error(`prepare model: ${res.status} ${res.text}`);
  return { modelId: String(res.body.model.id) };
}

/** A queued run on a queue no worker serves (so it stays queued until the row cancels it). */
async function queuedRun(c: MatrixContext): Promise<Vars> {
  const { modelId } = await freshModel(c);
  const { startRun } = await import('../../src/lib/server/runs/repository.ts');
  const run = await startRun(c.a.workspaceId, c.a.modeler.user!.id, { modelId: Number(modelId), settings: {}, notify: false, queue: 'matrix-idle' });
  return { modelId, runId: String(run.id) };
}

let finished: Promise<Vars> | null = null;
/** One run with a real stored result, computed once in this process through the worker's own code path. */
function finishedRun(c: MatrixContext): Promise<Vars> {
  finished ??= (async () => {
    const { modelId } = await freshModel(c);
    const { startRun } = await import('../../src/lib/server/runs/repository.ts');
    const { claimRun, completeRun } = await import('../../src/lib/server/runs/queue.ts');
    const { computeTrace } = await import('../../src/lib/server/runs/compute.ts');
    const { ENGINE_VERSION } = await import('../../src/lib/atlas/engine-version.ts');
    const queue = `matrix-${Date.now()}`;
    const run = await startRun(c.a.workspaceId, c.a.modeler.user!.id, { modelId: Number(modelId), settings: {}, notify: false, queue });
    if (run.status !== 'done') {
      const claimed = await claimRun('route-matrix', queue, 60_000);
      if (!claimed) throw new Error('prepare finished run: nothing to claim');
      const out = computeTrace(claimed.documentText, claimed.settings, { onProgress: () => undefined, isCancelled: () => false });
      if (!(await completeRun(claimed, 'route-matrix', out, ENGINE_VERSION))) throw new Error('prepare finished run: complete failed');
    }
    return { modelId, runId: String(run.id) };
  })();
  return finished;
}

async function tagByModeler(c: MatrixContext): Promise<Vars> {
  const v = await finishedRun(c);
  const res = await c.a.modeler.post(`/api/runs/${v.runId}/tags?${q(c)}`, { from: 0, to: 0.1, name: 'Matrix tag', colour: '#336699', note: '' });
  if (res.status !== 201) throw new Error(`prepare tag: ${res.status} ${res.text}`);
  return { ...v, tagId: String(res.body.tag.id) };
}

async function commentByReviewer(c: MatrixContext): Promise<Vars> {
  const v = await finishedRun(c);
  const res = await c.a.reviewer.post(`/api/runs/${v.runId}/comments?${q(c)}`, { body: 'Matrix comment' });
  if (res.status !== 201) throw new Error(`prepare comment: ${res.status} ${res.text}`);
  return { ...v, commentId: String(res.body.comment.id) };
}

export const serviceRoutes: RouteCase[] = [
  // --- models ---
  { route: '/api/models', method: 'GET', path: (c) => `/api/models?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/models', method: 'POST', path: (c) => `/api/models?${q(c)}`,
    body: () => ({ name: `Matrix create ${++serial}`, document: lakes(0.04 + serial * 1e-6) }),
    expect: allow(201, 'owner', 'modeler'),
  },
  {
    route: '/api/models/import', method: 'POST', path: (c) => `/api/models/import?${q(c)}`,
    body: () => lakes(0.03 + ++serial * 1e-6),
    expect: allow(201, 'owner', 'modeler'), note: 'the JSON body is the document file itself',
  },
  { route: '/api/models/[id]', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/models/${v.modelId}?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/models/[id]', method: 'PATCH', prepare: freshModel, path: (c, v) => `/api/models/${v.modelId}?${q(c)}`,
    body: () => ({ description: 'edited by the matrix' }), expect: allow(200, 'owner', 'modeler'),
  },
  {
    route: '/api/models/[id]/archive', method: 'POST', prepare: freshModel, path: (c, v) => `/api/models/${v.modelId}/archive?${q(c)}`,
    body: () => ({ archived: true }), expect: allow(200, 'owner', 'modeler'),
  },
  { route: '/api/models/[id]/versions', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/models/${v.modelId}/versions?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/models/[id]/versions', method: 'POST', prepare: freshModel, path: (c, v) => `/api/models/${v.modelId}/versions?${q(c)}`,
    body: () => ({ document: lakes(0.02 + ++serial * 1e-6), changeNote: 'matrix edit' }), expect: allow(201, 'owner', 'modeler'),
  },
  { route: '/api/models/[id]/versions/[number]', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/models/${v.modelId}/versions/1?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/models/[id]/versions/[number]/export', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/models/${v.modelId}/versions/1/export?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/models/[id]/diff', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/models/${v.modelId}/diff?from=1&to=1&${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/models/[id]/import-csv', method: 'POST', prepare: freshModel, path: (c, v) => `/api/models/${v.modelId}/import-csv?${q(c)}`,
    body: () => ({ not: 'csv' }),
    expect: allow(400, 'owner', 'modeler'),
    note: 'the matrix can only send JSON, which this route refuses (400 wrong content type) AFTER the role check; CSV success is in service/models.test.ts',
  },
  // --- runs and results ---
  { route: '/api/runs', method: 'GET', path: (c) => `/api/runs?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs', method: 'POST', prepare: finishedRun, path: (c) => `/api/runs?${q(c)}`,
    body: (_c, v) => ({ modelId: Number(v.modelId) }), expect: allow(201, 'owner', 'modeler'),
    note: 'same inputs as the finished run: answered from the stored result, no computation queued',
  },
  { route: '/api/runs/[id]', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/runs/[id]/cancel', method: 'POST', prepare: queuedRun, path: (c, v) => `/api/runs/${v.runId}/cancel?${q(c)}`, expect: allow(200, 'owner', 'modeler') },
  { route: '/api/runs/[id]/progress', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/progress?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/runs/[id]/events', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/events?${q(c)}`, expect: allow(200, ...ALL_ROLES), note: 'a finished run: the stream sends its state and `end`, then closes' },
  { route: '/api/runs/[id]/result', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/result?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/runs/[id]/result.csv', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/result.csv?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  { route: '/api/runs/[id]/result.json', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/result.json?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  // --- band tags ---
  { route: '/api/runs/[id]/tags', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/tags?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs/[id]/tags', method: 'POST', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/tags?${q(c)}`,
    body: () => ({ from: 0.01, to: 0.02, name: 'Matrix band', colour: '#aa5500', note: 'n' }), expect: allow(201, 'owner', 'modeler'),
  },
  {
    route: '/api/tags/[id]', method: 'PATCH', prepare: tagByModeler, path: (c, v) => `/api/tags/${v.tagId}?${q(c)}`,
    body: () => ({ note: 'edited' }), expect: allow(200, 'owner', 'modeler'), note: 'the tag is the modeler\'s own; owners may edit any',
  },
  { route: '/api/tags/[id]', method: 'DELETE', prepare: tagByModeler, path: (c, v) => `/api/tags/${v.tagId}?${q(c)}`, expect: allow(204, 'owner', 'modeler') },
  // --- comments ---
  { route: '/api/runs/[id]/comments', method: 'GET', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/comments?${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/runs/[id]/comments', method: 'POST', prepare: finishedRun, path: (c, v) => `/api/runs/${v.runId}/comments?${q(c)}`,
    body: () => ({ target: { kind: 'band', ref: '0' }, body: 'Is the band edge robust?' }), expect: allow(201, 'owner', 'reviewer'),
  },
  { route: '/api/comments', method: 'GET', path: (c) => `/api/comments?open=1&${q(c)}`, expect: allow(200, ...ALL_ROLES) },
  {
    route: '/api/comments/[id]', method: 'PATCH', prepare: commentByReviewer, path: (c, v) => `/api/comments/${v.commentId}?${q(c)}`,
    body: () => ({ body: 'edited text' }), expect: allow(200, 'owner', 'reviewer'), note: 'the comment is the reviewer\'s own; modelers may only resolve',
  },
  { route: '/api/comments/[id]', method: 'DELETE', prepare: commentByReviewer, path: (c, v) => `/api/comments/${v.commentId}?${q(c)}`, expect: allow(204, 'owner', 'reviewer') },
];

