import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { labelRegimes } from '../../../src/lib/regimes/index';
import { bandExitRows, bandExitSummary } from '../../../src/lib/regimes/band-exits';
import { cubicNetwork, symmetricPairDiagram } from './fixtures';

describe('band exit tables on the symmetric cubic pair (analytic branches, fixtures.ts)', () => {
  const R = 0.1;
  const system = compileModelJson(cubicNetwork({ r: R, nodes: ['left', 'right'], links: [{ from: 'left', to: 'right', twoWay: true }] }));
  const { regimes } = labelRegimes(system, symmetricPairDiagram(R), { escapeGraphs: false });
  const names = ['left', 'right'];

  it('each band carries the exits its reason rests on, taken inside the band', () => {
    expect(regimes.map((b) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    for (const b of regimes) {
      expect(b.exitsAt).toBeGreaterThanOrEqual(b.from);
      expect(b.exitsAt).toBeLessThanOrEqual(b.to);
    }
  });

  it('weak: two contained exits, one per node, each ending with only that node tipped', () => {
    // Below the saddle-node each lopsided saddle (one node near its middle root) leads to the state
    // with that node tipped and the other at base (the partially tipped states exist there).
    const weak = regimes[0];
    expect(bandExitSummary(weak)).toBe('2 ways out of all-base, both contained');
    expect(bandExitRows(weak, names)).toEqual([
      { exit: 'over left', engaged: 'left', then: '—', leadsTo: 'left tipped, right base', kind: 'contained', kindWords: 'contained' },
      { exit: 'over right', engaged: 'right', then: '—', leadsTo: 'right tipped, left base', kind: 'contained', kindWords: 'contained' },
    ]);
  });

  it('intermediate: the same two exits now commit the other node, to all tipped', () => {
    // Between the saddle-node (the partially tipped states are gone) and the pitchfork, each lopsided
    // saddle's far branch runs on to all-tipped: the first tip commits the other node.
    const mid = regimes[1];
    expect(bandExitSummary(mid)).toBe('2 ways out of all-base, both cascading');
    expect(bandExitRows(mid, names).map((r) => [r.exit, r.then, r.leadsTo])).toEqual([
      ['over left', 'right follows', 'all tipped'],
      ['over right', 'left follows', 'all tipped'],
    ]);
  });

  it('strong: one exit, the symmetric saddle, both nodes together', () => {
    // Above the pitchfork the two lopsided saddles have merged into (m, m): one exit, both engaged.
    const strong = regimes[2];
    expect(bandExitSummary(strong)).toBe('one way out of all-base: all nodes together');
    expect(bandExitRows(strong, names)).toEqual([
      { exit: 'over left and right', engaged: 'left and right', then: '—', leadsTo: 'all tipped', kind: 'synchronous', kindWords: 'together' },
    ]);
  });

  it('results stored without exits give no summary and no rows (the panel shows the reason alone)', () => {
    expect(bandExitSummary({ reason: 'x' } as never)).toBeNull();
    expect(bandExitRows({}, names)).toEqual([]);
  });
});
