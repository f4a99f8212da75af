import { handler } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunResult } from '../../../../lib/server/results/repository.ts';
import { diagramToCsv } from '../../../../lib/plot/data-export.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';
import { overrideNote } from '../../../../lib/plot/run-override.ts';

/** Every stored point as CSV in the one layout of lib/plot/data-export.ts, with the run's provenance block. */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunResult(workspace.id, runId);
  const provenance = { modelName: r.run.modelName, versionHash: r.run.versionHash, runId: String(runId), engineVersion: r.engineVersion, date: r.createdAt, override: overrideNote(r.run) };
  return new Response(diagramToCsv(r.diagram(), provenance), {
    status: 200,
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="run-${runId}-v${r.run.versionNumber}.csv"`,
    },
  });
});
