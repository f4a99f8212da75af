import { describe, expect, it } from 'vitest';
import { jsonShapeProblem, problemField } from '../../../src/lib/server/json-shape.ts';

const nested = (depth: number): unknown => JSON.parse('['.repeat(depth) + ']'.repeat(depth));

describe('jsonShapeProblem(value)', () => {
  it('accepts well-formed values up to the depth cap, the top level counting as depth 1', () => {
    expect(jsonShapeProblem(nested(32))).toBeNull();
    expect(jsonShapeProblem({ a: [{ b: 'text \u{1F30A}' }], n: 1, z: null, t: true })).toBeNull();
    expect(jsonShapeProblem('plain')).toBeNull();
  });

  it('reports the first container deeper than maxDepth with its path', () => {
    expect(jsonShapeProblem(nested(33))).toEqual({ path: Array(32).fill(0), message: 'nested more than 32 levels deep' });
    expect(jsonShapeProblem({ a: { b: [1] } }, { maxDepth: 2 })).toEqual({ path: ['a', 'b'], message: 'nested more than 2 levels deep' });
  });

  it('walks 500 000 levels without overflowing the stack (the walk is iterative)', () => {
    const problem = jsonShapeProblem({ document: { junk: nested(500_000) } });
    expect(problem?.path.slice(0, 3)).toEqual(['document', 'junk', 0]);
  });

  it('finds lone surrogates, high or low, in values and in keys, but not surrogate pairs', () => {
    expect(jsonShapeProblem({ name: '\ud800lone' })).toEqual({ path: ['name'], message: 'the text contains a lone UTF-16 surrogate (U+D800) at character 1; send well-formed Unicode' });
    expect(jsonShapeProblem(['ok', 'x\udc00'])?.path).toEqual([1]);
    expect(jsonShapeProblem({ p: { ['k\udbff']: 1 } })).toMatchObject({ path: ['p', 'k\udbff'], message: expect.stringContaining('the field name') });
    expect(jsonShapeProblem({ name: '\ud83c\udf0a' })).toBeNull();
    expect(jsonShapeProblem({ name: '\udf0a\ud83c' })?.path).toEqual(['name']);
  });

  it('reports in document order (the first key before later ones)', () => {
    expect(jsonShapeProblem({ a: '\ud800', b: nested(40) })?.path).toEqual(['a']);
    expect(jsonShapeProblem({ a: nested(40), b: '\ud800' })?.path[0]).toBe('a');
  });
});

describe('problemField(path)', () => {
  it('joins short paths in full and names the top level "(body)"', () => {
    expect(problemField(['nodes', 0, 'id'])).toBe('nodes.0.id');
    expect(problemField([])).toBe('(body)');
  });
  it('cuts long paths at the first array index, keeping at most four keys', () => {
    expect(problemField(['document', 'start', ...Array(40).fill(0)])).toBe('document.start');
    expect(problemField(['document', ...Array(40).fill('a')])).toBe('document.a.a.a');
    expect(problemField(Array(40).fill(0))).toBe('(body)');
  });
});
