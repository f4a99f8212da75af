import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { canonicalJson, resultCacheKey } from '../../../../src/lib/server/runs/cache-key.ts';

describe('resultCacheKey', () => {
  it('is the SHA-256 of kind, hash, canonical settings and engine version, one per line', () => {
    const expected = createHash('sha256').update('trace\nabc\n{"from":0,"to":1}\n1.0.0').digest('hex');
    expect(resultCacheKey('trace', 'abc', { to: 1, from: 0 }, '1.0.0')).toBe(expected);
  });

  it('ignores key order and undefined values, and changes with any input', () => {
    const k = resultCacheKey('trace', 'h', { maxStep: 0.01, from: 0 }, '1');
    expect(resultCacheKey('trace', 'h', { from: 0, maxStep: 0.01, to: undefined }, '1')).toBe(k);
    expect(resultCacheKey('trace', 'h', { from: 0, maxStep: 0.02 }, '1')).not.toBe(k);
    expect(resultCacheKey('trace', 'h2', { from: 0, maxStep: 0.01 }, '1')).not.toBe(k);
    expect(resultCacheKey('trace', 'h', { from: 0, maxStep: 0.01 }, '2')).not.toBe(k);
    // The kind of run is part of the identity: another computation on the same inputs is not this result.
    expect(resultCacheKey('escapes', 'h', { from: 0, maxStep: 0.01 }, '1')).not.toBe(k);
  });

  it('canonicalJson sorts keys at every depth and keeps array order', () => {
    expect(canonicalJson({ b: [{ y: 1, x: 2 }], a: null })).toBe('{"a":null,"b":[{"x":2,"y":1}]}');
  });
});
