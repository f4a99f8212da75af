import { handler, json, parseValue } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { checkDocumentText, MAX_DOCUMENT_BYTES } from '../../../lib/server/models/document.ts';
import { createModel } from '../../../lib/server/models/repository.ts';
import { modelMetaSchema } from '../../../lib/server/models/schemas.ts';
import { readUpload } from '../../../lib/server/models/upload.ts';
import { queryObject } from '../../../lib/server/models/route-params.ts';
import { z } from 'zod';

const importFieldsSchema = z.object({
  name: modelMetaSchema.shape.name.optional(),
  description: z.string().max(5000, 'at most 5000 characters').optional(),
  changeNote: z.string().trim().max(1000, 'at most 1000 characters').optional(),
}).strict();

/**
 * Import a model document file as a new model. Body: the JSON file itself (Content-Type
 * application/json) with ?name= optional, or multipart/form-data with `file` (+ name, description,
 * changeNote). The stored version keeps the file's bytes exactly. Nothing is saved on any error. A
 * name already used in the workspace gets the first free " (2)", " (3)" suffix and the answer
 * carries `renamedFrom`.
 */
export const POST = handler(async ({ locals, request, url }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const upload = await readUpload(request, ['application/json'], MAX_DOCUMENT_BYTES);
  const fields = parseValue({ ...queryObject(url), ...upload.fields }, importFieldsSchema);
  const checked = checkDocumentText(upload.text);
  const docName = typeof checked.document.name === 'string' ? checked.document.name : undefined;
  const wanted = (fields.name ?? docName ?? upload.filename?.replace(/\.json$/i, '') ?? 'Imported model').trim().slice(0, 200) || 'Imported model';
  // An import whose name is taken becomes "name (2)" (createModel; said in the answer), never a silent twin.
  const created = await createModel(workspace.id, user.id, {
    name: wanted,
    description: fields.description ?? '',
    tags: [],
    changeNote: fields.changeNote || `imported${upload.filename ? ` from ${upload.filename}` : ''}`,
    checked,
  });
  return json(created, 201);
});
