import { describe, expect, it } from 'vitest';
import { alignBandEdges, alignSpecialPoints } from '../../../src/lib/plot/compare';
import type { SpecialPoint } from '../../../src/lib/atlas/types';
import type { RegimeBand } from '../../../src/lib/regimes/types';

const sp = (type: SpecialPoint['type'], p: number): SpecialPoint => ({ id: `${type}${p}`, type, p, x: [0], branches: [], evidence: { reason: '' } });
const band = (from: number, to: number, regime: RegimeBand['regime']): RegimeBand => ({ from, to, regime, bounds: [], reason: '' });

describe('alignSpecialPoints', () => {
  it('matches points of one type by rank in p and reports differences to the first diagram', () => {
    const rows = alignSpecialPoints([
      { bifurcations: [sp('saddle-node', 0.5), sp('saddle-node', 0.1), sp('pitchfork', 0.3)] },
      { bifurcations: [sp('saddle-node', 0.15), sp('saddle-node', 0.45)] },
    ]);
    expect(rows.map((r) => r.label)).toEqual(['1st saddle-node', '2nd saddle-node', '1st pitchfork']);
    expect(rows[0].values).toEqual([0.1, 0.15]);
    expect(rows[0].deltas[1]).toBeCloseTo(0.05, 15);
    expect(rows[2].values).toEqual([0.3, null]);
    expect(rows[2].deltas).toEqual([0, null]);
  });
});

describe('alignBandEdges', () => {
  it('matches edges by the regimes they separate', () => {
    const rows = alignBandEdges([
      [band(0, 0.2, 'weak'), band(0.2, 0.5, 'intermediate'), band(0.5, 1, 'strong')],
      [band(0, 0.25, 'weak'), band(0.25, 1, 'strong')],
    ]);
    expect(rows.map((r) => [r.label, ...r.values])).toEqual([
      ['weak → intermediate', 0.2, null],
      ['weak → strong', null, 0.25],
      ['intermediate → strong', 0.5, null],
    ]);
  });
});
