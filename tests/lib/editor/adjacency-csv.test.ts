import { describe, it, expect } from 'vitest';
import { parseAdjacencyCsv, describeCsvIssue, MAX_CSV_NODES } from '../../../src/lib/editor';

describe('parseAdjacencyCsv', () => {
  it('reads ids from the header row and weights by row = source, column = target', () => {
    const r = parseAdjacencyCsv(',upper,middle,lower\nupper,0,1,\nmiddle,0,0,0.5\nlower,0,0.5,0\n');
    expect(r).toEqual({ ok: true, nodeIds: ['upper', 'middle', 'lower'], matrix: [[0, 1, 0], [0, 0, 0.5], [0, 0.5, 0]] });
  });

  it('accepts rows in another order and semicolon delimiters', () => {
    const r = parseAdjacencyCsv('id;a;b\nb;2;0\na;0;1\n');
    expect(r).toEqual({ ok: true, nodeIds: ['a', 'b'], matrix: [[0, 1], [2, 0]] });
  });

  it('names row and column of a non-numeric weight', () => {
    const r = parseAdjacencyCsv(',a,b\na,0,heavy\nb,0,0\n');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues).toEqual([{ row: 2, column: 3, message: '"heavy" is not a number (link a → b)' }]);
      expect(describeCsvIssue(r.issues[0])).toBe('row 2, column C: "heavy" is not a number (link a → b)');
    }
  });

  it('reports ragged rows, unknown ids and missing rows together', () => {
    const r = parseAdjacencyCsv(',a,b,c\na,0,1\nzz,0,0,0\nb,0,0,0\n');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const text = r.issues.map(describeCsvIssue);
      expect(text).toContain('row 2: has 3 cells but the header has 4');
      expect(text).toContain('row 3, column A: node "zz" is not in the header row (is it "c", which has no row?)');
      // Row 2 is a's row, only with too few cells: a has a row, c has none.
      expect(text.some((t) => t.includes('node "a" is in the header but has no row'))).toBe(false);
      expect(text.some((t) => t.includes('node "c" is in the header but has no row'))).toBe(true);
    }
  });

  it('refuses duplicate header ids and an empty file', () => {
    const dup = parseAdjacencyCsv(',a,a\na,0,0\n');
    expect(dup.ok === false && dup.issues[0]).toEqual({ row: 1, column: 3, message: 'node "a" appears twice in the header' });
    const empty = parseAdjacencyCsv('\n\n');
    expect(empty.ok === false && empty.issues[0].message).toBe('the file is empty');
  });

  it(`refuses more than ${MAX_CSV_NODES} nodes, naming the limit`, () => {
    const ids = Array.from({ length: MAX_CSV_NODES + 1 }, (_, k) => `n${k}`);
    const r = parseAdjacencyCsv(`,${ids.join(',')}\n`);
    expect(r.ok === false && r.issues[0].message).toBe(`${MAX_CSV_NODES + 1} nodes is more than the limit of ${MAX_CSV_NODES}`);
  });

  it('describeCsvIssue numbers columns past Z like a spreadsheet (AA)', () => {
    expect(describeCsvIssue({ row: 1, column: 27, message: 'x' })).toBe('row 1, column AA: x');
  });
  it('a ragged row does not make its node "lack a row": only the node really missing one is named', () => {
    const r = parseAdjacencyCsv(',a,b,c\na,0,1,0,9\nb,0,0,1\n');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const text = r.issues.map(describeCsvIssue).join('\n');
      expect(text).toContain('row 2: has 5 cells but the header has 4');
      expect(text).toContain('node "c" is in the header but has no row');
      expect(text).not.toContain('node "a" is in the header but has no row');
    }
  });
  it('a comma-separated file with decimal commas gets a hint about them', () => {
    const r = parseAdjacencyCsv(',a,b\na,0,0,5\nb,0,0\n');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues).toHaveLength(1);
      expect(describeCsvIssue(r.issues[0])).toMatch(/^row 2: has 4 cells but the header has 3; if the numbers use decimal commas \(0,5\), those split the cells/);
    }
  });
  it('a semicolon file with a decimal comma in a cell suggests the number with a point', () => {
    const r = parseAdjacencyCsv(';a;b\na;0;0,5\nb;0;0\n');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(describeCsvIssue(r.issues[0])).toBe('row 2, column C: "0,5" is not a number (link a → b); write it with a decimal point: 0.5');
  });
  it('a row with too few cells, or a semicolon file, gets no decimal-comma hint', () => {
    const r = parseAdjacencyCsv(',a,b\na,0\nb,0,0\n');
    expect(!r.ok && describeCsvIssue(r.issues[0])).toBe('row 2: has 2 cells but the header has 3');
    const s = parseAdjacencyCsv(';a;b\na;0;1;2\nb;0;0\n');
    expect(!s.ok && describeCsvIssue(s.issues[0])).toBe('row 2: has 4 cells but the header has 3');
  });
});

describe('parseAdjacencyCsv: the node that lacks a row', () => {
  it('points at the header cell of the node without a row, not at the last row of the file', () => {
    const r = parseAdjacencyCsv(',alder,birch,cedar\nalder,0,1,0\nbirch,0,0,1\n');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues.map(describeCsvIssue)).toEqual(['row 1, column D: node "cedar" is in the header but has no row']);
  });
  it('a misspelt row id is named as the likely missing node', () => {
    const r = parseAdjacencyCsv(',alder,birch\nalder,0,1\nbrich,0,0\n');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues.map(describeCsvIssue)).toEqual([
        'row 1, column C: node "birch" is in the header but has no row',
        'row 3, column A: node "brich" is not in the header row (is it "birch", which has no row?)',
      ]);
    }
  });
  it('with two rowless nodes and one stray row no guess is made', () => {
    const r = parseAdjacencyCsv(',a,b,c\na,0,0,0\nzz,0,0,0\n');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const text = r.issues.map(describeCsvIssue);
      expect(text).toEqual([
        'row 1, column C: node "b" is in the header but has no row',
        'row 1, column D: node "c" is in the header but has no row',
        'row 3, column A: node "zz" is not in the header row',
      ]);
    }
  });
});
