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

describe('documentHash with the optional noise field', () => {
  // Pinned by running this same computation on the commit before `noise` existed (c28e9cf); a
  // document without `noise` must keep its hash so stored versions and cached results stay valid.
  const HASH_BEFORE_NOISE = '940470832d4fbebf7fb4ee5b06ecf08141437f936a784a2f0c2c07a004e768b4';

  it('leaves the hash of a document without noise as it was before the field existed', () => {
    const v = validateModelDocument(threeLakes);
    if (!v.ok) throw new Error('fixture invalid');
    expect('noise' in v.document).toBe(false);
    expect(documentHash(v.document)).toBe(HASH_BEFORE_NOISE);
  });

  it('changes the hash when noise is given', () => {
    const v = validateModelDocument({ ...copy(threeLakes), noise: { amplitude: 0.1 } });
    if (!v.ok) throw new Error(JSON.stringify(v.issues));
    expect(documentHash(v.document)).not.toBe(HASH_BEFORE_NOISE);
  });
});
