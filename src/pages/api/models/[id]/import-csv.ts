import { z } from 'zod';
import { handler, json, parseValue } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { addVersion, requireModel, requireVersion } from '../../../../lib/server/models/repository.ts';
import { checkDocument } from '../../../../lib/server/models/document.ts';
import { describeProblems, parseAdjacencyCsv } from '../../../../lib/server/models/adjacency-csv.ts';
import { readUpload } from '../../../../lib/server/models/upload.ts';
import { idParam, queryObject } from '../../../../lib/server/models/route-params.ts';
import { HttpError } from '../../../../lib/server/http.ts';

/** Adjacency matrices are small: 64 nodes of 20-character cells is about 80 KiB. */
const MAX_CSV_BYTES = 256 * 1024;

const fieldsSchema = z.object({
  base: z.coerce.number().int().positive().optional(),
  changeNote: z.string().trim().max(1000, 'at most 1000 characters').optional(),
}).strict();

/**
 * An adjacency matrix (CSV: node ids in the header row and first column, weight of the link from
 * row node to column node in each cell) becomes the links of a new version of a network model,
 * based on ?base=N (default: the latest version). Body: the CSV (Content-Type text/csv) or a
 * multipart form with `file`. A bad file is a 400 naming row and column; nothing is saved.
 */
export const POST = handler(async ({ locals, params, request, url }) => {
  const { user, workspace } = requireRole(locals, 'owner', 'modeler');
  const modelId = idParam(params.id, 'model');
  await requireModel(workspace.id, modelId);
  const upload = await readUpload(request, ['text/csv', 'text/plain'], MAX_CSV_BYTES);
  const fields = parseValue({ ...queryObject(url), ...upload.fields }, fieldsSchema);
  const base = await requireVersion(workspace.id, modelId, fields.base ?? 'latest');
  const doc = base.document as { format?: string; nodes?: { id: string }[]; links?: unknown[] };
  if (doc.format !== 'brinkmap/network-1' || !Array.isArray(doc.nodes)) {
    throw new HttpError(400, 'not_a_network', `version ${base.number} is a ${doc.format} document; an adjacency matrix only applies to brinkmap/network-1 models`);
  }
  const parsed = parseAdjacencyCsv(upload.text, doc.nodes.map((n) => n.id));
  if (!parsed.ok) {
    throw new HttpError(400, 'invalid_csv', `file: ${describeProblems(parsed.problems)}`, {
      field: 'file',
      issues: parsed.problems.map((p) => ({ field: 'file', message: describeProblems([p]), ...(p.row !== undefined ? { row: p.row } : {}), ...(p.column !== undefined ? { column: p.column } : {}) })),
    });
  }
  const next = { ...doc, links: parsed.links.map((l) => ({ from: l.from, to: l.to, weight: l.weight })) };
  const checked = checkDocument(next);
  const out = await addVersion(workspace.id, user.id, modelId, {
    checked,
    changeNote: fields.changeNote || `links from adjacency matrix${upload.filename ? ` ${upload.filename}` : ''} (${parsed.links.length} links)`,
    action: 'model.import_csv',
  });
  return json({ ...out, links: parsed.links.length }, out.created ? 201 : 200);
});
