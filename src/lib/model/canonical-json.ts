import { ModelError } from './errors';

/**
 * Canonical JSON text: object keys sorted (by UTF-16 code units), no whitespace, array order kept,
 * `undefined` properties dropped (as JSON.stringify does). Two documents with the same content give
 * the same text. Non-finite numbers and non-JSON values (functions, symbols, bigint) are refused,
 * because JSON would silently turn them into null or drop them.
 */
export function canonicalJson(value: unknown): string {
  return write(value, '');
}

function write(value: unknown, path: string): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'boolean': return value ? 'true' : 'false';
    case 'string': return JSON.stringify(value);
    case 'number':
      if (!Number.isFinite(value)) throw new ModelError([{ path: path || '(document)', message: `cannot hash the non-finite number ${value}` }]);
      return JSON.stringify(value);
    case 'object': {
      if (Array.isArray(value)) {
        return `[${value.map((v, i) => (v === undefined ? 'null' : write(v, `${path}[${i}]`))).join(',')}]`;
      }
      const keys = Object.keys(value as object).sort();
      const parts: string[] = [];
      for (const k of keys) {
        const v = (value as Record<string, unknown>)[k];
        if (v === undefined) continue;
        parts.push(`${JSON.stringify(k)}:${write(v, path ? `${path}.${k}` : k)}`);
      }
      return `{${parts.join(',')}}`;
    }
    default:
      throw new ModelError([{ path: path || '(document)', message: `cannot hash a value of type ${typeof value}` }]);
  }
}
