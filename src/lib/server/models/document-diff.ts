/**
 * Structural difference of two model documents as a flat list of changes with JSON-pointer-like
 * paths ("nodes/1/parameters/a"). Arrays of objects that carry an `id` (nodes) are matched by id so
 * that inserting a node does not report every later node as changed; links are matched by their
 * (from, to) pair for the same reason. Everything else is compared position by position.
 */
export type DiffKind = 'added' | 'removed' | 'changed';

export interface DiffEntry {
  readonly path: string;
  readonly kind: DiffKind;
  readonly before?: unknown;
  readonly after?: unknown;
}

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

function isObject(v: unknown): v is Record<string, Json> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function keyOf(item: unknown): string | undefined {
  if (!isObject(item)) return undefined;
  if (typeof item.id === 'string') return `id=${item.id}`;
  if (typeof item.from === 'string' && typeof item.to === 'string') return `${item.from}->${item.to}`;
  return undefined;
}

function join(path: string, key: string | number): string {
  return path === '' ? String(key) : `${path}/${key}`;
}

function walk(before: unknown, after: unknown, path: string, out: DiffEntry[]): void {
  if (Array.isArray(before) && Array.isArray(after)) {
    const keysB = before.map(keyOf);
    const keysA = after.map(keyOf);
    const keyed = keysB.every((k) => k !== undefined) && keysA.every((k) => k !== undefined)
      && new Set(keysB).size === keysB.length && new Set(keysA).size === keysA.length;
    if (keyed) {
      const mapA = new Map(after.map((v, i) => [keysA[i] as string, v]));
      const mapB = new Map(before.map((v, i) => [keysB[i] as string, v]));
      for (const [k, v] of mapB) {
        if (!mapA.has(k)) out.push({ path: join(path, `[${k}]`), kind: 'removed', before: v });
        else walk(v, mapA.get(k), join(path, `[${k}]`), out);
      }
      for (const [k, v] of mapA) if (!mapB.has(k)) out.push({ path: join(path, `[${k}]`), kind: 'added', after: v });
      return;
    }
    const n = Math.max(before.length, after.length);
    for (let i = 0; i < n; i++) {
      if (i >= before.length) out.push({ path: join(path, i), kind: 'added', after: after[i] });
      else if (i >= after.length) out.push({ path: join(path, i), kind: 'removed', before: before[i] });
      else walk(before[i], after[i], join(path, i), out);
    }
    return;
  }
  if (isObject(before) && isObject(after)) {
    for (const k of Object.keys(before)) {
      if (!(k in after)) out.push({ path: join(path, k), kind: 'removed', before: before[k] });
      else walk(before[k], after[k], join(path, k), out);
    }
    for (const k of Object.keys(after)) if (!(k in before)) out.push({ path: join(path, k), kind: 'added', after: after[k] });
    return;
  }
  if (!Object.is(before, after)) out.push({ path, kind: 'changed', before, after });
}

/** Changes turning `before` into `after`; empty when the documents are equal. */
export function diffDocuments(before: unknown, after: unknown): DiffEntry[] {
  const out: DiffEntry[] = [];
  walk(before, after, '', out);
  return out;
}
