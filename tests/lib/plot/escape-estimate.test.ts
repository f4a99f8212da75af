import { describe, expect, it } from 'vitest';
import { durationWords, studyCost } from '../../../src/lib/plot/escape-estimate';
import { checkRequestBudget } from '../../../src/lib/server/escapes/settings';

describe('durationWords(seconds)', () => {
  it.each([
    [0.4, 'under a second'], [7.4, 'about 7 s'], [44, 'about 40 s'], [240, 'about 4 min'], [5400, 'about 1.5 h'],
    [9000, 'about 2.5 h'], [50 * 3600, 'about 2 days'], [Number.NaN, 'an unknown time'],
  ])('durationWords(%s) is %s', (s, words) => { expect(durationWords(s)).toBe(words); });
});

describe('studyCost(input)', () => {
  const doc = { format: 'brinkmap/network-1', nodes: [{}, {}, {}] };
  it('counts (paths + 2·min(paths, 500))·⌈tMax/dt⌉·n node-steps per value, times the values', () => {
    // 1000 paths + 1000 step-check paths, 100 / 0.01 = 10 000 steps, 3 nodes: 6e7 per value (derived).
    const c = studyCost({ paths: 1000, n: 3, valueCount: 4, dt: 0.01, tMax: 100, threads: 2, cores: 2, rate: 1e6 });
    expect(c.nodeStepsPerValue).toBe(6e7);
    expect(c.nodeStepsTotal).toBe(2.4e8);
    expect(c.seconds).toBe(2.4e8 / 2e6);
    expect(c.words).toContain('about 2 min');
  });
  it('uses at most the server\'s cores', () => {
    expect(studyCost({ paths: 10, n: 1, valueCount: 1, dt: 1, tMax: 1, threads: 8, cores: 2 }).threadsUsed).toBe(2);
  });
  it('says over budget exactly where the service refuses the request (checkRequestBudget, the same rule on the server)', () => {
    for (const paths of [100_000, 120_000, 133_333, 133_334, 200_000]) {
      const s = { noise: 0.4, start: 'all-base' as const, values: [0.1], paths, dt: 0.01, tMax: 100, seed: 1, atlas: {}, threads: 1 };
      let refused = false;
      try { checkRequestBudget(doc, s); } catch { refused = true; }
      expect(studyCost({ paths, n: 3, valueCount: 1, dt: 0.01, tMax: 100, threads: 1, cores: 2 }).overBudget, `paths ${paths}`).toBe(refused);
    }
  });
  it('without dt and tMax gives no time and says why', () => {
    const c = studyCost({ paths: 1000, n: 3, valueCount: 5, threads: 1, cores: 2 });
    expect(c.seconds).toBeNull();
    expect(c.overBudget).toBe(false);
    expect(c.words).toContain('Give the step and the time cap');
  });
});
