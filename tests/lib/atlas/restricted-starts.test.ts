import { beforeAll, describe, expect, it } from 'vitest';
import { findStartingEquilibria, traceDiagram, defaultTraceSettings, type Diagram } from '../../../src/lib/atlas/index.js';
import { binomial, chooseMaxOffBase, patternSpace, restrictedCounts, restrictedPatterns } from '../../../src/lib/atlas/start-selection.js';
import { startSelectionSettingsSchema } from '../../../src/lib/atlas/trace-settings.js';
import { compileModelJson } from '../../../src/lib/model/index.js';
import { labelRegimes, type RegimeResult } from '../../../src/lib/regimes/index.js';

/**
 * Invented cubic-element networks, the builders of scripts/bench.ts (issue 12):
 * x_i' = r_i + x_i - x_i^3, r_i spread over [0.05, 0.15], diffusive links beta (x_source - x_target).
 * Every r_i < 2 / (3 sqrt 3) = 0.385 (the cusp of r + x - x^3), so every element has three roots at
 * beta = 0: base < threshold < tipped.
 */
function cubicDoc(nodes: number, links: { from: number; to: number; twoWay?: boolean }[], to = 1) {
  return {
    format: 'brinkmap/network-1',
    name: `${nodes} cubic elements (invented)`,
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: Array.from({ length: nodes }, (_, i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + (0.1 * i) / (nodes - 1) } })),
    links: links.map((l) => ({ from: `n${l.from + 1}`, to: `n${l.to + 1}`, weight: 1, ...(l.twoWay ? { twoWay: true } : {}) })),
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to },
  };
}
const chain = (k: number, twoWay: boolean) => Array.from({ length: k - 1 }, (_, i) => ({ from: i, to: i + 1, twoWay }));
/** A sparse ring with chords: node i links to i + 1 and i + 5 (mod k), one way: mean degree 4 counting both ends. */
const ringWithChords = (k: number) => Array.from({ length: k }, (_, i) => [{ from: i, to: (i + 1) % k }, { from: i, to: (i + 5) % k }]).flat();

describe('restrictedCounts(rootCounts, k)', () => {
  it('counts the patterns with at most k nodes off base and the neighbours of all-tipped (derived by hand)', () => {
    // Three roots per node: a node off base is tipped or at its threshold (2 choices), so j nodes off
    // base give C(n, j) 2^j patterns, of which C(n, j) are stable (all tipped).
    // n = 6, k = 2: 1 + 6 * 2 + 15 * 4 = 73 patterns (1 + 6 + 15 = 22 stable); all-tipped and its 6
    // neighbouring saddles (one threshold node, others tipped) have 6 nodes off base: 7 more; 80 in all.
    expect(restrictedCounts([3, 3, 3, 3, 3, 3], 2)).toEqual({ withinK: 73, stable: 22, nearAllTipped: 7, total: 80 });
    // n = 6, k = 3: 73 + 20 * 8 = 233, + 7 = 240.
    expect(restrictedCounts([3, 3, 3, 3, 3, 3], 3).total).toBe(240);
    // n = 20, k = 2: 1 + 40 + 190 * 4 = 801 (211 stable), + 21.
    expect(restrictedCounts(new Array(20).fill(3), 2)).toEqual({ withinK: 801, stable: 211, nearAllTipped: 21, total: 822 });
    // n = 64, k = 2: the stable ones are 1 + 64 + 2016 = 2081, the figure of issue 12's example.
    expect(restrictedCounts(new Array(64).fill(3), 2).stable).toBe(2081);
    // k = n: every pattern (3^n), all-tipped's neighbours inside.
    expect(restrictedCounts([3, 3, 3, 3], 4)).toEqual({ withinK: 81, stable: 16, nearAllTipped: 0, total: 81 });
    // Mixed root counts: a one-root node is never off base; a five-root node has 4 off-base choices.
    // e_1(2, 0, 4) = 6, e_2 = 2 * 4 = 8: k = 2 gives 1 + 6 + 8 = 15 patterns; all-tipped and its
    // neighbours (node 1 at its threshold, or node 3 at one of its 3 middle roots) have 2 nodes off base.
    expect(restrictedCounts([3, 1, 5], 2)).toEqual({ withinK: 15, stable: 4, nearAllTipped: 0, total: 15 });
  });

  it('agrees with the pattern list and with a brute-force filter over all 3^n patterns (independent enumeration)', () => {
    for (const [n, k] of [[5, 0], [5, 1], [5, 2], [6, 2], [6, 3]] as const) {
      const counts = new Array<number>(n).fill(3);
      const list = restrictedPatterns(counts, k);
      expect(list.length, `n=${n} k=${k}`).toBe(restrictedCounts(counts, k).total);
      expect(list[0], 'all-base first').toEqual(new Array(n).fill(0));
      expect(list[1], 'all-tipped second').toEqual(new Array(n).fill(2));
      // The rules of start-selection.ts, applied to every pattern (0 base, 1 threshold, 2 tipped).
      const rule = (pat: number[]) => {
        const off = pat.filter((v) => v !== 0).length;
        const tipped = pat.filter((v) => v === 2).length;
        return off <= k || tipped === n || (tipped === n - 1 && pat.includes(1));
      };
      const expected = new Set<string>();
      for (let c = 0; c < 3 ** n; c++) {
        const pat = Array.from({ length: n }, (_, i) => Math.floor(c / 3 ** i) % 3);
        if (rule(pat)) expected.add(pat.join(','));
      }
      expect(new Set(list.map((p) => p.join(','))), `n=${n} k=${k}`).toEqual(expected);
    }
  });

  it('chooseMaxOffBase(rootCounts, budget, reserve) takes the largest k that leaves the reserve free', () => {
    // n = 20: k = 2 needs 822 + 20 <= 1000 (the default budget); k = 3 needs 801 + 1140 * 8 + 21 = 9942.
    expect(chooseMaxOffBase(new Array(20).fill(3), 1000, 20)).toBe(2);
    expect(chooseMaxOffBase(new Array(20).fill(3), 841, 20)).toBe(1);
    expect(chooseMaxOffBase(new Array(20).fill(3), 9942 + 20, 20)).toBe(3);
    // n = 64: k = 1 needs 1 + 128 + 65 = 194 (+ 64 reserve); k = 2 needs 129 + 2016 * 4 + 65 = 8258.
    expect(restrictedCounts(new Array(64).fill(3), 1).total).toBe(194);
    expect(chooseMaxOffBase(new Array(64).fill(3), 1000, 64)).toBe(1);
    // k = 0: all-base, all-tipped and all-tipped's n neighbours: 2 + n.
    expect(restrictedCounts(new Array(64).fill(3), 0).total).toBe(66);
    // Too small for k = 0 plus the reserve: still k = 0 (capped at the budget by restrictedPatterns).
    expect(chooseMaxOffBase(new Array(64).fill(3), 10, 64)).toBe(0);
    expect(restrictedPatterns(new Array(64).fill(3), 0, 10)).toHaveLength(10);
    expect(binomial(64, 2)).toBe(2016);
    expect(patternSpace([3, 3, 1])).toBe('3^2 × 1^1');
  });
});

/** Points of a diagram at p = from. */
const atFrom = (d: Diagram, from: number) => d.branches.flatMap((b) => b.points.filter((q) => q.p === from).map((q) => ({ branch: b.id, x: q.x })));
const near = (a: readonly number[], b: readonly number[], tol: number) => a.every((v, i) => Math.abs(v - b[i]) <= tol * (1 + Math.abs(b[i])));

/** Max-norm distance from x to the segment [a, b] (closest point in the Euclidean sense, then measured in the max norm). */
function segmentDistance(x: readonly number[], pa: number, a: readonly number[], pb: number, b: readonly number[], p: number): number {
  let num = (p - pa) * (pb - pa);
  let den = (pb - pa) ** 2;
  for (let i = 0; i < x.length; i++) { num += (x[i] - a[i]) * (b[i] - a[i]); den += (b[i] - a[i]) ** 2; }
  const t = den > 0 ? Math.min(1, Math.max(0, num / den)) : 0;
  let d = Math.abs(p - (pa + t * (pb - pa)));
  for (let i = 0; i < x.length; i++) d = Math.max(d, Math.abs(x[i] - (a[i] + t * (b[i] - a[i]))));
  return d;
}

/**
 * Largest max-norm distance from every 10th point of `branches` to the nearest segment of `other`'s
 * polylines (segments bucketed by cells of maxParameterStep = 1/600 in beta: no step is longer in p).
 */
function farthest(branches: readonly Diagram['branches'][number][], other: Diagram): { worst: number; checked: number } {
  const cell = 1 / 600;
  const segs = new Map<number, { pa: number; a: number[]; pb: number; b: number[] }[]>();
  for (const b of other.branches) {
    for (let j = 0; j + 1 < b.points.length; j++) {
      const u = b.points[j];
      const w = b.points[j + 1];
      for (let c = Math.floor(Math.min(u.p, w.p) / cell); c <= Math.floor(Math.max(u.p, w.p) / cell); c++) {
        let l = segs.get(c);
        if (!l) segs.set(c, (l = []));
        l.push({ pa: u.p, a: u.x, pb: w.p, b: w.x });
      }
    }
  }
  let worst = 0;
  let checked = 0;
  for (const b of branches) {
    for (let j = 0; j < b.points.length; j += 10) {
      const q = b.points[j];
      let best = Infinity;
      const c0 = Math.floor(q.p / cell);
      for (let c = c0 - 1; c <= c0 + 1; c++) for (const s of segs.get(c) ?? []) best = Math.min(best, segmentDistance(q.x, s.pa, s.a, s.pb, s.b, q.p));
      worst = Math.max(worst, best);
      checked++;
    }
  }
  return { worst, checked };
}

describe('traceDiagram with startSelection restricted', () => {
  // The heavy traces run in hooks of their own: one synchronous block of tens of seconds on a loaded
  // machine starves the test runner's messages (vitest "Timeout calling onTaskUpdate").
  const chainSystem = compileModelJson(cubicDoc(6, chain(6, false)));
  let full: Diagram;
  let restricted: Diagram;
  beforeAll(() => { full = traceDiagram(chainSystem); }, 300_000);
  // k = 2 for n = 6: 80 patterns (derived above); the budget leaves 6 starts for growth.
  beforeAll(() => { restricted = traceDiagram(chainSystem, { startSelection: 'restricted', startBudget: 86 }); }, 300_000);

  it('on a 6-node one-way chain finds every branch through the allowed patterns that the full trace finds', () => {
    const system = chainSystem;
    expect(full.coverage).toBeUndefined();
    expect(full.diagnostics.map((d) => d.code)).not.toContain('branch-cap');
    expect(restricted.coverage).toMatchObject({ mode: 'restricted', maxOffBase: 2, of: '3^6', ofCount: 729, patterns: { withinK: 73, stable: 22, nearAllTipped: 7 } });
    expect(restricted.coverage!.text).toMatch(/^branches through patterns with at most 2 nodes off base .*: 80 of 3\^6 patterns/);

    // The allowed states at beta = 0 are the selected starts (Newton-refined element roots).
    const allowed = findStartingEquilibria(system, 0, { ...defaultTraceSettings, from: 0, to: 1, startSelection: 'restricted', startBudget: 86 }).points.map((x) => Array.from(x));
    expect(allowed).toHaveLength(80);
    const fullAt0 = atFrom(full, 0);
    const restrictedAt0 = atFrom(restricted, 0);
    const through = new Set(fullAt0.filter((q) => allowed.some((a) => near(q.x, a, 1e-9))).map((q) => q.branch));
    // Every allowed start is a starting equilibrium of the full trace too, so each lies on a full branch.
    expect(through.size).toBeGreaterThan(0);
    for (const a of allowed) expect(fullAt0.some((q) => near(q.x, a, 1e-9))).toBe(true);

    const fullBranches = full.branches.filter((b) => through.has(b.id));
    // (1) By pattern: every state at beta = 0 on a full branch through an allowed pattern (the other
    //     end of a branch that folds back to beta = 0) is at beta = 0 on the restricted diagram too.
    for (const b of fullBranches) {
      for (const q of b.points.filter((q) => q.p === 0)) {
        expect(restrictedAt0.some((r) => near(r.x, q.x, 1e-8)), `branch ${b.id} at [${q.x.map((v) => v.toFixed(4))}]`).toBe(true);
      }
    }
    // (2) As point sets: every 10th point of those full branches lies within 1e-3 of a restricted
    //     segment. Bound (derived): both polylines are chords of the same solution curve; a chord of
    //     arclength h whose tangents turn by theta deviates from the arc by at most about h theta / 8
    //     (sagitta of a circular arc), and h <= maxStep (0.02 of the arclength scale, here at most
    //     0.02 * 2.2) with theta <= maxTurn = 0.15 gives 8.3e-4.
    const { worst, checked } = farthest(fullBranches, restricted);
    expect(checked).toBeGreaterThan(1000);
    expect(worst).toBeLessThan(1e-3);
    // The other way round, by the same bound: everything the restricted trace found, the branches
    // started from states that growth added included, is in the full trace.
    expect(restricted.coverage!.grown.states, 'growth added a state (observed: one at beta = 0.1875, which no pattern within k = 2 leads to)').toBeGreaterThan(0);
    const back = farthest(restricted.branches, full);
    expect(back.worst).toBeLessThan(1e-3);
    // (3) Special points: every one on those branches is located again, to 1e-9 in beta (both traces
    //     locate to a bracket of 1e-11, locateParameterTolerance).
    const onThose = full.bifurcations.filter((s) => s.branches.some((id) => through.has(id)));
    expect(onThose.length).toBeGreaterThan(0);
    for (const s of onThose) {
      expect(restricted.bifurcations.some((r) => r.type === s.type && Math.abs(r.p - s.p) <= 1e-9 && near(r.x, s.x, 1e-6)), `${s.type} at ${s.p}`).toBe(true);
    }
    // Fewer branches than the full trace: the restriction did leave patterns out.
    expect(restricted.branches.length).toBeLessThan(full.branches.length);
  }, 180_000);

  // Reference: the full trace of all 729 patterns and its bands, by the same engine and labeller.
  // docs/numerics.md §12: the intermediate and strong exits run through saddles whose branches start
  // at patterns with two or three threshold nodes, so k = 3 nodes off base is what this ring needs.
  const ringSystem = compileModelJson(cubicDoc(6, Array.from({ length: 6 }, (_, i) => [{ from: i, to: (i + 1) % 6 }, { from: i, to: (i + 2) % 6 }]).flat()));
  let ringFullDiagram: Diagram;
  let ringFull: RegimeResult;
  let ringRestrictedDiagram: Diagram;
  let ringRestricted: RegimeResult;
  beforeAll(() => { ringFullDiagram = traceDiagram(ringSystem); }, 300_000);
  beforeAll(() => { ringFull = labelRegimes(ringSystem, ringFullDiagram); }, 300_000);
  // k = 3: 233 + 7 = 240 patterns (derived above), 6 left for growth.
  beforeAll(() => { ringRestrictedDiagram = traceDiagram(ringSystem, { startSelection: 'restricted', startBudget: 246 }); }, 300_000);
  beforeAll(() => { ringRestricted = labelRegimes(ringSystem, ringRestrictedDiagram); }, 300_000);

  it('on a 6-node ring with chords, with k = 3, gives the bands of the full trace', () => {
    const full = ringFull;
    const d = ringRestrictedDiagram;
    expect(d.coverage).toMatchObject({ maxOffBase: 3, starts: 240 });
    const restricted = ringRestricted;
    expect(full.regimes.map((b) => b.regime)).toContain('strong');
    expect(restricted.regimes.map((b) => b.regime)).toEqual(full.regimes.map((b) => b.regime));
    restricted.regimes.forEach((b, i) => {
      // Edges are special points (located to 1e-11 in both traces) or crossovers bisected to
      // locateTolerance = 1e-9 (regimes options): equal to 1e-8.
      expect(Math.abs(b.from - full.regimes[i].from), `band ${i} from`).toBeLessThan(1e-8);
      expect(Math.abs(b.to - full.regimes[i].to), `band ${i} to`).toBeLessThan(1e-8);
    });
  }, 300_000);

  let ringK2Diagram: Diagram;
  let ringK2: RegimeResult;
  beforeAll(() => { ringK2Diagram = traceDiagram(ringSystem, { startSelection: 'restricted', startBudget: 86 }); }, 300_000);
  beforeAll(() => { ringK2 = labelRegimes(ringSystem, ringK2Diagram); }, 300_000);

  it('on the 6-node ring with k = 2, reaches the strong band through the near-uniform seeds at the sweep end', () => {
    // The mean element 0.1 + c - c^3 (the r_i average 0.1) has three roots (0.1 < 2 / (3 sqrt 3)), so
    // three near-uniform states at beta = 1; the middle one is the synchronous saddle of the strong band.
    expect(ringK2Diagram.coverage).toMatchObject({ maxOffBase: 2, starts: 80, farEnd: 3 });
    expect(ringK2Diagram.coverage!.text).toContain('3 near-uniform states at beta = 1');
    const strong = ringK2.regimes.filter((b) => b.regime === 'strong');
    expect(strong.length).toBeGreaterThan(0);
    expect(strong.at(-1)!.to).toBe(1);
    // No strong label the full trace does not give: at the middle of each restricted strong band the
    // full trace's band is strong too.
    for (const b of strong) {
      const mid = 0.5 * (b.from + b.to);
      expect(ringFull.regimes.find((f) => f.from <= mid && mid <= f.to)?.regime, `at beta = ${mid}`).toBe('strong');
    }
  }, 300_000);

  it('on a 20-node sparse network starts from the restricted set only and states its coverage', () => {
    const system = compileModelJson(cubicDoc(20, ringWithChords(20), 0.5));
    // Budget 90 with 20 reserved: k = 1 (62 patterns: all-base, 20 tipped and 20 at the threshold, all-tipped and its 20 neighbours).
    const settings = { startBudget: 90, maxBranches: 1000 };
    const starts = findStartingEquilibria(system, 0, { ...defaultTraceSettings, from: 0, to: 0.5, ...settings });
    expect(starts.points).toHaveLength(62);
    expect(starts.restriction).toMatchObject({ maxOffBase: 1, of: '3^20', ofCount: 3 ** 20, patterns: 62 });
    const d = traceDiagram(system, settings);
    expect(d.coverage).toMatchObject({ mode: 'restricted', maxOffBase: 1, starts: 62, of: '3^20', budget: 90, untraced: 0 });
    expect(d.coverage!.starts + d.coverage!.farEnd + d.coverage!.grown.states).toBeLessThanOrEqual(90);
    expect(d.coverage!.text).toContain('at most 1 node off base');
    expect(d.coverage!.text).toContain('62 of 3^20 patterns');
    expect(d.diagnostics.find((g) => g.code === 'start-coverage')?.message).toBe(d.coverage!.text);
    // Every selected start lies on a traced branch.
    const at0 = atFrom(d, 0);
    for (const x of starts.points) expect(at0.some((q) => near(q.x, Array.from(x), 1e-9))).toBe(true);
  }, 180_000);

  it('runs a 64-variable network within the cap from a small restricted set', () => {
    const system = compileModelJson(cubicDoc(64, chain(64, true), 0.1));
    // Budget 4: even k = 0 (all-base, all-tipped and all-tipped's 64 neighbours, 66) does not fit,
    // so its list is cut to the first 4 (all-base, all-tipped, 2 neighbours); each 64-variable branch
    // costs about a second here, hence the small budget and the short sweep.
    const d = traceDiagram(system, { startBudget: 4, maxBranches: 1000 });
    expect(d.coverage).toMatchObject({ mode: 'restricted', maxOffBase: 0, of: '3^64', starts: 4, grown: { states: 0, stoppedBy: 'start-budget' } });
    expect(d.coverage!.text).toContain('4 of 3^64 patterns (cut to the budget of 4)');
    expect(d.diagnostics.filter((g) => g.level === 'error')).toEqual([]);
    expect(d.branches.length).toBeGreaterThan(0);
    expect(d.branches.every((b) => b.points.every((q) => q.x.length === 64))).toBe(true);
  }, 300_000);

  it('leaves networks within the enumeration limit as they were: no coverage, every combination used', () => {
    const system = compileModelJson(cubicDoc(3, chain(3, true)));
    const a = traceDiagram(system);
    const b = traceDiagram(system, { startBudget: 2 });
    expect(a.coverage).toBeUndefined();
    expect(b.branches).toEqual(a.branches);
    expect(b.bifurcations).toEqual(a.bifurcations);
    expect(findStartingEquilibria(system, 0, { ...defaultTraceSettings, from: 0, to: 1 }).points).toHaveLength(27);
  });

  it('rejects bad start-selection settings, naming the field', () => {
    const system = compileModelJson(cubicDoc(3, chain(3, true)));
    for (const [bad, field] of [[{ startBudget: 1 }, 'startBudget'], [{ startBudget: 2.5 }, 'startBudget'], [{ startSelection: 'some' as 'auto' }, 'startSelection'], [{ growthIntegrations: -1 }, 'growthIntegrations'], [{ growthValues: 0.5 }, 'growthValues']] as const) {
      const d = traceDiagram(system, bad);
      expect(d.branches).toEqual([]);
      expect(d.diagnostics[0]).toMatchObject({ level: 'error', code: 'invalid-settings' });
      expect(d.diagnostics[0].message).toContain(`settings.${field}`);
      const z = startSelectionSettingsSchema.safeParse(bad);
      expect(z.success).toBe(false);
      if (!z.success) expect(z.error.issues[0].path).toEqual([field]);
    }
    expect(startSelectionSettingsSchema.safeParse({ startSelection: 'restricted', startBudget: 729, growthIntegrations: 0, growthValues: 8 }).success).toBe(true);
    expect(startSelectionSettingsSchema.safeParse({ other: 1 }).success).toBe(false);
  });
});
