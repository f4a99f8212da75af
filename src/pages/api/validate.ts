/**
 * POST /api/validate { document } → 200 { valid, issues: [{ path, message }] }
 * The editor's live check: the engine's validator only, nothing stored. Any member of the active
 * workspace may call it (reviewers check documents they read, too). An invalid document is an
 * answer, not an error, so it is a 200; a malformed request body is a 400.
 */
import { z } from 'zod';
import { handler, json, parseJson } from '../../lib/server/http.ts';
import { requireRole } from '../../lib/server/auth/guards.ts';
import { validateModelDocument } from '../../lib/model/index.ts';

/** Same cap as a stored document (src/lib/server/models/document.ts). */
const MAX_BODY_BYTES = 1024 * 1024;

const bodySchema = z.object({ document: z.unknown() }).strict();

export const POST = handler(async ({ request, locals }) => {
  requireRole(locals);
  const { document } = await parseJson(request, bodySchema, { maxBytes: MAX_BODY_BYTES });
  const result = validateModelDocument(document);
  return json(result.ok ? { valid: true, issues: [] } : { valid: false, issues: result.issues });
});
