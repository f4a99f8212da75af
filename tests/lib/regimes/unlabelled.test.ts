import { describe, expect, it } from 'vitest';
import { bandTableRows, unlabelledInRun, unlabelledStretches, type RegimeBand } from '../../../src/lib/regimes/index';

// Hand-made bands in the shape labelRegimes returns (bounds texts as in label-regimes.ts).
const band = (from: number, to: number, bounds: [string, string], start?: 'all-base' | 'all-tipped'): RegimeBand =>
  ({ from, to, regime: 'weak', bounds, reason: 'r', ...(start ? { start } : {}) }) as RegimeBand;

describe('unlabelledStretches', () => {
  it('finds a stretch after the last band and reads its reason off the band’s bound', () => {
    const bands = [band(0, 4, ['sweep-bound', 'saddle-node']), band(4, 10, ['saddle-node', 'label undefined: no label above: no way out of all-base found'])];
    expect(unlabelledStretches(bands, 0, 50)).toEqual([{ from: 10, to: 50, start: 'all-base', reason: 'no way out of all-base found' }]);
  });

  it('finds a stretch between bands and before the first, per start state, and none where bands touch', () => {
    const bands = [
      band(2, 3, ['label undefined: no label below: no stable all-base state', 'saddle-node']),
      band(3, 5, ['saddle-node', 'sweep-bound']),
      band(0, 1, ['sweep-bound', 'hopf'], 'all-tipped'),
      band(1.5, 5, ['pitchfork', 'sweep-bound'], 'all-tipped'),
    ];
    expect(unlabelledStretches(bands, 0, 5)).toEqual([
      { from: 0, to: 2, start: 'all-base', reason: 'no stable all-base state' },
      { from: 1, to: 1.5, start: 'all-tipped', reason: 'no label here (see the run’s diagnostics)' },
    ]);
  });

  it('calls the whole range unlabelled when there is no band at all', () => {
    expect(unlabelledStretches([], -1, 1)).toEqual([{ from: -1, to: 1, start: 'all-base', reason: 'no label here (see the run’s diagnostics)' }]);
  });

  it('unlabelledInRun uses the traced range from the diagram settings, else only gaps between bands, and nothing without bands', () => {
    const bands = [band(1, 2, ['sweep-bound', 'saddle-node']), band(3, 4, ['saddle-node', 'sweep-bound'])];
    expect(unlabelledInRun(bands, { from: 0, to: 5 }).map((g) => [g.from, g.to])).toEqual([[0, 1], [2, 3], [4, 5]]);
    expect(unlabelledInRun(bands, { to: 5, from: 0 })).toHaveLength(3);
    expect(unlabelledInRun(bands, {}).map((g) => [g.from, g.to])).toEqual([[2, 3]]);
    // A sweep traced downwards (from > to) is the same range.
    expect(unlabelledInRun(bands, { from: 5, to: 0 })).toHaveLength(3);
    expect(unlabelledInRun([], { from: 0, to: 5 })).toEqual([]);
  });

  it('bandTableRows puts bands and unlabelled stretches in one list by from, a stretch with regime null and no bounds', () => {
    const bands = [band(3, 4, ['saddle-node', 'sweep-bound']), band(1, 2, ['sweep-bound', 'saddle-node'])];
    const rows = bandTableRows(bands, unlabelledInRun(bands, { from: 0, to: 4 }));
    expect(rows.map((r) => [r.from, r.regime])).toEqual([[0, null], [1, 'weak'], [2, null], [3, 'weak']]);
    expect(rows[0].bounds).toEqual([]);
  });
});
