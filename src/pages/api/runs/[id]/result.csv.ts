import { handler } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunResult } from '../../../../lib/server/results/repository.ts';
import { diagramToCsv } from '../../../../lib/server/results/csv.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/** Every stored point as CSV: branch, the swept parameter, each state variable, unstable count. */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunResult(workspace.id, runId);
  return new Response(diagramToCsv(JSON.parse(r.diagramText)), {
    status: 200,
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="run-${runId}-v${r.run.versionNumber}.csv"`,
    },
  });
});
