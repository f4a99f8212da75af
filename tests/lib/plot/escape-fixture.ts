/** Invented escape-study rows (not computed; shapes as /api/runs/:id/escapes serves them) for the plot-helper tests. */
import type { EscapePoint } from '../../../src/lib/server/escapes/rows';

export function point(p: number, over: Partial<EscapePoint> = {}): EscapePoint {
  return {
    index: 0, p, status: 'done', reason: null, paths: 200, dt: 0.01, tMax: 100, seed: 3, nodeSteps: 1e6, capped: 0, returns: 0, pathsWithReturns: 0,
    sequences: [
      { order: ['a', 'b'], count: 150, probability: 0.75, low: 0.686, high: 0.804 },
      { order: ['b', 'a'], count: 50, probability: 0.25, low: 0.196, high: 0.314 },
    ],
    escapeTimes: [
      { k: 1, count: 200, mean: 10, meanHalfWidth: 1.4, median: 7, q05: 0.5, q95: 30, histogram: [100, 50, 30, 20] },
      { k: 2, count: 190, mean: 25, meanHalfWidth: 3, median: 20, q05: 2, q95: 70, histogram: [20, 60, 60, 50] },
    ],
    between: [{ j: 1, k: 2, count: 190, mean: 15 }],
    prediction: { prefactor: 'eyring-kramers', sequences: [{ order: ['a', 'b'], probability: 0.8 }, { order: ['b', 'a'], probability: 0.2 }], meanFirstEscape: 9, meanKthEscape: [9, 22], returnProbability: 0 },
    barriers: [
      { from: 'all-base', saddle: 'all-base -> a tipped', to: 'a tipped', barrier: 0.2, prefactor: 0.1, logRate: -3, crossings: [['a']] },
      { from: 'all-base', saddle: 'all-base -> b tipped', to: 'b tipped', barrier: 0.3, prefactor: 0.1, logRate: -4, crossings: [['b']] },
      { from: 'a tipped', saddle: 'a tipped -> all-tipped', to: 'all-tipped', barrier: 0.05, prefactor: 0.1, logRate: -1, crossings: [['b']] },
    ],
    stepCheck: null, estimate: null, diagnostics: [], computeMs: 10,
    ...over,
  };
}
