import { describe, expect, it } from 'vitest';
import { canonicalJson, documentHash, ModelError, validateModelDocument } from '../../../src/lib/model';
import { copy, threeLakes } from './fixtures';

describe('canonicalJson', () => {
  it('sorts object keys at every depth and keeps array order', () => {
    expect(canonicalJson({ b: 1, a: { d: [3, 1], c: null } })).toBe('{"a":{"c":null,"d":[3,1]},"b":1}');
  });
  it('drops undefined properties like JSON.stringify', () => {
    expect(canonicalJson({ a: undefined, b: 'x' })).toBe('{"b":"x"}');
  });
  it('refuses non-finite numbers, naming the path', () => {
    expect(() => canonicalJson({ a: { b: [1, NaN] } })).toThrow(ModelError);
    expect(() => canonicalJson({ a: { b: [1, NaN] } })).toThrow(/^a\.b\[1\]: cannot hash the non-finite number NaN/);
  });
});

describe('documentHash', () => {
  it('matches an independent SHA-256 (node:crypto, test-only) of the canonical JSON', async () => {
    const { createHash } = await import('node:crypto');
    const text = canonicalJson(threeLakes);
    expect(documentHash(threeLakes)).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
    expect(documentHash({ name: 'Seen \u00e9 \u{1F30A}' })).toBe(
      createHash('sha256').update(canonicalJson({ name: 'Seen \u00e9 \u{1F30A}' }), 'utf8').digest('hex'),
    );
  });

  it('does not depend on key order, and a default written out equals the validated default', () => {
    const reverseKeys = (v: unknown): unknown =>
      Array.isArray(v) ? v.map(reverseKeys)
        : v && typeof v === 'object' ? Object.fromEntries(Object.entries(v).reverse().map(([k, x]) => [k, reverseKeys(x)]))
        : v;
    const reordered = reverseKeys(threeLakes);
    expect(JSON.stringify(reordered)).not.toBe(JSON.stringify(threeLakes));
    expect(documentHash(reordered)).toBe(documentHash(threeLakes));
    const withoutTerm = copy(threeLakes);
    delete withoutTerm.coupling.term;
    const a = validateModelDocument(withoutTerm);
    const b = validateModelDocument(threeLakes);
    if (!a.ok || !b.ok) throw new Error('fixture invalid');
    expect(documentHash(a.document)).toBe(documentHash(b.document));
  });

  it('changes when a value changes', () => {
    const d = copy(threeLakes);
    d.element.parameters.a = 0.0500001;
    expect(documentHash(d)).not.toBe(documentHash(threeLakes));
    expect(documentHash(threeLakes)).toMatch(/^[0-9a-f]{64}$/);
  });
});
