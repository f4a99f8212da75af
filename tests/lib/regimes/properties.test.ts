import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { mergeBands, validateBandTag, type IntervalLabel } from '../../../src/lib/regimes/index';

const regime = fc.constantFrom('weak' as const, 'intermediate' as const, 'strong' as const, null);

describe('mergeBands properties (fast-check)', () => {
  it('mergeBands covers exactly the labelled intervals, keeps their labels and never leaves two equal bands touching', () => {
    fc.assert(fc.property(fc.array(regime, { minLength: 1, maxLength: 30 }), (labels) => {
      const intervals: IntervalLabel[] = labels.map((r, i) => ({ from: i, to: i + 1, fromBound: 'c', toBound: 'c', regime: r, reason: `r${i}`, start: 'all-base' }));
      const bands = mergeBands(intervals);
      // Every labelled unit interval lies in exactly one band with its label; unlabelled ones in none.
      for (const it of intervals) {
        const inside = bands.filter((b) => b.from <= it.from && it.to <= b.to);
        if (it.regime === null) expect(inside).toHaveLength(0);
        else { expect(inside).toHaveLength(1); expect(inside[0].regime).toBe(it.regime); }
      }
      for (let k = 1; k < bands.length; k++) {
        expect(bands[k].from).toBeGreaterThanOrEqual(bands[k - 1].to);
        if (bands[k].from === bands[k - 1].to) expect(bands[k].regime).not.toBe(bands[k - 1].regime);
      }
    }));
  });
});

describe('validateBandTag properties (fast-check)', () => {
  it('validateBandTag accepts every well-formed tag and returns it unchanged apart from colour case and name trimming', () => {
    const hex = fc.array(fc.constantFrom(...'0123456789abcdefABCDEF'.split('')), { minLength: 6, maxLength: 6 }).map((c) => `#${c.join('')}`);
    const name = fc.string({ minLength: 1, maxLength: 80 }).filter((s) => s.trim().length > 0);
    fc.assert(fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 1e-6, max: 1e6, noNaN: true }), name, hex, fc.string({ maxLength: 2000 }),
      (from, width, n, colour, note) => {
        const r = validateBandTag({ from, to: from + width, name: n, colour, note });
        if (!(from < from + width)) return;
        expect(r.ok).toBe(true);
        if (r.ok) expect(r.tag).toEqual({ from, to: from + width, name: n.trim(), colour: colour.toLowerCase(), note });
      }));
  });

  it('validateBandTag rejects any colour that is not #rrggbb, naming the colour field', () => {
    fc.assert(fc.property(fc.string({ maxLength: 12 }).filter((c) => !/^#[0-9a-fA-F]{6}$/.test(c)), (colour) => {
      const r = validateBandTag({ from: 0, to: 1, name: 'n', colour, note: '' });
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.errors.map((e) => e.path)).toContain('colour');
    }));
  });
});
