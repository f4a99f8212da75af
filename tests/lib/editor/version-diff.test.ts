import { describe, it, expect } from 'vitest';
import { diffJson, formatDiffEntry } from '../../../src/lib/editor';

describe('diffJson', () => {
  it('reports a changed node override with a readable path', () => {
    const a = { nodes: [{ id: 'u' }, { id: 'm', parameters: { a: 0.07 } }] };
    const b = { nodes: [{ id: 'u' }, { id: 'm', parameters: { a: 0.05 } }] };
    expect(diffJson(a, b).map(formatDiffEntry)).toEqual(['nodes[1].parameters.a: 0.07 → 0.05']);
  });

  it('reports added and removed array items and keys', () => {
    const a = { links: [{ from: 'u', to: 'm', weight: 1 }], description: 'old' };
    const b = { links: [{ from: 'u', to: 'm', weight: 1 }, { from: 'm', to: 'l', weight: 2 }], name: 'x' };
    expect(diffJson(a, b).map(formatDiffEntry)).toEqual([
      'links[1]: added {"from":"m","to":"l","weight":2}',
      'description: removed (was "old")',
      'name: added "x"',
    ]);
  });

  it('quotes keys that are not identifiers and reports a kind change as one entry', () => {
    const d = diffJson({ p: { 'k-1': 1 } }, { p: { 'k-1': { v: 1 } } });
    expect(d.map(formatDiffEntry)).toEqual(['p["k-1"]: 1 → {"v":1}']);
  });

  it('finds nothing between equal documents', () => {
    const doc = { a: [1, 2, { b: null }], c: 'x' };
    expect(diffJson(doc, JSON.parse(JSON.stringify(doc)))).toEqual([]);
  });
});
