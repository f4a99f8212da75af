import { handler, json } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunProgress } from '../../../../lib/server/runs/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';
import { notFound } from '../../../../lib/server/models/service-error.ts';

/** Polling fallback for the event stream: { status, progress, phrase, error, resultId, ... }. */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const p = await getRunProgress(workspace.id, idParam(params.id, 'run'));
  if (!p) throw notFound('run');
  return json({ progress: p });
});
