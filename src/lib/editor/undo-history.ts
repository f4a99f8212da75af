/**
 * Undo and redo over whole editor states (they are small and immutable, so snapshots are cheap and
 * exact). Quick edits of one kind merge into one step — a burst of typing in the rate is one undo —
 * while adding or removing a node, link or parameter, or loading a CSV, is always a step of its own.
 */
export interface History<T> {
  readonly past: readonly T[];
  readonly present: T;
  readonly future: readonly T[];
  /** What the last recorded change was ("typing:element"), for merging; null after undo/redo. */
  readonly lastKind: string | null;
  readonly lastAt: number;
}

export interface RecordOptions {
  /** Changes of the same kind closer than this merge into one step (default 800 ms). */
  mergeWithinMs?: number;
  /** Steps kept (default 100). */
  limit?: number;
}

export function startHistory<T>(present: T): History<T> {
  return { past: [], present, future: [], lastKind: null, lastAt: 0 };
}

/** Records `next` as the new present. `kind` null means "never merge" (structural changes). */
export function recordChange<T>(h: History<T>, next: T, kind: string | null, at: number, options: RecordOptions = {}): History<T> {
  if (Object.is(next, h.present)) return h;
  const merge = kind !== null && kind === h.lastKind && at - h.lastAt < (options.mergeWithinMs ?? 800);
  if (merge) return { ...h, present: next, future: [], lastAt: at };
  const past = [...h.past, h.present].slice(-(options.limit ?? 100));
  return { past, present: next, future: [], lastKind: kind, lastAt: at };
}

export function undo<T>(h: History<T>): History<T> {
  if (h.past.length === 0) return h;
  return { past: h.past.slice(0, -1), present: h.past[h.past.length - 1], future: [h.present, ...h.future], lastKind: null, lastAt: 0 };
}

export function redo<T>(h: History<T>): History<T> {
  if (h.future.length === 0) return h;
  return { past: [...h.past, h.present], present: h.future[0], future: h.future.slice(1), lastKind: null, lastAt: 0 };
}

/**
 * The kind of an editor change, for merging: null when a list of nodes, links or parameters grew or
 * shrank (a step of its own), else "typing:" plus the parts that changed.
 */
export function changeKind<T extends EditorLike>(before: T, after: T): string | null {
  for (const k of ['nodes', 'links', 'parameters'] as const) {
    if (before[k].length !== after[k].length) return null;
  }
  const parts = (Object.keys(after) as (keyof T & string)[]).filter((k) => before[k] !== after[k]);
  return `typing:${parts.sort().join(',')}`;
}

interface EditorLike {
  nodes: readonly unknown[];
  links: readonly unknown[];
  parameters: readonly unknown[];
}
