import { describe, expect, it } from 'vitest';
import { wilsonInterval, quantileSorted, summarizeTimes, histogram, survivalCurve, escapeStatistics } from '../../../src/lib/noise/escape-statistics';
import { estimateWork, checkBudget, BudgetExceededError } from '../../../src/lib/noise/budget';
import { defaultStep, compareSteps } from '../../../src/lib/noise/step-size';
import { escapeThresholds } from '../../../src/lib/noise/thresholds';
import type { PathBatch } from '../../../src/lib/noise/monte-carlo';

describe('wilsonInterval(k, n)', () => {
  it('matches Newcombe (1998, Stat. Med. 17, 857, Table II) for 81/263: 0.2553 to 0.3662 (from memory)', () => {
    const { low, high } = wilsonInterval(81, 263);
    expect(low).toBeCloseTo(0.2553, 4);
    expect(high).toBeCloseTo(0.3662, 4);
  });
  it('for k = 0 has low 0 and high z^2 / (n + z^2) (the formula with p = 0, derived by hand)', () => {
    const z = 1.959963984540054;
    const { low, high } = wilsonInterval(0, 10);
    expect(low).toBe(0);
    expect(high).toBeCloseTo((z * z) / (10 + z * z), 12);
  });
  it('is symmetric: [low, high](k, n) = 1 - [high, low](n - k, n), and [0, 1] for n = 0', () => {
    const a = wilsonInterval(3, 17);
    const b = wilsonInterval(14, 17);
    expect(a.low).toBeCloseTo(1 - b.high, 14);
    expect(a.high).toBeCloseTo(1 - b.low, 14);
    expect(wilsonInterval(0, 0)).toEqual({ low: 0, high: 1 });
  });
});

describe('quantileSorted(x, q) (Hyndman & Fan type 7)', () => {
  it('interpolates h = (m - 1) q: [1, 2, 3, 4] gives 1.75 at 0.25, 2.5 at 0.5, 4 at 1 (definition, by hand)', () => {
    const x = [1, 2, 3, 4];
    expect(quantileSorted(x, 0.25)).toBeCloseTo(1.75, 14);
    expect(quantileSorted(x, 0.5)).toBeCloseTo(2.5, 14);
    expect(quantileSorted(x, 1)).toBe(4);
    expect(quantileSorted(x, 0)).toBe(1);
    expect(Number.isNaN(quantileSorted([], 0.5))).toBe(true);
  });
});

describe('summarizeTimes, histogram and survivalCurve', () => {
  it('summarizeTimes gives the mean and Z95 s / sqrt(m) ([1..5]: mean 3, s = sqrt(2.5), by hand)', () => {
    const s = summarizeTimes([5, 1, 4, 2, 3]);
    expect(s.mean).toBe(3);
    expect(s.meanHalfWidth).toBeCloseTo((1.959963984540054 * Math.sqrt(2.5)) / Math.sqrt(5), 12);
    expect(s.median).toBe(3);
  });
  it('histogram counts every value once; survival counts unreached events as surviving', () => {
    const h = histogram([0.1, 0.5, 0.9, 1], 2, 1);
    expect(h.counts).toEqual([1, 3]);
    const sv = survivalCurve([1, 2], 4, 2, 3);
    expect(sv.t).toEqual([0, 1, 2]);
    expect(sv.survival).toEqual([1, 0.75, 0.5]);
  });
});

describe('escapeStatistics(batch, names)', () => {
  it('counts complete orders, k-th times, between-times, returns and capped paths of a hand-made batch', () => {
    const batch: PathBatch = {
      first: 0, count: 3, n: 2, cancelled: false,
      times: Float64Array.of(1, 3, 4, 2, 5, Number.NaN),
      order: Int32Array.of(0, 1, 1, 0, 0, -1),
      returns: Int32Array.of(0, 2, 1),
      capped: Uint8Array.of(0, 0, 1),
      steps: Float64Array.of(30, 40, 100),
    };
    const s = escapeStatistics(batch, ['a', 'b']);
    expect(s.sequences.map((q) => [q.order.join(','), q.count])).toEqual([['a,b', 1], ['b,a', 1]]);
    expect(s.sequences[0].probability).toBeCloseTo(1 / 3, 14);
    expect(s.escapeTimes[0].count).toBe(3);
    expect(s.escapeTimes[0].mean).toBeCloseTo((1 + 2 + 5) / 3, 14);
    expect(s.escapeTimes[1].mean).toBeCloseTo((3 + 4) / 2, 14);
    expect(s.between).toEqual([{ j: 1, k: 2, count: 2, mean: 2 }]);
    expect(s.returns).toEqual({ total: 3, paths: 2 });
    expect(s.capped).toBe(1);
    expect(s.nodeSteps).toBe(340);
  });
});

describe('budget, step and thresholds', () => {
  it('estimateWork = paths x ceil(min(T, tMax) / dt) x n, and checkBudget refuses with the estimate in the message', () => {
    expect(estimateWork(100, 2, 0.01, 1000, 50)).toEqual({ nodeSteps: 100 * 5000 * 2, stepsPerPath: 5000, basis: 'prediction' });
    expect(estimateWork(100, 2, 0.01, 10, 50).basis).toBe('t-max');
    expect(() => checkBudget(estimateWork(1e6, 6, 0.01, 1e4), 1e9)).toThrow(BudgetExceededError);
    expect(() => checkBudget(estimateWork(1e6, 6, 0.01, 1e4), 1e9)).toThrow(/6\.00e\+12 node-steps.*larger noise level.*prediction/);
    expect(() => checkBudget(estimateWork(10, 1, 0.1, 1), 1e9)).not.toThrow();
  });
  it('defaultStep is 0.05 / max |lambda|; compareSteps passes iff |shift| < 2 half-widths', () => {
    expect(defaultStep([{ re: -2, im: 0 }, { re: -0.5, im: 0 }])).toBeCloseTo(0.025, 15);
    const full = { count: 100, mean: 10, meanHalfWidth: 1, median: 9, q05: 1, q95: 30 };
    expect(compareSteps(0.1, full, { ...full, mean: 11.5 }).passed).toBe(true);
    expect(compareSteps(0.1, full, { ...full, mean: 12.5 }).passed).toBe(false);
  });
  it('escapeThresholds defaults to (threshold + target) / 2 and rejects overrides outside (threshold, target) by field', () => {
    const roles = [{ base: -1, threshold: 0, tipped: 1 }];
    expect(Array.from(escapeThresholds(roles))).toEqual([0.5]);
    expect(Array.from(escapeThresholds(roles, undefined, 'down'))).toEqual([-0.5]);
    expect(Array.from(escapeThresholds(roles, [0.8]))).toEqual([0.8]);
    expect(() => escapeThresholds(roles, [1.2])).toThrow(/thresholds\[0\]/);
    expect(() => escapeThresholds(roles, [0.5, 0.5])).toThrow(/thresholds/);
  });
});
