import { handler, json } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunMap } from '../../../../lib/server/maps/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/**
 * A map run's two-parameter map in the CLI's shape ({ parameters, ranges, curves, points, regions,
 * diagnostics }, `atlas map`) with `provenance`, `secondValue` (the document's own value of the
 * second parameter) and `run`. Not finished yet: 409. Another kind of run: 409.
 */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunMap(workspace.id, runId);
  if (!r.map || !r.info) {
    return json({ error: { code: 'not_ready', message: `run ${runId} is ${r.run.status}; the map is there once it is done` } }, 409);
  }
  const provenance = {
    model: r.run.modelName, modelId: r.run.modelId, version: r.run.versionNumber, versionHash: r.run.versionHash, runId,
    settings: r.run.settings, engineVersion: r.info.engineVersion, computedAt: r.info.createdAt,
    note: 'Model results are indicative; defer to domain experts and local regulation.',
  };
  return json({ ...r.map, secondValue: r.info.secondValue, provenance });
});
