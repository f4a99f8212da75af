import type { NetworkDocument } from './document-types';

/**
 * What the editor form holds. Numbers stay as the text the modeler typed ("0.", "-", "1e-") so that
 * typing is never fought; conversion to a document happens in `stateToDocument`, which names every
 * field it cannot read with the same path the server's validator would use.
 */
export interface ParameterRow { name: string; value: string }
export interface NodeRow { id: string; overrides: Record<string, string> }
export interface LinkRow { from: string; to: string; weight: string; twoWay: boolean }

export interface EditorState {
  name: string;
  description: string;
  variable: string;
  rate: string;
  parameters: ParameterRow[];
  nodes: NodeRow[];
  links: LinkRow[];
  coupling: { parameter: string; value: string; term: string };
  sweep: { parameter: string; from: string; to: string };
  /** Carried through untouched: the editor has no control for starting guesses. */
  start?: number[][];
}

export interface FieldIssue { path: string; message: string }

export type StateConversion =
  | { ok: true; document: NetworkDocument }
  | { ok: false; issues: FieldIssue[] };

/** Shortest text that reads back as the same double (JS default formatting). */
export function formatNumber(value: number): string {
  return Number.isFinite(value) ? String(value) : '';
}

/**
 * Parses a typed number. Accepts what JSON accepts plus a leading '+' and surrounding blanks;
 * rejects '', 'NaN', 'Infinity', hex and trailing junk ("0.5x"), which Number() or parseFloat would let through.
 */
export function parseNumber(text: string): number | null {
  const t = text.trim();
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

export function emptyEditorState(): EditorState {
  return {
    name: '',
    description: '',
    variable: 'x',
    rate: '',
    parameters: [],
    nodes: [],
    links: [],
    coupling: { parameter: 'beta', value: '0', term: 'source - target' },
    sweep: { parameter: 'beta', from: '0', to: '1' },
  };
}

/** Document (plus the model's description, which is not part of it) → form. Never mutates the input. */
export function documentToState(doc: NetworkDocument, description = ''): EditorState {
  return {
    name: doc.name ?? '',
    description,
    variable: doc.element?.variable ?? '',
    rate: doc.element?.rate ?? '',
    parameters: Object.entries(doc.element?.parameters ?? {}).map(([name, v]) => ({ name, value: formatNumber(v) })),
    nodes: (doc.nodes ?? []).map((n) => ({
      id: n.id,
      overrides: Object.fromEntries(Object.entries(n.parameters ?? {}).map(([k, v]) => [k, formatNumber(v)])),
    })),
    links: (doc.links ?? []).map((l) => ({ from: l.from, to: l.to, weight: formatNumber(l.weight), twoWay: l.twoWay === true })),
    coupling: {
      parameter: doc.coupling?.parameter ?? '',
      value: formatNumber(doc.coupling?.value ?? 0),
      term: doc.coupling?.term ?? 'source - target',
    },
    sweep: {
      parameter: doc.sweep?.parameter ?? '',
      from: formatNumber(doc.sweep?.from ?? 0),
      to: formatNumber(doc.sweep?.to ?? 1),
    },
    ...(doc.start ? { start: doc.start.map((r) => [...r]) } : {}),
  };
}

/**
 * Form → document. Only reports what the form itself cannot express (unreadable numbers, blank or
 * duplicate parameter names); everything else is left to the server's validator so there is one
 * source of truth for the model rules. Blank per-node override cells mean "inherit" and are dropped.
 */
export function stateToDocument(state: EditorState): StateConversion {
  const issues: FieldIssue[] = [];
  const num = (text: string, path: string): number => {
    const v = parseNumber(text);
    if (v === null) issues.push({ path, message: text.trim() === '' ? 'enter a number' : `"${text.trim()}" is not a number` });
    return v ?? 0;
  };

  const parameters: Record<string, number> = {};
  state.parameters.forEach((row, i) => {
    const name = row.name.trim();
    if (name === '') {
      issues.push({ path: `element.parameters[${i}]`, message: 'the parameter needs a name' });
      return;
    }
    if (Object.prototype.hasOwnProperty.call(parameters, name)) {
      issues.push({ path: `element.parameters.${name}`, message: `parameter "${name}" is listed twice` });
      return;
    }
    parameters[name] = num(row.value, `element.parameters.${name}`);
  });

  const nodes = state.nodes.map((n, i) => {
    const overrides: Record<string, number> = {};
    for (const [k, text] of Object.entries(n.overrides)) {
      if (text.trim() === '') continue;
      overrides[k] = num(text, `nodes[${i}].parameters.${k}`);
    }
    return Object.keys(overrides).length > 0 ? { id: n.id.trim(), parameters: overrides } : { id: n.id.trim() };
  });

  const links = state.links.map((l, i) => ({
    from: l.from,
    to: l.to,
    weight: num(l.weight, `links[${i}].weight`),
    ...(l.twoWay ? { twoWay: true } : {}),
  }));

  const coupling = {
    parameter: state.coupling.parameter.trim(),
    value: num(state.coupling.value, 'coupling.value'),
    ...(state.coupling.term.trim() !== '' ? { term: state.coupling.term.trim() } : {}),
  };
  const sweep = {
    parameter: state.sweep.parameter.trim(),
    from: num(state.sweep.from, 'sweep.from'),
    to: num(state.sweep.to, 'sweep.to'),
  };

  if (issues.length > 0) return { ok: false, issues };
  const document: NetworkDocument = {
    format: 'brinkmap/network-1',
    name: state.name.trim(),
    element: { variable: state.variable.trim(), rate: state.rate, parameters },
    nodes,
    links,
    coupling,
    sweep,
    ...(state.start ? { start: state.start.map((r) => [...r]) } : {}),
  };
  return { ok: true, document };
}

/** Renames a node everywhere it is referenced (links), so the network stays consistent. */
export function renameNode(state: EditorState, index: number, newId: string): EditorState {
  const old = state.nodes[index]?.id;
  if (old === undefined) return state;
  return {
    ...state,
    nodes: state.nodes.map((n, i) => (i === index ? { ...n, id: newId } : n)),
    links: state.links.map((l) => ({ ...l, from: l.from === old ? newId : l.from, to: l.to === old ? newId : l.to })),
  };
}

/** Removes a node and every link touching it. */
export function removeNode(state: EditorState, index: number): EditorState {
  const id = state.nodes[index]?.id;
  if (id === undefined) return state;
  return {
    ...state,
    nodes: state.nodes.filter((_, i) => i !== index),
    links: state.links.filter((l) => l.from !== id && l.to !== id),
  };
}

/** A fresh node id not yet used: n1, n2, ... */
export function nextNodeId(state: EditorState): string {
  const used = new Set(state.nodes.map((n) => n.id));
  for (let k = state.nodes.length + 1; ; k++) if (!used.has(`n${k}`)) return `n${k}`;
}
