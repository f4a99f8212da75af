import { handler, json } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunEscapes } from '../../../../lib/server/escapes/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/**
 * An escape study run's rows: { run, study, points } with one point per stored parameter value
 * (also while the run is going on; `study` is null until it is finished). A trace run: 409.
 */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunEscapes(workspace.id, runId);
  const provenance = {
    model: r.run.modelName, modelId: r.run.modelId, version: r.run.versionNumber, versionHash: r.run.versionHash, runId,
    settings: r.run.settings, engineVersion: r.study?.engineVersion ?? r.run.engineVersion,
    note: 'Model results are indicative; defer to domain experts and local regulation.',
  };
  return json({ provenance, run: r.run, study: r.study, points: r.points });
});
