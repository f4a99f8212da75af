/** One field-level difference between two JSON values. */
export interface DiffEntry {
  path: string;
  kind: 'changed' | 'added' | 'removed';
  before?: unknown;
  after?: unknown;
}

const IDENT = /^[A-Za-z_$][A-Za-z0-9_$]*$/;

const join = (base: string, key: string | number): string => {
  if (typeof key === 'number') return `${base}[${key}]`;
  if (IDENT.test(key)) return base === '' ? key : `${base}.${key}`;
  return `${base}[${JSON.stringify(key)}]`;
};

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/**
 * Structural diff of two JSON values: objects by key (keys of `before` first, then new ones), arrays
 * by position, leaves compared with ===. A value whose kind changes (number → object) is one entry.
 */
export function diffJson(before: unknown, after: unknown, path = ''): DiffEntry[] {
  if (Array.isArray(before) && Array.isArray(after)) {
    const out: DiffEntry[] = [];
    const n = Math.max(before.length, after.length);
    for (let i = 0; i < n; i++) {
      const p = join(path, i);
      if (i >= after.length) out.push({ path: p, kind: 'removed', before: before[i] });
      else if (i >= before.length) out.push({ path: p, kind: 'added', after: after[i] });
      else out.push(...diffJson(before[i], after[i], p));
    }
    return out;
  }
  if (isObject(before) && isObject(after)) {
    const out: DiffEntry[] = [];
    for (const k of Object.keys(before)) {
      const p = join(path, k);
      if (!Object.prototype.hasOwnProperty.call(after, k)) out.push({ path: p, kind: 'removed', before: before[k] });
      else out.push(...diffJson(before[k], after[k], p));
    }
    for (const k of Object.keys(after)) {
      if (!Object.prototype.hasOwnProperty.call(before, k)) out.push({ path: join(path, k), kind: 'added', after: after[k] });
    }
    return out;
  }
  if (before === after) return [];
  return [{ path: path === '' ? '(document)' : path, kind: 'changed', before, after }];
}

const show = (v: unknown): string => (typeof v === 'string' ? JSON.stringify(v) : JSON.stringify(v) ?? 'undefined');

/** "nodes[1].parameters.a: 0.07 → 0.05", "links[2]: added {…}", "description: removed ("…")". */
export function formatDiffEntry(e: DiffEntry): string {
  if (e.kind === 'changed') return `${e.path}: ${show(e.before)} → ${show(e.after)}`;
  if (e.kind === 'added') return `${e.path}: added ${show(e.after)}`;
  return `${e.path}: removed (was ${show(e.before)})`;
}
