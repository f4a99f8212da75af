import { handler, json } from '../../../../../../lib/server/http.ts';
import { requireRole } from '../../../../../../lib/server/auth/guards.ts';
import { requireVersion } from '../../../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../../../lib/server/models/route-params.ts';

/** One version with its document; :number may be "latest". */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const modelId = idParam(params.id, 'model');
  const number = params.number === 'latest' ? 'latest' : idParam(params.number, 'model version');
  const { documentText: _text, ...version } = await requireVersion(workspace.id, modelId, number);
  return json({ version });
});
