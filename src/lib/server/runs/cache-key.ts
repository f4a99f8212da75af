import { createHash } from 'node:crypto';

/** JSON with object keys sorted at every depth, so equal settings give equal text. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

/**
 * The identity of a computation: a stored result is reused by any run of the same kind ('trace' today;
 * an escape study of the same version and settings is another computation), with the same model
 * version hash, the same settings (canonical JSON) and the same engine version.
 */
export function resultCacheKey(kind: string, versionHash: string, settings: unknown, engineVersion: string): string {
  return createHash('sha256').update(`${kind}\n${versionHash}\n${canonicalJson(settings)}\n${engineVersion}`).digest('hex');
}
