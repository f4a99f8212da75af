import { describe, it, expect } from 'vitest';
import { describeDiffEntry, diffModelDocuments } from '../../../src/lib/editor';

const v1 = {
  format: 'brinkmap/network-1',
  name: 'Alder carr',
  nodes: [{ id: 'alder' }, { id: 'birch' }, { id: 'cedar', parameters: { b: 0.5 } }],
  links: [{ from: 'alder', to: 'birch', weight: 0.25 }, { from: 'birch', to: 'cedar', weight: 1 }, { from: 'cedar', to: 'alder', weight: -0.5 }],
};
const words = (before: typeof v1, after: typeof v1) => diffModelDocuments(before, after).map((e) => describeDiffEntry(e, before, after));

describe('diffModelDocuments(before, after)', () => {
  it('a changed weight reads "Link alder → birch weight: 0.25 → 0.2"', () => {
    const v2 = { ...v1, links: [{ ...v1.links[0], weight: 0.2 }, v1.links[1], v1.links[2]] };
    expect(words(v1, v2)).toEqual(['Link alder → birch weight: 0.25 → 0.2']);
  });
  it('removing the first link is one removal, not every later link changing its ends', () => {
    const v2 = { ...v1, links: v1.links.slice(1) };
    expect(words(v1, v2)).toEqual(['Link alder → birch: removed (was weight 0.25)']);
  });
  it('links and nodes in another order are no change; a moved and edited one is found by its ends', () => {
    const v2 = { ...v1, nodes: [...v1.nodes].reverse(), links: [v1.links[2], { ...v1.links[1], weight: 2 }, v1.links[0]] };
    expect(words(v1, v2)).toEqual(['Link birch → cedar weight: 1 → 2']);
  });
  it('a node removed with its links, and a node override changed, are named by node id', () => {
    const v2 = {
      ...v1,
      nodes: [{ id: 'alder' }, { id: 'cedar', parameters: { b: 0.55 } }],
      links: [{ from: 'cedar', to: 'alder', weight: -0.5 }],
    };
    expect(words(v1, v2)).toEqual([
      'Node birch: removed',
      'Node cedar b: 0.5 → 0.55',
      'Link alder → birch: removed (was weight 0.25)',
      'Link birch → cedar: removed (was weight 1)',
    ]);
  });
  it('an added link and a two-way change', () => {
    const v2 = { ...v1, links: [...v1.links.slice(0, 2), { ...v1.links[2], twoWay: true }, { from: 'alder', to: 'cedar', weight: 0.3 }] };
    expect(words(v1, v2)).toEqual(['Link cedar → alder: now two-way', 'Link alder → cedar: added, weight 0.3']);
  });
  it('other fields are compared as diffJson does, and lists without ids by position', () => {
    expect(words(v1, { ...v1, name: 'Alder fen' })).toEqual(['Name: "Alder carr" → "Alder fen"']);
    const partial = { nodes: [{}], links: [] } as unknown as typeof v1;
    expect(diffModelDocuments({ nodes: [{}], links: [] }, partial)).toEqual([]);
    expect(diffModelDocuments(1, 2)).toEqual([{ path: '(document)', kind: 'changed', before: 1, after: 2 }]);
  });
});
