import { describe, expect, it } from 'vitest';
import { describeProblems, parseAdjacencyCsv } from '../../../../src/lib/server/models/adjacency-csv.ts';

const ids = ['upper', 'middle', 'lower'];

describe('parseAdjacencyCsv', () => {
  it('reads row -> column weights, skips empty and zero cells, accepts another header order', () => {
    const r = parseAdjacencyCsv('id,lower,upper,middle\nlower,,0,0.5\nupper,1e-1,0,2\nmiddle,0,,\n', ids);
    expect(r).toEqual({ ok: true, nodeIds: ['lower', 'upper', 'middle'], links: [
      { from: 'lower', to: 'middle', weight: 0.5 }, { from: 'upper', to: 'lower', weight: 0.1 }, { from: 'upper', to: 'middle', weight: 2 },
    ] });
  });

  it('accepts semicolon-separated files and a byte-order mark', () => {
    const r = parseAdjacencyCsv('\uFEFF;upper;middle;lower\nupper;0;1;0\nmiddle;0;0;1\nlower;0;0;0\n', ids);
    expect(r.ok && r.links.length).toBe(2);
  });

  it('names row and column of every bad cell, and refuses hex or blank-padded numbers', () => {
    const r = parseAdjacencyCsv(',upper,middle,lower\nupper,0,0x1,0\nmiddle,0,0,abc\nlower,0,0,0\n', ids);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problems).toEqual([
        { row: 2, column: 3, message: 'weight "0x1" is not a number' },
        { row: 3, column: 4, message: 'weight "abc" is not a number' },
      ]);
    }
  });

  it('refuses a matrix that leaves out a node of the model', () => {
    const r = parseAdjacencyCsv(',upper,middle\nupper,0,1\nmiddle,0,0\n', ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0].message).toMatch(/missing "lower"/);
  });

  it('refuses a row whose id does not match the header column order', () => {
    const r = parseAdjacencyCsv(',upper,middle,lower\nmiddle,0,1,0\nupper,0,0,1\nlower,0,0,0\n', ids);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0]).toMatchObject({ row: 2, column: 1 });
  });
  it('hints at decimal commas: extra cells in a comma file, "0,5" in a semicolon file', () => {
    const comma = parseAdjacencyCsv(',a,b\na,0,0,5\nb,0,0\n', ['a', 'b']);
    expect(!comma.ok && describeProblems(comma.problems)).toContain('if the numbers use decimal commas (0,5)');
    const semi = parseAdjacencyCsv(';a;b\na;0;0,5\nb;0;0\n', ['a', 'b']);
    expect(!semi.ok && describeProblems(semi.problems)).toContain('weight "0,5" is not a number; write it with a decimal point: 0.5');
  });
});
