import { handler, json, parseJson } from '../../../../../lib/server/http.ts';
import { requireRole } from '../../../../../lib/server/auth/guards.ts';
import { newVersionSchema } from '../../../../../lib/server/models/schemas.ts';
import { checkDocument, MAX_DOCUMENT_BYTES } from '../../../../../lib/server/models/document.ts';
import { addVersion, listVersions, requireModel } from '../../../../../lib/server/models/repository.ts';
import { idParam } from '../../../../../lib/server/models/route-params.ts';

/** Version history, newest first (without documents). */
export const GET = handler(async ({ locals, params }) => {
  const { workspace } = requireRole(locals);
  return json({ versions: await listVersions(workspace.id, idParam(params.id, 'model')) });
});

/**
 * Save an edit as a new version: { document, changeNote, baseVersion? }. 201 with the new version;
 * 200 with `created: false` when the document's hash equals the latest version's (nothing stored).
 */
export const POST = handler(async ({ locals, params, request }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const id = idParam(params.id, 'model');
  await requireModel(workspace.id, id);
  const input = await parseJson(request, newVersionSchema, { maxBytes: MAX_DOCUMENT_BYTES + 16 * 1024 });
  const checked = checkDocument(input.document);
  const out = await addVersion(workspace.id, user.id, id, { checked, changeNote: input.changeNote, baseVersion: input.baseVersion });
  return json(out, out.created ? 201 : 200);
});
