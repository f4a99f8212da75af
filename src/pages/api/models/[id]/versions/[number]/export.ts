import { handler } from '../../../../../../lib/server/http.ts';
import { requireRole } from '../../../../../../lib/server/auth/guards.ts';
import { requireVersion, requireModel } from '../../../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../../../lib/server/models/route-params.ts';

/** The version's document as a JSON file, byte for byte as stored. */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  const modelId = idParam(params.id, 'model');
  const number = params.number === 'latest' ? 'latest' : idParam(params.number, 'model version');
  const model = await requireModel(workspace.id, modelId);
  const version = await requireVersion(workspace.id, modelId, number);
  const slug = model.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'model';
  return new Response(version.documentText, {
    status: 200,
    headers: {
      'Content-Type': 'application/json; charset=utf-8',
      'Content-Disposition': `attachment; filename="${slug}-v${version.number}.json"`,
      'X-Document-Hash': version.hash,
    },
  });
});
