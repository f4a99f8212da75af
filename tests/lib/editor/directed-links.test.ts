import { describe, expect, it } from 'vitest';
import { describeLinkCount, directedLinkCount } from '../../../src/lib/editor/directed-links.ts';

describe('directedLinkCount(links)', () => {
  it('counts a two-way link between two nodes twice and a two-way self-link once', () => {
    expect(directedLinkCount([{ from: 'a', to: 'b', twoWay: true }, { from: 'b', to: 'c' }, { from: 'c', to: 'c', twoWay: true }])).toEqual({ directed: 4, twoWay: 1 });
    expect(directedLinkCount([])).toEqual({ directed: 0, twoWay: 0 });
  });
  it('describeLinkCount says what was counted', () => {
    expect(describeLinkCount([{ from: 'a', to: 'b' }])).toBe('1 directed link');
    expect(describeLinkCount([{ from: 'a', to: 'b', twoWay: true }, { from: 'b', to: 'c' }])).toBe('3 directed links (1 two-way pair counted both ways)');
  });
});
