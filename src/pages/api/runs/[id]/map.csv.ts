import { handler, json } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunMap } from '../../../../lib/server/maps/repository.ts';
import { documentVariables, mapToCsv } from '../../../../lib/server/maps/csv.ts';
import { getVersionById } from '../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/** A map run's curve points as CSV (curve, type, point, both parameters, frequency, state), after a provenance block. */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunMap(workspace.id, runId);
  if (!r.map || !r.info) {
    return json({ error: { code: 'not_ready', message: `run ${runId} is ${r.run.status}; the map is there once it is done` } }, 409);
  }
  const version = await getVersionById(workspace.id, r.run.versionId);
  const s = r.run.settings as unknown as { second?: string; secondFrom?: number; secondTo?: number };
  const csv = mapToCsv(r.map, {
    model: r.run.modelName, 'version hash': r.run.versionHash, run: runId, 'engine version': r.info.engineVersion,
    'second parameter': `${s.second ?? r.info.second} from ${s.secondFrom ?? ''} to ${s.secondTo ?? ''}`, date: r.info.createdAt,
  }, documentVariables(version?.document));
  return new Response(csv, {
    status: 200,
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="run-${runId}-v${r.run.versionNumber}-map.csv"`,
    },
  });
});
