import type { FieldIssue } from './editor-state';

/**
 * "document.nodes.1.parameters.a", "document.nodes[1].parameters.a" or "nodes[1].parameters.a" →
 * "nodes[1].parameters.a": the service prefixes document issues with "document." and zod-style
 * paths use dots before indices; the editor's fields are keyed by the validator's own form.
 */
export function normalizeIssuePath(path: string): string {
  return path.replace(/^document\./, '').replace(/\.(\d+)(?=\.|\[|$)/g, '[$1]');
}

interface RawIssue { path?: unknown; field?: unknown; message?: unknown }

/**
 * Field issues from an API error body `{ error: { issues: [{ field | path, message }] } }` (also
 * accepting `error.details.issues`), with paths normalized. Anything else gives [].
 */
export function issuesFromErrorBody(body: unknown): FieldIssue[] {
  const err = (body as { error?: { issues?: unknown; details?: { issues?: unknown } } } | null)?.error;
  const raw = Array.isArray(err?.issues) ? err.issues : Array.isArray(err?.details?.issues) ? err.details.issues : [];
  return (raw as RawIssue[])
    .filter((i) => i && typeof i === 'object' && typeof i.message === 'string' && i.message !== '')
    .map((i) => ({ path: normalizeIssuePath(String(i.path ?? i.field ?? '(document)')), message: String(i.message) }));
}
