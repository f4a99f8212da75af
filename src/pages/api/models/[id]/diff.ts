import { z } from 'zod';
import { handler, json, parseValue } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { diffVersions } from '../../../../lib/server/models/repository.ts';
import { idParam, queryObject } from '../../../../lib/server/models/route-params.ts';

const diffQuery = z.object({
  from: z.coerce.number().int().positive(),
  to: z.coerce.number().int().positive(),
}).strict();

/** ?from=1&to=3: the structural changes between two versions (nodes matched by id, links by endpoints). */
export const GET = handler(async ({ locals, params, url }) => {
  const { workspace } = requireRole(locals);
  const id = idParam(params.id, 'model');
  const q = parseValue(queryObject(url), diffQuery);
  return json(await diffVersions(workspace.id, id, q.from, q.to));
});
