import { describe, expect, it } from 'vitest';
import { unknownSymbols } from '../../../src/lib/editor/expression-symbols.ts';

describe('unknownSymbols(expression, known)', () => {
  it('lists the symbols without a parameter in order of first appearance, once each', () => {
    expect(unknownSymbols('a - r * x + K * r', ['x', 'a'])).toEqual(['r', 'K']);
  });
  it('does not count function names or the constants pi and e', () => {
    expect(unknownSymbols('exp(-x) + tanh(k * x) + pi + e', ['x'])).toEqual(['k']);
  });
  it('gives [] for an empty or unparsable expression', () => {
    expect(unknownSymbols('', [])).toEqual([]);
    expect(unknownSymbols('a * (b', [])).toEqual([]);
  });
});
