import { describe, it, expect } from 'vitest';
import { linksToMatrix, setMatrixCell, matrixToLinks, type LinkRow } from '../../../src/lib/editor';

const ids = ['u', 'm', 'l'];
const links: LinkRow[] = [
  { from: 'u', to: 'm', weight: '1', twoWay: false },
  { from: 'm', to: 'l', weight: '0.5', twoWay: true },
];

describe('linksToMatrix', () => {
  it('puts a one-way link at (from, to) and a two-way link at both cells', () => {
    expect(linksToMatrix(ids, links)).toEqual([
      [0, 1, 0],
      [0, 0, 0.5],
      [0, 0.5, 0],
    ]);
  });
  it('adds up parallel links, as their coupling terms add in the rate equation', () => {
    const m = linksToMatrix(ids, [...links, { from: 'u', to: 'm', weight: '2', twoWay: false }]);
    expect(m[0][1]).toBe(3);
  });
  it('shows an unreadable weight as NaN rather than dropping it', () => {
    expect(linksToMatrix(ids, [{ from: 'u', to: 'l', weight: 'x', twoWay: false }])[0][2]).toBeNaN();
  });
});

describe('setMatrixCell', () => {
  it('changing one direction of a two-way link splits it, keeping the other direction', () => {
    const out = setMatrixCell(links, 'l', 'm', 2);
    expect(linksToMatrix(ids, out)).toEqual([
      [0, 1, 0],
      [0, 0, 0.5],
      [0, 2, 0],
    ]);
    expect(out.every((l) => !l.twoWay)).toBe(true);
  });
  it('setting 0 removes the link', () => {
    const out = setMatrixCell(links, 'u', 'm', 0);
    expect(out).toEqual([links[1]]);
  });
  it('adds a new one-way link for an empty cell and leaves the input untouched', () => {
    const before = JSON.stringify(links);
    const out = setMatrixCell(links, 'l', 'u', 0.25);
    expect(out).toContainEqual({ from: 'l', to: 'u', weight: '0.25', twoWay: false });
    expect(JSON.stringify(links)).toBe(before);
  });
  it('every edit of the matrix round-trips: linksToMatrix(setMatrixCell(...)) has exactly that cell changed', () => {
    const m0 = linksToMatrix(ids, links);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      const m1 = linksToMatrix(ids, setMatrixCell(links, ids[i], ids[j], 7));
      const expected = m0.map((r) => [...r]);
      expected[i][j] = 7;
      expect(m1).toEqual(expected);
    }
  });
});

describe('matrixToLinks', () => {
  it('turns a symmetric pair into one two-way link and the rest into one-way links', () => {
    const out = matrixToLinks(ids, [
      [0, 1, 0],
      [0, 0, 0.5],
      [0, 0.5, 0],
    ]);
    expect(out).toEqual(links);
  });
  it('is the inverse of linksToMatrix on matrices', () => {
    const m = [[0, 2, -1], [3, 0, 0], [-1, 0, 0]];
    expect(linksToMatrix(ids, matrixToLinks(ids, m))).toEqual(m);
  });
});
