import { handler } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunResult } from '../../../../lib/server/results/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';
import { overrideNote } from '../../../../lib/plot/run-override.ts';

/** Download: the full diagram and regime labels with provenance (model, version hash, engine). */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const r = await getRunResult(workspace.id, runId);
  const provenance = {
    model: r.run.modelName, modelId: r.run.modelId, version: r.run.versionNumber, versionHash: r.run.versionHash,
    runId, settings: r.run.settings, engineVersion: r.engineVersion, computedAt: r.createdAt,
    ...(overrideNote(r.run) ? { override: overrideNote(r.run), sliceOf: r.run.sliceOf } : {}),
    note: 'Model results are indicative; defer to domain experts and local regulation.',
  };
  const body = `{"provenance":${JSON.stringify(provenance)},"diagram":${r.diagramText},"regimes":${r.regimesText}}`;
  return new Response(body, {
    status: 200,
    headers: {
      'Content-Type': 'application/json; charset=utf-8',
      'Content-Disposition': `attachment; filename="run-${runId}-v${r.run.versionNumber}.json"`,
    },
  });
});
