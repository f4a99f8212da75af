import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { scalarSystem } from './helpers.js';

describe('traceDiagram branch switching', () => {
  it('finds the branch x = r of x\' = r x - x^2 by switching when no start lies on it', () => {
    // Without multi-start guesses only the origin and the start x = 0 are tried at r = -1, so the
    // second equilibrium x = -1 is not a start and x = r can only come from switching at r = 0.
    const d = traceDiagram(scalarSystem((x, r) => r * x - x * x, (x, r) => r - 2 * x, (x) => x, { from: -1, to: 1 }, [[0]]), { multiStartCount: 0 });
    expect(d.branches).toHaveLength(2);
    expect(d.branches[1].origin).toEqual({ kind: 'switch', from: 'b1' });
    // x = r, derived: r x - x^2 = x (r - x).
    for (const q of d.branches[1].points) expect(q.x[0]).toBeCloseTo(q.p, 9);
    expect(d.bifurcations.map((b) => [b.type, b.branches])).toEqual([['transcritical', ['b1', 'b2']]]);
  });
});
