/**
 * Every request the editor island makes, in one place, so the API's JSON shape is known in one file.
 * Errors come back as { ok: false, message, issues } in words a modeler reads, never as exceptions.
 */
import { issuesFromErrorBody, nameBase, normalizeIssuePath, plainMessage, type FieldIssue, type NetworkDocument } from '../../lib/editor';
import type { Diagram, Diagnostic } from '../../lib/atlas/types';

export type ApiResult<T> = { ok: true; data: T } | { ok: false; status: number; message: string; issues: FieldIssue[] };

const STATUS_WORDS: Record<number, string> = {
  401: 'Your session has ended. Sign in again in another tab, then save once more — nothing here is lost.',
  403: 'Your role in this workspace does not allow this change.',
  404: 'This model no longer exists or was archived.',
  409: 'Someone saved a newer version meanwhile. Reload the history, then save again.',
  413: 'The model is too large to save.',
  429: 'Too many requests in a short time. Wait a moment and try again.',
};

/** Re-exported for callers that only know the client. */
export const normalizePath = normalizeIssuePath;

export async function request<T>(method: string, url: string, body?: unknown, signal?: AbortSignal): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, {
      method,
      headers: body === undefined ? { Accept: 'application/json' } : { 'Content-Type': 'application/json', Accept: 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
      credentials: 'same-origin',
      signal,
    });
  } catch (e) {
    if ((e as Error).name === 'AbortError') throw e;
    return { ok: false, status: 0, message: 'The server could not be reached. Check your connection; your edits are still here.', issues: [] };
  }
  let data: unknown = null;
  try {
    data = res.status === 204 ? null : await res.json();
  } catch {
    data = null;
  }
  if (res.ok) return { ok: true, data: data as T };
  const error = (data as { error?: { message?: string; code?: string; field?: string } } | null)?.error;
  const serverMessage = error?.message;
  // A 409 is a newer version meanwhile, except a name another model has, which the server words.
  const worded = res.status === 400 || res.status === 422 || error?.code === 'name_taken';
  const message = worded ? (serverMessage ? plainMessage(serverMessage, error?.field) : 'The model has problems.') : (STATUS_WORDS[res.status] ?? serverMessage ?? `The server answered ${res.status}.`);
  return { ok: false, status: res.status, message, issues: issuesFromErrorBody(data) };
}

export interface ValidateResponse { valid: boolean; issues: FieldIssue[] }
export interface PreviewResponse {
  valid: boolean;
  issues?: FieldIssue[];
  diagram?: Diagram;
  diagnostics?: Diagnostic[];
  elapsedMs?: number;
  truncated?: boolean;
}
export interface VersionSummary { id?: number | string; number: number; hash?: string; changeNote?: string; createdAt?: string; createdBy?: string | null; createdByName?: string | null }

export const api = {
  validate: (document: NetworkDocument, signal?: AbortSignal) => request<ValidateResponse>('POST', '/api/validate', { document }, signal),
  preview: (document: NetworkDocument, signal?: AbortSignal) => request<PreviewResponse>('POST', '/api/preview', { document }, signal),
  createModel: (document: NetworkDocument, description: string, changeNote: string) =>
    request<{ model: { id: number | string; name: string }; version?: { number: number }; renamedFrom?: string }>('POST', '/api/models', {
      name: document.name,
      description,
      document,
      changeNote,
    }),
  saveVersion: (modelId: string, document: NetworkDocument, changeNote: string, baseVersion?: number) =>
    request<{ version: { number: number } }>('POST', `/api/models/${encodeURIComponent(modelId)}/versions`, {
      document,
      changeNote,
      ...(baseVersion ? { baseVersion } : {}),
    }),
  /** The model's own name and description (not part of a version); a name another model has is a 409. */
  updateMeta: (modelId: string, meta: { name?: string; description?: string }) =>
    request<unknown>('PATCH', `/api/models/${encodeURIComponent(modelId)}`, meta),
  /** Names of the workspace's models (archived ones too) that a new model named `name` could clash with. */
  similarNames: async (name: string, signal?: AbortSignal): Promise<string[] | null> => {
    const q = new URLSearchParams({ q: nameBase(name).slice(0, 200), archived: 'include', pageSize: '100', sort: 'name' });
    const r = await request<{ items: { name: string }[] }>('GET', `/api/models?${q}`, undefined, signal);
    return r.ok ? r.data.items.map((m) => m.name) : null;
  },
  listVersions: (modelId: string) => request<{ versions: VersionSummary[] }>('GET', `/api/models/${encodeURIComponent(modelId)}/versions`),
  getVersion: (modelId: string, number: number) =>
    request<{ version: VersionSummary & { document: unknown } }>('GET', `/api/models/${encodeURIComponent(modelId)}/versions/${number}`),
};
