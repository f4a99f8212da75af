/**
 * The service's gate for model documents: every stored version passes the engine's validator, and
 * its hash is the engine's content hash of the validated document (defaults applied, canonical key
 * order), so documents that mean the same share one hash and one stored result.
 */
import { validateModelDocument, documentHash, type ModelIssue } from '../../model/index.ts';
import { badRequest } from './service-error.ts';
import { jsonShapeProblem, problemField } from '../json-shape.ts';

export interface CheckedDocument {
  /** The document as submitted (parsed). */
  readonly document: Record<string, unknown>;
  /** The exact text that will be stored and exported. */
  readonly text: string;
  readonly hash: string;
  readonly format: string;
}

/** Hard cap on a stored document (and an uploaded JSON file), in bytes of UTF-8. */
export const MAX_DOCUMENT_BYTES = 1024 * 1024;

function refuse(issues: readonly ModelIssue[]): never {
  const list = issues.map((i) => ({ field: i.path, message: i.message }));
  const more = list.length > 1 ? ` (and ${list.length - 1} more problem${list.length > 2 ? 's' : ''})` : '';
  throw badRequest(`${list[0].field}: ${list[0].message}${more}`, list);
}

/** Validates a parsed document; `text` is what gets stored (pretty-printed JSON when absent). */
export function checkDocument(document: unknown, text?: string, field = 'document'): CheckedDocument {
  // Before anything recursive (stringify, zod, hash) sees it; parseJson checks request bodies too,
  // but documents also arrive as uploaded files and from the CSV import.
  const shape = jsonShapeProblem(document);
  if (shape) {
    const at = problemField([field, ...shape.path]);
    throw badRequest(`${at}: ${shape.message}`, [{ field: at, message: shape.message }]);
  }
  const body = text ?? JSON.stringify(document, null, 2);
  if (Buffer.byteLength(body, 'utf8') > MAX_DOCUMENT_BYTES) {
    throw badRequest(`document: larger than the ${MAX_DOCUMENT_BYTES / 1024} KiB limit`);
  }
  const result = validateModelDocument(document);
  if (!result.ok) refuse(result.issues.length ? result.issues : [{ path: '(document)', message: 'invalid model document' }]);
  const doc = document as Record<string, unknown>;
  return { document: doc, text: body, hash: documentHash(result.document), format: String(result.document.format) };
}

/** Parses and validates uploaded JSON text, keeping the text byte for byte. */
export function checkDocumentText(text: string): CheckedDocument {
  if (Buffer.byteLength(text, 'utf8') > MAX_DOCUMENT_BYTES) {
    throw badRequest(`file: larger than the ${MAX_DOCUMENT_BYTES / 1024} KiB limit`, [{ field: 'file', message: 'too large' }]);
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text.replace(/^\uFEFF/, ''));
  } catch (e) {
    throw badRequest(`file: not valid JSON (${(e as Error).message})`, [{ field: 'file', message: 'not valid JSON' }]);
  }
  return checkDocument(parsed, text, 'file');
}
