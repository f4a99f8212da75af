import { describe, expect, it } from 'vitest';
import { diffDocuments } from '../../../../src/lib/server/models/document-diff.ts';

describe('diffDocuments', () => {
  it('is empty for equal documents, whatever the key order', () => {
    expect(diffDocuments({ a: 1, b: { c: [1, 2] } }, { b: { c: [1, 2] }, a: 1 })).toEqual([]);
  });

  it('matches nodes by id, so inserting a node reports one addition, not a shifted list', () => {
    const before = { nodes: [{ id: 'upper' }, { id: 'lower', parameters: { a: 0.05 } }] };
    const after = { nodes: [{ id: 'upper' }, { id: 'middle' }, { id: 'lower', parameters: { a: 0.04 } }] };
    expect(diffDocuments(before, after)).toEqual([
      { path: 'nodes/[id=lower]/parameters/a', kind: 'changed', before: 0.05, after: 0.04 },
      { path: 'nodes/[id=middle]', kind: 'added', after: { id: 'middle' } },
    ]);
  });

  it('matches links by their endpoints and reports removed fields', () => {
    const before = { links: [{ from: 'a', to: 'b', weight: 1, twoWay: true }], start: [[0, 0]] };
    const after = { links: [{ from: 'a', to: 'b', weight: 2 }] };
    expect(diffDocuments(before, after)).toEqual([
      { path: 'links/[a->b]/weight', kind: 'changed', before: 1, after: 2 },
      { path: 'links/[a->b]/twoWay', kind: 'removed', before: true },
      { path: 'start', kind: 'removed', before: [[0, 0]] },
    ]);
  });
});
