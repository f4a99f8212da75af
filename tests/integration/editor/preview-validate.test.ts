/**
 * The editor's endpoints against the running test server: /api/validate answers with the engine's
 * path-named issues, /api/preview traces a small network in the request and refuses large ones in words.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, rowCounts, workspaceWithRoles, type WorkspaceFixture } from '../helpers.ts';
import { twoCubicsDocument } from '../route-matrix-editor.ts';

closeDbAfterAll(afterAll);

let ws: WorkspaceFixture;
beforeAll(async () => {
  ws = await workspaceWithRoles('Editor endpoints');
}, 60_000);

const path = (p: string) => `${p}?workspace=${ws.workspaceId}`;

describe('POST /api/validate', () => {
  it('returns valid: true and no issues for a valid document', async () => {
    const res = await ws.reviewer.post(path('/api/validate'), { document: twoCubicsDocument });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ valid: true, issues: [] });
  });

  it('names the field of an unknown symbol and of a bad link end, and stores nothing', async () => {
    const before = await rowCounts(['models', 'model_versions']);
    const document = {
      ...twoCubicsDocument,
      element: { ...twoCubicsDocument.element, rate: 'r * x - x^3 + c' },
      links: [{ from: 'left', to: 'nowhere', weight: 1 }],
    };
    const res = await ws.modeler.post(path('/api/validate'), { document });
    expect(res.status).toBe(200);
    expect(res.body.valid).toBe(false);
    const paths = (res.body.issues as { path: string; message: string }[]).map((i) => i.path);
    expect(paths).toContain('element.rate');
    expect(paths).toContain('links[0].to');
    expect(await rowCounts(['models', 'model_versions'])).toEqual(before);
  });

  it('answers a body that is not JSON with 415 and a field-less message', async () => {
    const res = await ws.modeler.request('POST', path('/api/validate'), { raw: 'x', headers: { 'content-type': 'text/plain' } });
    expect(res.status).toBe(415);
    expect(res.body.error.code).toBe('unsupported_media_type');
  });
});

describe('POST /api/preview', () => {
  it('traces the two-cubic network in the request: branches from the start and the symmetric pitchfork', async () => {
    const res = await ws.modeler.post(path('/api/preview'), { document: twoCubicsDocument });
    expect(res.status).toBe(200);
    expect(res.body.valid).toBe(true);
    expect(res.body.diagram.parameter).toBe('beta');
    expect(res.body.diagram.variables).toEqual(['left', 'right']);
    expect(res.body.diagram.branches.length).toBeGreaterThan(0);
    // Derivation: x' = x - x^3 + beta (y - x), y' = y - y^3 + beta (x - y) (r = 1). At the origin the
    // Jacobian is [[1 - beta, beta], [beta, 1 - beta]] with eigenvalues 1 (along (1, 1)) and 1 - 2 beta
    // (along (1, -1)), zero at beta = 1/2; the antisymmetric equilibria (a, -a) satisfy
    // a - a^3 - 2 beta a = 0, so a^2 = 1 - 2 beta and they meet the origin there: a pitchfork at beta = 1/2.
    const pitchforks = (res.body.diagram.bifurcations as { type: string; p: number }[]).filter((b) => b.type === 'pitchfork');
    expect(pitchforks.some((b) => Math.abs(b.p - 0.5) < 1e-6)).toBe(true);
    expect(typeof res.body.elapsedMs).toBe('number');
  });

  it('answers an invalid document with valid: false and its issues, not an error', async () => {
    const res = await ws.modeler.post(path('/api/preview'), { document: { ...twoCubicsDocument, sweep: { parameter: 'zeta', from: 0, to: 1 } } });
    expect(res.status).toBe(200);
    expect(res.body.valid).toBe(false);
    expect(res.body.issues[0].path).toBe('sweep.parameter');
  });

  it('refuses a five-node network with 422 and says to start a run', async () => {
    const nodes = ['a', 'b', 'c', 'd', 'e'].map((id) => ({ id }));
    const res = await ws.modeler.post(path('/api/preview'), { document: { ...twoCubicsDocument, nodes, links: [] } });
    expect(res.status).toBe(422);
    expect(res.body.error.message).toContain('up to 4 nodes');
  });
});
