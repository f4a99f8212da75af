import { badRequest, conflict, handler, json } from '../../../../../lib/server/http.ts';
import { requireRole } from '../../../../../lib/server/auth/guards.ts';
import { atlasCacheKey, getRunEscapes } from '../../../../../lib/server/escapes/repository.ts';
import { findResultDiagram } from '../../../../../lib/server/results/repository.ts';
import { getVersionById } from '../../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../../lib/server/models/route-params.ts';
import type { StoredEscapeSettings } from '../../../../../lib/server/escapes/schema.ts';
import { compileModelJson } from '../../../../../lib/model/index.ts';
import type { ModelDocument } from '../../../../../lib/model/schema.ts';
import type { Diagram } from '../../../../../lib/atlas/types.ts';
import { resolveNoise } from '../../../../../lib/noise/noise-spec.ts';
import { MAX_PICTURE_PATHS, pathPicture, type PathPicture } from '../../../../../lib/noise/path-picture.ts';

/** Recent pictures (run, value, paths) -> JSON: the barriers of one value can take a second or two. */
const cache = new Map<string, PathPicture>();
const CACHE_SIZE = 32;

/**
 * GET /api/runs/:id/escapes/paths?p=<value>&paths=<K>: the path picture of a finished escape study
 * at one of its values (src/lib/noise/path-picture.ts): stable states, saddles, the minimum-action
 * path of every edge out of the start state and the study's first K sample paths (default 3, at
 * most 10). Another workspace's run: 404; `p` not one of the study's finished values or bad
 * `paths`: 400 naming the field; not an escape study, not finished, a model without 2 or 3 state
 * variables, or the atlas no longer stored: 409.
 */
export const GET = handler(async ({ locals, params, url }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunEscapes(workspace.id, runId);
  if (r.run.status !== 'done' || !r.study) throw conflict(`run ${runId} is ${r.run.status}; the path picture needs a finished escape study`);
  const pText = url.searchParams.get('p');
  const p = pText === null || pText.trim() === '' ? Number.NaN : Number(pText);
  if (!Number.isFinite(p)) throw badRequest('p: give one of the study\'s parameter values as a number', 'p');
  const point = r.points.find((q) => q.status === 'done' && Math.abs(q.p - p) <= 1e-12 * Math.max(1, Math.abs(q.p)));
  if (!point) throw badRequest(`p: ${p} is not one of the study's finished values (${r.points.filter((q) => q.status === 'done').map((q) => q.p).join(', ')})`, 'p');
  const kText = url.searchParams.get('paths');
  const paths = kText === null ? 3 : Number(kText);
  if (!Number.isInteger(paths) || paths < 0 || paths > MAX_PICTURE_PATHS) throw badRequest(`paths: must be a whole number from 0 to ${MAX_PICTURE_PATHS}`, 'paths');

  const key = `${runId}:${point.p}:${paths}`;
  let picture = cache.get(key);
  if (!picture) {
    const version = await getVersionById(workspace.id, r.run.versionId);
    if (!version) throw conflict(`the model version of run ${runId} is no longer stored`);
    const document = JSON.parse(version.documentText) as ModelDocument;
    const system = compileModelJson(document);
    if (system.dimension !== 2 && system.dimension !== 3) throw conflict(`model: the path picture needs 2 or 3 state variables, this model has ${system.dimension}`);
    const settings = r.run.settings as unknown as StoredEscapeSettings;
    const atlas = await findResultDiagram(atlasCacheKey(r.run.versionHash, document, settings.atlas ?? {}));
    if (!atlas) throw conflict(`the atlas run ${runId} stands on is no longer stored (a newer engine?); rerun the study`);
    const diagram = JSON.parse(atlas.diagramJson) as Diagram;
    try {
      picture = pathPicture(system, diagram, resolveNoise(document, settings.noise), point.p, {
        // The cap and step the study used at this value (stored with the point): the default cap
        // comes from a pilot of the study's first 32 paths, which a picture of a few paths would
        // not reproduce.
        paths, seed: settings.seed, start: settings.start, dt: point.dt ?? settings.dt, tMax: point.tMax ?? settings.tMax,
      });
    } catch (e) {
      if (e instanceof Error && e.name === 'NoiseSettingError') throw conflict(`no path picture at ${r.study.parameter} = ${point.p}: ${e.message}`);
      throw e;
    }
    cache.set(key, picture);
    if (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value!);
  }
  const provenance = {
    model: r.run.modelName, modelId: r.run.modelId, version: r.run.versionNumber, versionHash: r.run.versionHash, runId,
    engineVersion: r.study.engineVersion, note: 'Model results are indicative; defer to domain experts and local regulation.',
  };
  return json({ provenance, picture });
});
