import { describe, expect, it } from 'vitest';
import { formatValue, integerTicks, linearAxis } from '../../../src/lib/plot/ticks';

describe('linearAxis', () => {
  it('nice widens [0.013, 0.97] to [0, 1] with steps of 0.2 (1-2-5 rule, d3-scale ticks)', () => {
    const a = linearAxis([0.013, 0.97], [0, 500], 5, true);
    expect(a.domain).toEqual([0, 1]);
    expect(a.ticks.map((t) => t.value)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(a.ticks[5].pos).toBe(500);
  });
  it('without nice keeps a zoomed domain exactly and ticks inside it', () => {
    const a = linearAxis([0.123, 0.456], [0, 100], 5, false);
    expect(a.domain).toEqual([0.123, 0.456]);
    for (const t of a.ticks) { expect(t.value).toBeGreaterThanOrEqual(0.123); expect(t.value).toBeLessThanOrEqual(0.456); }
  });
  it('a zero-width domain is widened so the axis is drawable', () => {
    const a = linearAxis([2, 2], [0, 100]);
    expect(a.domain[0]).toBeLessThan(2);
    expect(a.domain[1]).toBeGreaterThan(2);
  });
  it('integerTicks keeps only whole numbers, labelled without decimals (for tipped counts)', () => {
    const t = integerTicks(linearAxis([0, 2], [0, 100], 10));
    expect(t.map((x) => x.value)).toEqual([0, 1, 2]);
    expect(t.map((x) => x.label)).toEqual(['0', '1', '2']);
  });
});

describe('formatValue', () => {
  it('prints 6 significant digits in plain or exponent form', () => {
    expect(formatValue(0.384900179459750)).toBe('0.3849');
    expect(formatValue(-2 / (3 * Math.sqrt(3)))).toBe('-0.3849');
    expect(formatValue(1.23456789e-7)).toBe('1.23457e-7');
    expect(formatValue(0)).toBe('0');
  });
});
