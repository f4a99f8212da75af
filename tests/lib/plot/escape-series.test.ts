import { describe, expect, it } from 'vitest';
import { barrierSeries, exitSwitchMarks, sequenceSeries, survivalFromHistogram, timingSeries } from '../../../src/lib/plot/escape-series';
import { histogram, survivalCurve, Z95 } from '../../../src/lib/noise/escape-statistics';
import { point } from './escape-fixture';

describe('barrierSeries(points, start)', () => {
  it('keeps only the edges out of the start state, one series per saddle, the lowest first', () => {
    const s = barrierSeries([point(0.2), point(0.1)], 'all-base');
    expect(s.map((x) => x.label)).toEqual(['a tipped', 'b tipped']);
    expect(s[0].points.map((q) => q.p)).toEqual([0.1, 0.2]);
    expect(s[1].points.map((q) => q.barrier)).toEqual([0.3, 0.3]);
  });
  it('from all-tipped finds nothing in rows that leave only all-base and a tipped', () => {
    expect(barrierSeries([point(0.1)], 'all-tipped')).toEqual([]);
  });
  it('skips null barriers and skipped values', () => {
    const pts = [point(0.1, { barriers: [{ from: 'all-base', saddle: 's', to: 'x', barrier: null, prefactor: null, logRate: null, crossings: [] }] }), point(0.2, { status: 'skipped' })];
    expect(barrierSeries(pts, 'all-base')).toEqual([]);
  });
  it('two saddles joining the same pair of states stay two series', () => {
    const b = { from: 'all-base', saddle: 'all-base -> a tipped', to: 'a tipped', prefactor: null, logRate: null, crossings: [] };
    const s = barrierSeries([point(0.1, { barriers: [{ ...b, barrier: 0.4 }, { ...b, barrier: 0.2 }] })], 'all-base');
    expect(s.map((x) => x.label).sort()).toEqual(['a tipped', 'a tipped (saddle 2)']);
  });
});

describe('exitSwitchMarks(study)', () => {
  it('keeps the switches of the start state and drops malformed entries', () => {
    const study = { start: 'all-base', exitSwitches: [
      { p: 0.3, state: 'all-base', saddles: ['x', 'y'], barrier: 0.2 },
      { p: 0.1, state: 'a tipped', saddles: ['x', 'y'], barrier: 0.1 },
      { p: 'no' },
    ] };
    expect(exitSwitchMarks(study)).toEqual([{ p: 0.3, barrier: 0.2, saddles: ['x', 'y'] }]);
    expect(exitSwitchMarks(null)).toEqual([]);
  });
});

describe('sequenceSeries(points)', () => {
  it('one series per order with its estimates and the prediction, the likeliest first', () => {
    const s = sequenceSeries([point(0.1), point(0.2)]);
    expect(s.map((x) => x.label)).toEqual(['a → b', 'b → a']);
    expect(s[0].estimates).toHaveLength(2);
    expect(s[0].estimates[0]).toMatchObject({ p: 0.1, probability: 0.75, low: 0.686, high: 0.804, count: 150, paths: 200 });
    expect(s[1].predicted.map((q) => q.probability)).toEqual([0.2, 0.2]);
  });
  it('an order never seen at a value gets 0 with the Wilson upper limit z²/(n + z²) of zero successes', () => {
    // Wilson (1927) score interval at x = 0: centre (z²/2n)/(1 + z²/n) plus half-width (z/(1 + z²/n))·(z/2n) is z²/(n + z²).
    const pts = [point(0.1), point(0.2, { sequences: [{ order: ['a', 'b'], count: 200, probability: 1, low: 0.981, high: 1 }] })];
    const ba = sequenceSeries(pts).find((x) => x.label === 'b → a')!;
    const unseen = ba.estimates.find((e) => e.p === 0.2)!;
    expect(unseen.probability).toBe(0);
    expect(unseen.low).toBeCloseTo(0, 12);
    expect(unseen.high).toBeCloseTo((Z95 ** 2) / (200 + Z95 ** 2), 12);
  });
  it('an order only the prediction names is a series with no seen counts', () => {
    const pts = [point(0.1, { prediction: { prefactor: 'x', sequences: [{ order: ['c', 'a'], probability: 0.01 }], meanFirstEscape: null, meanKthEscape: [], returnProbability: null } })];
    const ca = sequenceSeries(pts).find((x) => x.label === 'c → a')!;
    expect(ca.predicted).toEqual([{ p: 0.1, probability: 0.01 }]);
    expect(ca.estimates[0].count).toBe(0);
  });
});

describe('timingSeries(points)', () => {
  it('mean k-th escape per k with the predicted mean, then the time between consecutive escapes', () => {
    const s = timingSeries([point(0.1), point(0.2)]);
    expect(s.map((x) => x.label)).toEqual(['1st escape', '2nd escape', '1st to 2nd escape']);
    expect(s[0].estimates.map((e) => e.mean)).toEqual([10, 10]);
    expect(s[1].predicted.map((e) => e.mean)).toEqual([22, 22]);
    expect(s[2].kind).toBe('between');
    expect(s[2].estimates[0].mean).toBe(15);
  });
  it('leaves out means that cannot go on a log axis (null, zero)', () => {
    const s = timingSeries([point(0.1, { escapeTimes: [{ k: 1, count: 0, mean: null, meanHalfWidth: null, median: null, q05: null, q95: null, histogram: [] }], between: [], prediction: null })]);
    expect(s).toEqual([]);
  });
});

describe('survivalFromHistogram(histogram, paths, tMax)', () => {
  it('is 1 − (escapes before the edge) / paths at the bin edges', () => {
    // Derived: S(t_i) = 1 − Σ_{m<i} c_m / paths; bins [100, 50, 30, 20] of 200 paths over [0, 100].
    expect(survivalFromHistogram([100, 50, 30, 20], 200, 100)).toEqual([
      { t: 0, survival: 1 }, { t: 25, survival: 0.5 }, { t: 50, survival: 0.25 }, { t: 75, survival: 1 - 180 / 200 }, { t: 100, survival: 0 },
    ]);
  });
  it('agrees at the bin edges with the engine\'s survivalCurve of the raw times (independent computation)', () => {
    // Pseudo-random times in (0, 90) from a fixed linear congruential sequence, 10 paths capped (no time).
    let x = 12345;
    const times = Array.from({ length: 290 }, () => { x = (x * 1103515245 + 12345) % 2147483648; return (x / 2147483648) * 90; });
    const bins = 20, tMax = 100, total = 300;
    const curve = survivalFromHistogram(histogram(times, bins, tMax).counts, total, tMax);
    const ref = survivalCurve(times, total, tMax, bins + 1);
    for (let i = 0; i <= bins; i++) {
      expect(curve[i].t).toBeCloseTo(ref.t[i], 12);
      expect(curve[i].survival).toBeCloseTo(ref.survival[i], 12);
    }
    expect(curve[bins].survival).toBeCloseTo(10 / 300, 12);
  });
  it('capped paths keep the curve above zero at tMax', () => {
    expect(survivalFromHistogram([10, 10], 40, 2).at(-1)).toEqual({ t: 2, survival: 0.5 });
  });
  it('empty histogram, no paths or no cap give no curve', () => {
    expect(survivalFromHistogram([], 10, 1)).toEqual([]);
    expect(survivalFromHistogram([1], 0, 1)).toEqual([]);
    expect(survivalFromHistogram([1], 1, 0)).toEqual([]);
  });
});
