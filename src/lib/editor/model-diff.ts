import { diffJson, type DiffEntry } from './version-diff';

/**
 * The differences between two versions of a network document as a modeler thinks of them: nodes
 * matched by id and links by their ends (from → to), not by their row in the list. Removing the first
 * of three links is then "Link a → b: removed", not every later link seeming to change its ends.
 * Paths of entries point into the newer document (the older one for removed entries), so
 * describeDiffEntry names them from the right document. Other parts of the document are compared
 * as diffJson does; a document without such lists (an explicit ODE system) is diffJson's answer.
 */
export function diffModelDocuments(before: unknown, after: unknown): DiffEntry[] {
  if (!isObject(before) || !isObject(after)) return diffJson(before, after);
  const keys = [...Object.keys(before), ...Object.keys(after).filter((k) => !(k in before))];
  const out: DiffEntry[] = [];
  for (const k of keys) {
    const a = before[k];
    const b = after[k];
    if (k === 'nodes' && Array.isArray(a) && Array.isArray(b)) out.push(...matchedDiff(a, b, 'nodes', nodeKey));
    else if (k === 'links' && Array.isArray(a) && Array.isArray(b)) out.push(...matchedDiff(a, b, 'links', linkKey));
    else if (!(k in after)) out.push({ path: k, kind: 'removed', before: a });
    else if (!(k in before)) out.push({ path: k, kind: 'added', after: b });
    else out.push(...diffJson({ [k]: a }, { [k]: b }));
  }
  return out;
}

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const nodeKey = (n: unknown): string | null => (isObject(n) && typeof n.id === 'string' ? n.id : null);
const linkKey = (l: unknown): string | null =>
  isObject(l) && typeof l.from === 'string' && typeof l.to === 'string' ? `${l.from}\u0000${l.to}` : null;

/** Items with the same key are compared field by field; the rest are added or removed. */
function matchedDiff(before: unknown[], after: unknown[], name: string, key: (v: unknown) => string | null): DiffEntry[] {
  // Items without a readable key (a document mid-edit) fall back to the position diff.
  if (before.some((v) => key(v) === null) || after.some((v) => key(v) === null)) return diffJson(before, after, name);
  const waiting = new Map<string, number[]>();
  after.forEach((v, j) => {
    const k = key(v)!;
    waiting.set(k, [...(waiting.get(k) ?? []), j]);
  });
  const matched = new Set<number>();
  const out: DiffEntry[] = [];
  before.forEach((v, i) => {
    const j = waiting.get(key(v)!)?.shift();
    if (j === undefined) out.push({ path: `${name}[${i}]`, kind: 'removed', before: v });
    else {
      matched.add(j);
      out.push(...diffJson(v, after[j], `${name}[${j}]`));
    }
  });
  after.forEach((v, j) => {
    if (!matched.has(j)) out.push({ path: `${name}[${j}]`, kind: 'added', after: v });
  });
  return out;
}
