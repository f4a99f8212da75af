import { describe, expect, it } from 'vitest';
import { alignBandEdges, alignSpecialPoints, assignMinCost, defaultProjectionKey } from '../../../src/lib/plot/compare';
import type { Branch, SpecialPoint } from '../../../src/lib/atlas/types';
import type { RegimeBand } from '../../../src/lib/regimes/types';

const sp = (type: SpecialPoint['type'], p: number, x: number[] = [0], branches: string[] = [], id = `${type}@${p}/${x.join(',')}`): SpecialPoint =>
  ({ id, type, p, x, branches, evidence: { reason: '' } });
const band = (from: number, to: number, regime: RegimeBand['regime']): RegimeBand => ({ from, to, regime, bounds: [], reason: '' });
/** A straight branch from (p0, x0) to (p1, x1) in `n` points, all stable. */
const line = (id: string, p0: number, x0: number[], p1: number, x1: number[], n = 21): Branch => ({
  id, origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'],
  points: Array.from({ length: n }, (_, k) => { const t = k / (n - 1); return { p: p0 + t * (p1 - p0), x: x0.map((v, i) => v + t * (x1[i] - v)), unstable: 0 }; }),
});

/** Mulberry32, a small seeded generator, so the property test is reproducible. */
function rng(seed: number) {
  return () => {
    seed |= 0; seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Least total cost over every injective assignment of the smaller side, by enumeration. */
function bruteForce(cost: number[][]): number {
  const rows = cost.length, cols = cost[0].length;
  const small = Math.min(rows, cols);
  let best = Infinity;
  const used = new Array<boolean>(Math.max(rows, cols)).fill(false);
  const walk = (i: number, acc: number) => {
    if (i === small) { best = Math.min(best, acc); return; }
    for (let j = 0; j < used.length; j++) {
      if (used[j]) continue;
      used[j] = true;
      walk(i + 1, acc + (rows <= cols ? cost[i][j] : cost[j][i]));
      used[j] = false;
    }
  };
  walk(0, 0);
  return best;
}

describe('assignMinCost(cost)', () => {
  it('finds the assignment that greedy choice misses', () => {
    // Greedy takes (0,0)=1 first and is then forced into (1,1)=10: 11. The optimum is 2 + 3 = 5.
    expect(assignMinCost([[1, 2], [3, 10]])).toEqual([1, 0]);
  });

  it('leaves the surplus rows of a tall matrix unassigned (−1) and uses every column once', () => {
    const out = assignMinCost([[5, 9], [1, 8], [7, 2]]);
    expect(out).toEqual([-1, 0, 1]);
  });

  it('matches the enumerated optimum on 200 random rectangular matrices (1–6 rows and columns)', () => {
    const r = rng(20261203);
    for (let trial = 0; trial < 200; trial++) {
      const rows = 1 + Math.floor(r() * 6), cols = 1 + Math.floor(r() * 6);
      const cost = Array.from({ length: rows }, () => Array.from({ length: cols }, () => Math.round(r() * 100) / 10));
      const out = assignMinCost(cost);
      const cols2 = out.filter((c) => c >= 0);
      expect(cols2.length).toBe(Math.min(rows, cols));
      expect(new Set(cols2).size).toBe(cols2.length);
      const total = out.reduce((s, c, i) => (c >= 0 ? s + cost[i][c] : s), 0);
      expect(total).toBeCloseTo(bruteForce(cost), 9);
    }
  });

  it('returns an empty or all-unassigned answer for empty input', () => {
    expect(assignMinCost([])).toEqual([]);
    expect(assignMinCost([[], []])).toEqual([-1, -1]);
  });
});

describe('alignSpecialPoints(diagrams)', () => {
  const frame = [line('frame', 0, [0], 1, [2])];

  it('matches by nearness, not by rank: a variant that lost the first fold pairs its only fold with the near one', () => {
    const rows = alignSpecialPoints([
      { variables: ['x'], branches: frame, bifurcations: [sp('saddle-node', 0.1, [0.2]), sp('saddle-node', 0.5, [1.5])] },
      { variables: ['x'], branches: frame, bifurcations: [sp('saddle-node', 0.46, [1.45])] },
    ]);
    expect(rows.map((r) => r.values)).toEqual([[0.1, null], [0.5, 0.46]]);
    expect(rows[1].deltas[1]).toBeCloseTo(-0.04, 12);
    expect(rows.map((r) => r.label)).toEqual(['saddle-node 1', 'saddle-node 2']);
  });

  it('keeps two points at one parameter apart by their state, whatever their order in the list', () => {
    const vars = ['up', 'down'];
    const br = [line('f', 0, [0, 0], 1, [2, 2])];
    const rows = alignSpecialPoints([
      { variables: vars, branches: br, bifurcations: [sp('saddle-node', 0.3, [0.2, 1.0], [], 'a-low'), sp('saddle-node', 0.3, [1.0, 0.2], [], 'a-high')] },
      { variables: vars, branches: br, bifurcations: [sp('saddle-node', 0.31, [1.05, 0.2], [], 'b-high'), sp('saddle-node', 0.31, [0.2, 1.05], [], 'b-low')] },
    ]);
    const pairs = rows.map((r) => r.ids!.join('+')).sort();
    expect(pairs).toEqual(['a-high+b-high', 'a-low+b-low']);
  });

  it('prefers the point on the corresponding branch over a nearer one on another branch', () => {
    // Two parallel branches, x = 0 ("lower") and x = 1 ("upper"); folds drawn in between, each tagged with its branch.
    // By nearness alone A's 0.45 (on lower) would pair with B's 0.48 (on upper); by branch it pairs with B's 0.52 (on lower).
    const a = { variables: ['x'], branches: [line('lo', 0, [0], 1, [0]), line('hi', 0, [1], 1, [1])],
      bifurcations: [sp('saddle-node', 0.5, [0.45], ['lo'], 'a-lo'), sp('saddle-node', 0.5, [0.55], ['hi'], 'a-hi')] };
    const b = { variables: ['x'], branches: [line('B1', 0, [1.02], 1, [1.02]), line('B0', 0, [0.02], 1, [0.02])],
      bifurcations: [sp('saddle-node', 0.5, [0.52], ['B0'], 'b-lo'), sp('saddle-node', 0.5, [0.48], ['B1'], 'b-hi')] };
    const rows = alignSpecialPoints([a, b]);
    expect(rows.map((r) => r.ids!.join('+')).sort()).toEqual(['a-hi+b-hi', 'a-lo+b-lo']);
    // Without branches to go by, nearness decides (the crossing pairs).
    const bare = alignSpecialPoints([{ ...a, branches: [] }, { ...b, branches: [] }]);
    expect(bare.map((r) => r.ids!.join('+')).sort()).toEqual(['a-hi+b-lo', 'a-lo+b-hi']);
  });

  it('never pairs points farther apart than maxDistance, and never points of different types', () => {
    const rows = alignSpecialPoints([
      { variables: ['x'], branches: frame, bifurcations: [sp('saddle-node', 0.05, [0.1]), sp('pitchfork', 0.3, [1])] },
      { variables: ['x'], branches: frame, bifurcations: [sp('saddle-node', 0.95, [1.9]), sp('transcritical', 0.3, [1])] },
    ]);
    expect(rows.map((r) => [r.kind, ...r.values])).toEqual([
      ['saddle-node', 0.05, null], ['saddle-node', null, 0.95], ['pitchfork', 0.3, null], ['transcritical', null, 0.3],
    ]);
    expect(alignSpecialPoints([
      { variables: ['x'], branches: frame, bifurcations: [sp('saddle-node', 0.05, [0.1])] },
      { variables: ['x'], branches: frame, bifurcations: [sp('saddle-node', 0.95, [1.9])] },
    ], { maxDistance: 2 }).map((r) => r.values)).toEqual([[0.05, 0.95]]);
  });

  it('joins a point the first diagram lacks across the later diagrams into one row', () => {
    const rows = alignSpecialPoints([
      { variables: ['x'], branches: frame, bifurcations: [sp('hopf', 0.2, [0.4])] },
      { variables: ['x'], branches: frame, bifurcations: [sp('hopf', 0.21, [0.41]), sp('hopf', 0.8, [1.6])] },
      { variables: ['x'], branches: frame, bifurcations: [sp('hopf', 0.79, [1.58]), sp('hopf', 0.22, [0.42])] },
    ]);
    expect(rows.map((r) => r.values)).toEqual([[0.2, 0.21, 0.22], [null, 0.8, 0.79]]);
    expect(rows[1].deltas).toEqual([null, null, null]);
    expect(rows[0].distances![0]).toBe(0);
    expect(rows[0].distances![2]).toBeGreaterThan(rows[0].distances![1]!);
  });

  it('scales parameter and state by their ranges, so units do not decide the match', () => {
    // The state spans 0..2000: a state gap of 30 is small, a parameter gap of 0.3 (of 1) is not.
    const wide = [line('w', 0, [0], 1, [2000])];
    const rows = alignSpecialPoints([
      { variables: ['x'], branches: wide, bifurcations: [sp('saddle-node', 0.5, [1000], [], 'a')] },
      { variables: ['x'], branches: wide, bifurcations: [sp('saddle-node', 0.8, [1000], [], 'far-p'), sp('saddle-node', 0.51, [1030], [], 'near')] },
    ]);
    expect(rows.find((r) => r.ids![0] === 'a')!.ids![1]).toBe('near');
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

describe('defaultProjectionKey(variables)', () => {
  it('opens on the first node for one or two nodes and on the mean state for three or more, as the run page does', () => {
    expect(defaultProjectionKey(['P'])).toBe('node:0');
    expect(defaultProjectionKey(['a', 'b'])).toBe('node:0');
    expect(defaultProjectionKey(['a', 'b', 'c'])).toBe('mean');
  });
});
