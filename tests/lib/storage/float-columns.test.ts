import { describe, expect, it } from 'vitest';
import { predictResiduals, shuffleBytes, undoResiduals, unshuffleBytes, type PredictionOrder } from '../../../src/lib/storage/float-columns.ts';

/** Values that stress exactness: signed zeros, non-finite numbers, a NaN with a payload, subnormals, extremes. */
function awkwardValues(): Float64Array {
  const v = new Float64Array([0, -0, Infinity, -Infinity, Number.NaN, 5e-324, -5e-324, Number.MAX_VALUE, -Number.MAX_VALUE, 1, -1, 0.1, 1 / 3, Math.PI]);
  const withPayload = new Float64Array(v.length + 1);
  withPayload.set(v);
  new BigUint64Array(withPayload.buffer)[v.length] = 0x7ff8_0000_dead_beefn; // a quiet NaN carrying a payload
  return withPayload;
}

function pseudoRandomBits(n: number, seed: number): Float64Array {
  // xorshift64 (Marsaglia 2003), so every 64-bit pattern is possible, NaNs included.
  let s = BigInt(seed) | 1n;
  const out = new Float64Array(n);
  const bits = new BigUint64Array(out.buffer);
  for (let i = 0; i < n; i++) {
    s ^= (s << 13n) & 0xffff_ffff_ffff_ffffn; s ^= s >> 7n; s ^= (s << 17n) & 0xffff_ffff_ffff_ffffn;
    bits[i] = s;
  }
  return out;
}

const sameBits = (a: Float64Array, b: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

describe('predictResiduals / undoResiduals', () => {
  for (const order of [0, 1, 2] as PredictionOrder[]) {
    it(`order ${order}: undoResiduals(predictResiduals(v)) gives back every bit of v (signed zeros, NaN payloads, random patterns)`, () => {
      for (const v of [awkwardValues(), pseudoRandomBits(2000, 12345), new Float64Array(0), new Float64Array([7])]) {
        const r = new BigInt64Array(v.length);
        predictResiduals(v, order, r);
        const back = new Float64Array(v.length);
        undoResiduals(r, order, back);
        expect(sameBits(back, v)).toBe(true);
      }
    });
  }

  it('order 2 leaves zero residuals after the second value when the bit patterns step evenly (exact linear prediction)', () => {
    // Bit patterns b_i = b_0 + i*d are an arithmetic progression, so b_i - 2 b_{i-1} + b_{i-2} = 0 (derived).
    const v = new Float64Array(50);
    const bits = new BigInt64Array(v.buffer);
    const b0 = new BigInt64Array(new Float64Array([0.75]).buffer)[0];
    for (let i = 0; i < v.length; i++) bits[i] = b0 + BigInt(i) * 4096n;
    const r = new BigInt64Array(v.length);
    predictResiduals(v, 2, r);
    expect(r[0]).toBe(b0);
    expect(r[1]).toBe(4096n);
    expect([...r.slice(2)].every((x) => x === 0n)).toBe(true);
  });

  it('refuses an output of the wrong length', () => {
    expect(() => predictResiduals(new Float64Array(3), 1, new BigInt64Array(2))).toThrow(/2 slots for 3 values/);
    expect(() => undoResiduals(new BigInt64Array(3), 1, new Float64Array(4))).toThrow(/4 slots for 3 residuals/);
  });
});

describe('shuffleBytes / unshuffleBytes', () => {
  it('shuffleBytes puts byte k of value i at k*n + i, and unshuffleBytes undoes it', () => {
    const bytes = Uint8Array.from({ length: 24 }, (_, i) => i); // three 8-byte values: 0..7, 8..15, 16..23
    const s = shuffleBytes(bytes, 8);
    expect([...s.slice(0, 6)]).toEqual([0, 8, 16, 1, 9, 17]);
    expect([...s.slice(21)]).toEqual([7, 15, 23]);
    expect([...unshuffleBytes(s, 8)]).toEqual([...bytes]);
  });

  it('refuses a length that is not a whole number of values', () => {
    expect(() => shuffleBytes(new Uint8Array(9), 8)).toThrow(/not a whole number of 8-byte values/);
    expect(() => unshuffleBytes(new Uint8Array(9), 8)).toThrow(/not a whole number/);
  });
});
