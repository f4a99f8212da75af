import type { DiffEntry } from './version-diff';

/**
 * The words on the screen for a document path, so messages say "Node 1 id" or "Link 2 weight" rather
 * than the validator's `nodes[0].id`. Paths are the editor's form (`nodes[1].parameters.a`, see
 * normalizeIssuePath); anything unknown is returned as it came.
 */

/** What a label may need to know about the document: node ids and link ends, by position. */
export interface LabelContext {
  nodes?: readonly { id?: string }[];
  links?: readonly { from?: string; to?: string }[];
}

const FIXED: Record<string, string> = {
  name: 'Name',
  description: 'Description',
  changeNote: 'Change note',
  '(document)': 'Model',
  '(body)': 'Model',
  file: 'File',
  'content-type': 'File type',
  format: 'Format',
  element: 'Element',
  'element.variable': 'State variable',
  'element.rate': 'Rate',
  'element.parameters': 'Parameters',
  nodes: 'Nodes',
  links: 'Links',
  coupling: 'Coupling',
  'coupling.parameter': 'Coupling parameter',
  'coupling.value': 'Coupling value',
  'coupling.term': 'Coupling term',
  sweep: 'Sweep',
  'sweep.parameter': 'Swept parameter',
  'sweep.from': 'Sweep from',
  'sweep.to': 'Sweep to',
  start: 'Starting guesses',
  noise: 'Noise',
  'settings.from': 'Sweep from',
  'settings.to': 'Sweep to',
  settings: 'Run settings',
  version: 'Version',
  modelId: 'Model',
};

const LINK_FIELDS: Record<string, string> = { from: 'from', to: 'to', weight: 'weight', twoWay: 'two-way' };

/**
 * "Node 1", "Link 2 weight", "Rate". With `byName` (the version history), nodes and links are named
 * by what they connect instead of their row number: "Node alder", "Link alder → birch weight".
 */
export function fieldLabel(path: string, context: LabelContext = {}, options: { byName?: boolean } = {}): string {
  // "document." is how the service prefixes a document inside a body, "file." an uploaded one.
  const p = path.replace(/^(?:document|file)\./, '').replace(/\.(\d+)(?=\.|\[|$)/g, '[$1]');
  if (FIXED[p]) return FIXED[p];
  let m = /^element\.parameters\[(\d+)\]$/.exec(p);
  if (m) return `Parameter ${Number(m[1]) + 1} name`;
  m = /^element\.parameters\.(.+)$/.exec(p);
  if (m) return `Parameter ${m[1]}`;
  m = /^nodes\[(\d+)\](.*)$/.exec(p);
  if (m) {
    const i = Number(m[1]);
    const id = context.nodes?.[i]?.id;
    const node = options.byName && id ? `Node ${id}` : `Node ${i + 1}`;
    const rest = m[2];
    if (rest === '') return node;
    if (rest === '.id') return `${node} id`;
    if (rest === '.parameters') return `${node} parameters`;
    const q = /^\.parameters\.(.+)$/.exec(rest);
    if (q) return options.byName || !id ? `${node} ${q[1]}` : `${q[1]} on node ${id}`;
    return `${node}${rest.replace(/^\./, ' ')}`;
  }
  m = /^links\[(\d+)\](?:\.(\w+))?$/.exec(p);
  if (m) {
    const i = Number(m[1]);
    const l = context.links?.[i];
    const link = options.byName && l?.from && l?.to ? `Link ${l.from} → ${l.to}` : `Link ${i + 1}`;
    return m[2] ? `${link} ${LINK_FIELDS[m[2]] ?? m[2]}` : link;
  }
  m = /^start\[(\d+)\]$/.exec(p);
  if (m) return `Starting guess ${Number(m[1]) + 1}`;
  m = /^noise\.(perNode|perVariable)\.(.+)$/.exec(p);
  if (m) return `Noise on ${m[2]}`;
  return path;
}

/**
 * A message in the modeler's words: drops a leading copy of the field (`settings.to: …`, which the
 * API puts in front of its messages and the page would put again) and turns `nodes[0]` / `links[2]`
 * inside the text into "Node 1" / "Link 3".
 */
export function plainMessage(message: string, path?: string): string {
  let m = message;
  if (path) {
    const dotted = path.replace(/\[(\d+)\]/g, '.$1');
    const variants = new Set([path, dotted, `document.${dotted}`, `file.${dotted}`, `file.${path}`]);
    for (let again = true; again; ) {
      again = false;
      for (const v of variants) {
        if (m.startsWith(`${v}: `)) {
          m = m.slice(v.length + 2);
          again = true;
        }
      }
    }
  }
  return m
    .replace(/\b(?:document\.)?nodes(?:\[(\d+)\]|\.(\d+))(?![\w.[])/g, (_s, a, b) => `Node ${Number(a ?? b) + 1}`)
    .replace(/\b(?:document\.)?links(?:\[(\d+)\]|\.(\d+))(?![\w.[])/g, (_s, a, b) => `Link ${Number(a ?? b) + 1}`)
    .replace(/\b(?:document\.)?[a-z][\w]*(?:(?:\.\w+)|(?:\[\d+\]))+(?=[\s:,;)]|$)/gi, (s) => {
      const label = fieldLabel(s);
      return label === s ? s : label;
    });
}

/** "Rate: unknown symbol 'r'" — one issue as a sentence for summaries and alerts. */
export function describeIssue(issue: { path: string; message: string }, context: LabelContext = {}): string {
  return `${fieldLabel(issue.path, context)}: ${plainMessage(issue.message, issue.path)}`;
}

const show = (v: unknown): string => (typeof v === 'string' ? JSON.stringify(v) : JSON.stringify(v) ?? 'undefined');

/**
 * A version-history line in the modeler's words: "Link alder → birch weight: 0.25 → 0.2",
 * "Node middle b: added 0.55". Nodes and links are named from the newer document (the older one for
 * removed entries), since their row numbers mean nothing in a history.
 */
export function describeDiffEntry(e: DiffEntry, before: LabelContext, after: LabelContext): string {
  const label = fieldLabel(e.path, e.kind === 'removed' ? before : after, { byName: true });
  if (/^links\[\d+\]\.twoWay$/.test(e.path)) {
    // "two-way: added true" says less than the change itself.
    const link = fieldLabel(e.path.replace(/\.twoWay$/, ''), after, { byName: true });
    return `${link}: ${e.kind !== 'removed' && e.after === true ? 'now two-way' : 'now one-way'}`;
  }
  if (e.kind === 'changed') return `${label}: ${show(e.before)} → ${show(e.after)}`;
  // A whole node or link: its label already says which, so only what it carries is added.
  const whole = /^(nodes|links)\[\d+\]$/.exec(e.path);
  if (whole) {
    const item = (e.kind === 'added' ? e.after : e.before) as Record<string, unknown> | undefined;
    const what = whole[1] === 'links' ? linkDetails(item) : nodeDetails(item);
    return e.kind === 'added' ? `${label}: added${what ? `, ${what}` : ''}` : `${label}: removed${what ? ` (was ${what})` : ''}`;
  }
  if (e.kind === 'added') return `${label}: added ${show(e.after)}`;
  return `${label}: removed (was ${show(e.before)})`;
}

/** "weight 0.3, two-way" for a link added or removed in the history. */
function linkDetails(l: Record<string, unknown> | undefined): string {
  if (!l || typeof l !== 'object') return '';
  return [l.weight !== undefined ? `weight ${show(l.weight)}` : '', l.twoWay === true ? 'two-way' : ''].filter(Boolean).join(', ');
}

/** "b = 0.55" for a node's own parameter values. */
function nodeDetails(n: Record<string, unknown> | undefined): string {
  const p = n && typeof n === 'object' ? n.parameters : undefined;
  if (!p || typeof p !== 'object') return '';
  return Object.entries(p as Record<string, unknown>).map(([k, v]) => `${k} = ${show(v)}`).join(', ');
}
