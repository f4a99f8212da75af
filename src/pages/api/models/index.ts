import { handler, json, parseJson, parseValue } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { createModelSchema, listModelsQuerySchema } from '../../../lib/server/models/schemas.ts';
import { checkDocument, MAX_DOCUMENT_BYTES } from '../../../lib/server/models/document.ts';
import { createModel, listModels } from '../../../lib/server/models/repository.ts';
import { queryObject } from '../../../lib/server/models/route-params.ts';

/** Models of the active workspace: ?q= search in name and description, ?tag=, ?sort=name|created|updated, ?order=, ?page=, ?pageSize=, ?archived=exclude|include|only. */
export const GET = handler(async ({ locals, url }) => {
  const { workspace } = requireRole(locals);
  const query = parseValue(queryObject(url), listModelsQuerySchema);
  return json(await listModels(workspace.id, query));
});

/**
 * New model with its first version: { name, description?, tags?, document, changeNote? }. A name the
 * workspace already has becomes the first free "name (2)", "name (3)" and the answer carries
 * `renamedFrom`, as an import does: never a silent second model of the same name.
 */
export const POST = handler(async ({ locals, request }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const input = await parseJson(request, createModelSchema, { maxBytes: MAX_DOCUMENT_BYTES + 16 * 1024 });
  const checked = checkDocument(input.document);
  return json(await createModel(workspace.id, user.id, { ...input, checked }), 201);
});
