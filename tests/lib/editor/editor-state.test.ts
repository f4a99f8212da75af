import { describe, it, expect } from 'vitest';
import {
  documentToState, stateToDocument, parseNumber, renameNode, removeNode, nextNodeId, emptyEditorState,
  type NetworkDocument,
} from '../../../src/lib/editor';

// The example document of issue 3 (invented lakes).
const doc: NetworkDocument = {
  format: 'brinkmap/network-1',
  name: 'Three lakes, downstream flow',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper' }, { id: 'middle', parameters: { a: 0.07 } }, { id: 'lower' }],
  links: [{ from: 'upper', to: 'middle', weight: 1 }, { from: 'middle', to: 'lower', weight: 1, twoWay: true }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
};

describe('documentToState / stateToDocument', () => {
  it('stateToDocument(documentToState(doc)) gives back the same document', () => {
    const r = stateToDocument(documentToState(doc));
    expect(r).toEqual({ ok: true, document: doc });
  });

  it('documentToState does not mutate its input', () => {
    const copy = JSON.parse(JSON.stringify(doc));
    const s = documentToState(doc);
    s.nodes[1].overrides.a = '9';
    expect(doc).toEqual(copy);
  });

  it('stateToDocument names the field of an unreadable number with the validator path', () => {
    const s = documentToState(doc);
    s.nodes[1].overrides.a = '0.07x';
    s.sweep.to = '';
    const r = stateToDocument(s);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues).toContainEqual({ path: 'nodes[1].parameters.a', message: '"0.07x" is not a number' });
      expect(r.issues).toContainEqual({ path: 'sweep.to', message: 'enter a number' });
    }
  });

  it('stateToDocument drops blank override cells (inherit the element value)', () => {
    const s = documentToState(doc);
    s.nodes[0].overrides.b = '  ';
    const r = stateToDocument(s);
    expect(r.ok && r.document.nodes[0]).toEqual({ id: 'upper' });
  });

  it('stateToDocument reports a parameter listed twice', () => {
    const s = documentToState(doc);
    s.parameters.push({ name: 'a', value: '1' });
    const r = stateToDocument(s);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0].path).toBe('element.parameters.a');
  });
});

describe('parseNumber', () => {
  it('accepts decimal and exponent forms', () => {
    expect(parseNumber(' 0.05 ')).toBe(0.05);
    expect(parseNumber('-1e-3')).toBe(-0.001);
    expect(parseNumber('.5')).toBe(0.5);
    expect(parseNumber('+2')).toBe(2);
  });
  it('rejects what Number() would let through', () => {
    for (const t of ['', ' ', '0x10', 'Infinity', 'NaN', '1,5', '0.5x', '1e']) expect(parseNumber(t)).toBeNull();
  });
});

describe('node edits keep links consistent', () => {
  it('renameNode renames the node and every link end', () => {
    const s = renameNode(documentToState(doc), 1, 'mid');
    expect(s.nodes.map((n) => n.id)).toEqual(['upper', 'mid', 'lower']);
    expect(s.links.map((l) => `${l.from}>${l.to}`)).toEqual(['upper>mid', 'mid>lower']);
  });
  it('removeNode removes the links touching it', () => {
    const s = removeNode(documentToState(doc), 1);
    expect(s.nodes.map((n) => n.id)).toEqual(['upper', 'lower']);
    expect(s.links).toEqual([]);
  });
  it('nextNodeId skips ids in use', () => {
    const s = emptyEditorState();
    s.nodes = [{ id: 'n2', overrides: {} }];
    expect(nextNodeId(s)).toBe('n3');
    s.nodes.push({ id: 'n3', overrides: {} });
    expect(nextNodeId(s)).toBe('n4');
  });
});
