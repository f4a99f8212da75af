import { handler, json } from '../../lib/server/http.ts';
import { requireRole } from '../../lib/server/auth/guards.ts';
import { loadCompareEntries, parseCompareQuery } from '../../lib/server/results/compare.ts';

/**
 * The compare page's data: GET /api/compare?runs=3,5[&points=8000] → { items: [{ runId, label,
 * shortLabel, diagram, regimes, provenance }] }, two to four finished runs of the active workspace,
 * each diagram thinned to `points`. Any member may read; a run outside the workspace is a 404.
 */
export const GET = handler(async ({ locals, url }) => {
  const { workspace } = requireRole(locals);
  const { runIds, points } = parseCompareQuery(url);
  return json({ items: await loadCompareEntries(workspace.id, runIds, points) });
});
