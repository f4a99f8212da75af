import { describe, expect, it } from 'vitest';
import { describeDiffEntry, describeIssue, fieldLabel, plainMessage } from '../../../src/lib/editor/field-labels.ts';

const doc = { nodes: [{ id: 'alder' }, { id: 'birch' }], links: [{ from: 'alder', to: 'birch' }, { from: 'birch', to: 'alder' }] };

describe('fieldLabel(path, context)', () => {
  it.each([
    ['nodes[0]', 'Node 1'],
    ['nodes.0', 'Node 1'],
    ['document.nodes.1.id', 'Node 2 id'],
    ['element.rate', 'Rate'],
    ['element.variable', 'State variable'],
    ['links[1].weight', 'Link 2 weight'],
    ['links[0].from', 'Link 1 from'],
    ['element.parameters.a', 'Parameter a'],
    ['element.parameters[2]', 'Parameter 3 name'],
    ['nodes[1].parameters.b', 'b on node birch'],
    ['coupling.term', 'Coupling term'],
    ['sweep.to', 'Sweep to'],
    ['settings.to', 'Sweep to'],
    ['start[0]', 'Starting guess 1'],
    ['(document)', 'Model'],
    ['file', 'File'],
    ['file.name', 'Name'],
    ['file.links.0.to', 'Link 1 to'],
  ])('fieldLabel(%j) is %j, the words on the screen', (path, label) => {
    expect(fieldLabel(path, doc)).toBe(label);
  });
  it('names nodes and links by what they connect with byName', () => {
    expect(fieldLabel('links[0].weight', doc, { byName: true })).toBe('Link alder → birch weight');
    expect(fieldLabel('nodes[1].parameters.b', doc, { byName: true })).toBe('Node birch b');
    expect(fieldLabel('nodes[1]', doc, { byName: true })).toBe('Node birch');
  });
  it('returns an unknown path unchanged', () => {
    expect(fieldLabel('mystery.field')).toBe('mystery.field');
  });
});

describe('plainMessage(message, path)', () => {
  it('drops the doubled field prefix the API puts in front of its message', () => {
    expect(plainMessage('settings.to: settings.to: must differ from sweep.from', 'settings.to')).toBe('must differ from Sweep from');
    expect(plainMessage('document.nodes.0.id: must not be empty', 'nodes[0].id')).toBe('must not be empty');
    expect(plainMessage('file.name: contains a lone UTF-16 surrogate', 'file.name')).toBe('contains a lone UTF-16 surrogate');
  });
  it('turns internal paths inside the text into labels', () => {
    expect(plainMessage("duplicate node id 'a' (also nodes[0])")).toBe("duplicate node id 'a' (also Node 1)");
    expect(plainMessage("repeats the link 'a' -> 'b' of links[2]; combine them")).toBe("repeats the link 'a' -> 'b' of Link 3; combine them");
    expect(plainMessage('see element.rate')).toBe('see Rate');
  });
  it('leaves numbers and ordinary words alone', () => {
    expect(plainMessage('expected 0.5 or e.g. 1.25, got 3')).toBe('expected 0.5 or e.g. 1.25, got 3');
  });
});

describe('describeIssue(issue) and describeDiffEntry(entry)', () => {
  it('describeIssue says the label, then the message without internal paths', () => {
    expect(describeIssue({ path: 'nodes[1].id', message: "duplicate node id 'alder' (also nodes[0])" }, doc)).toBe("Node 2 id: duplicate node id 'alder' (also Node 1)");
  });
  it('describeDiffEntry reads "Link alder → birch weight: 0.25 → 0.2"', () => {
    expect(describeDiffEntry({ path: 'links[0].weight', kind: 'changed', before: 0.25, after: 0.2 }, doc, doc)).toBe('Link alder → birch weight: 0.25 → 0.2');
    expect(describeDiffEntry({ path: 'nodes[1].parameters', kind: 'added', after: { b: 0.55 } }, doc, doc)).toBe('Node birch parameters: added {"b":0.55}');
    const before = { nodes: [...doc.nodes, { id: 'cedar' }] };
    expect(describeDiffEntry({ path: 'nodes[2]', kind: 'removed', before: { id: 'cedar' } }, before, doc)).toBe('Node cedar: removed');
    expect(describeDiffEntry({ path: 'nodes[2]', kind: 'removed', before: { id: 'cedar', parameters: { b: 0.55 } } }, before, doc)).toBe('Node cedar: removed (was b = 0.55)');
    const withCedar = { links: [...doc.links, { from: 'alder', to: 'cedar' }] };
    expect(describeDiffEntry({ path: 'links[2]', kind: 'added', after: { from: 'alder', to: 'cedar', weight: 0.3, twoWay: true } }, doc, withCedar)).toBe('Link alder → cedar: added, weight 0.3, two-way');
  });
});
