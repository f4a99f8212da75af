import { handler } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunEscapes } from '../../../../lib/server/escapes/repository.ts';
import { escapesToCsv } from '../../../../lib/server/escapes/rows.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';

/** An escape study's stored values as one long CSV table (src/lib/server/escapes/rows.ts), after a provenance block. */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunEscapes(workspace.id, runId);
  const s = r.run.settings as unknown as { noise?: number; paths?: number; seed?: number; start?: string };
  const csv = escapesToCsv(r.points, {
    model: r.run.modelName, 'version hash': r.run.versionHash, run: runId, 'engine version': r.study?.engineVersion ?? r.run.engineVersion,
    noise: s.noise ?? '', paths: s.paths ?? '', seed: s.seed ?? '', start: s.start ?? '', status: r.run.status,
    date: r.study?.createdAt ?? r.run.finishedAt ?? r.run.queuedAt,
  });
  return new Response(csv, {
    status: 200,
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="run-${runId}-v${r.run.versionNumber}-escapes.csv"`,
    },
  });
});
