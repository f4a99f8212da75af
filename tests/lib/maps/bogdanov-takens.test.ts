import { describe, expect, it } from 'vitest';
import { compileTwoParameter, traceMap } from '../../../src/lib/maps/index';

/**
 * Bogdanov-Takens normal form x' = y, y' = b1 + b2 x + x^2 + s x y, s = ±1 (Kuznetsov, Elements of
 * Applied Bifurcation Theory, 3rd ed., §8.4: saddle-node curve b1 = b2^2/4, Hopf curve b1 = 0 with
 * b2 < 0, both ending at the Bogdanov-Takens point b = 0). Derivation used below: equilibria have
 * y = 0 and b1 + b2 x + x^2 = 0; J = [[0, 1], [b2 + 2x, s x]]. Fold: det J = -(b2 + 2x) = 0, so
 * x = -b2/2 and b1 = b2^2/4. Hopf: trace J = s x = 0, so x = 0, b1 = 0, and det J = -b2 = ω^2 > 0.
 * Both at once: b1 = b2 = 0, x = 0 (a double zero eigenvalue, J = [[0, 1], [0, 0]]).
 */
for (const s of [-1, 1]) {
  describe(`map of the Bogdanov-Takens normal form, s = ${s} (Kuznetsov §8.4)`, () => {
    const doc = {
      format: 'brinkmap/ode-1', name: 'Bogdanov-Takens normal form', variables: ['x', 'y'],
      rates: { x: 'y', y: `b1 + b2 * x + x^2 + ${s} * x * y` }, parameters: { b1: 0, b2: -0.5 }, sweep: { parameter: 'b1', from: -1, to: 1 },
    };
    const sys = compileTwoParameter(doc, { second: 'b2' });
    const map = traceMap(sys, { secondFrom: -1, secondTo: 1, regionColumns: 0, regionRows: 0 });
    const hopf = map.curves.filter((c) => c.type === 'hopf');
    const folds = map.curves.filter((c) => c.type === 'saddle-node');

    it('finds one Hopf curve b1 = 0, ω² = -b2 to 1e-9, from the bound b2 = -1 to the Bogdanov-Takens point', () => {
      expect(hopf).toHaveLength(1);
      expect(hopf[0].ends).toEqual(['parameter-bound', 'bogdanov-takens']);
      for (const q of hopf[0].points) {
        expect(Math.abs(q.p[0])).toBeLessThan(1e-9);
        expect(Math.abs(q.frequency! ** 2 + q.p[1])).toBeLessThan(1e-9);
        expect(Math.abs(q.x[0]) + Math.abs(q.x[1])).toBeLessThan(1e-9);
      }
      expect(hopf[0].points[0].p[1]).toBeCloseTo(-1, 12);
    });

    it('finds one saddle-node curve b1 = b2²/4 to 1e-9 across the whole range', () => {
      expect(folds).toHaveLength(1);
      expect(folds[0].ends).toEqual(['parameter-bound', 'parameter-bound']);
      for (const q of folds[0].points) {
        expect(Math.abs(q.p[0] - q.p[1] ** 2 / 4)).toBeLessThan(1e-9);
        expect(Math.abs(q.x[0] + q.p[1] / 2)).toBeLessThan(1e-9);
      }
    });

    it('locates one Bogdanov-Takens point at the origin to 1e-9, on both curves, with test functions of opposite sign on both sides', () => {
      const bt = map.points.filter((q) => q.type === 'bogdanov-takens');
      expect(bt).toHaveLength(1);
      expect(map.points.filter((q) => q.type === 'cusp')).toEqual([]);
      for (const v of [...bt[0].p, ...bt[0].x]) expect(Math.abs(v)).toBeLessThan(1e-9);
      expect(bt[0].curves.sort()).toEqual([folds[0].id, hopf[0].id].sort());
      const ev = bt[0].evidence as unknown as { before: number; after: number; alsoOn: { before: number; after: number }[] };
      expect(Math.sign(ev.before)).toBe(-Math.sign(ev.after));
      expect(ev.alsoOn).toHaveLength(1);
      expect(Math.sign(ev.alsoOn[0].before)).toBe(-Math.sign(ev.alsoOn[0].after));
      expect(map.diagnostics.filter((d) => d.level !== 'info')).toEqual([]);
    });
  });
}

/**
 * A double zero eigenvalue without a Hopf curve: the one-way cubic pair x1' = r + x1 - x1^3,
 * x2' = r + x2 - x2^3 + beta (x1 - x2) has the triangular J = [[1 - 3x1^2, 0], [beta, 1 - 3x2^2 - beta]].
 * Both diagonal entries vanish at x1 = -1/sqrt 3 (the fold of node 1: r = x1^3 - x1 = 2/(3 sqrt 3)),
 * and 1 - 3x2^2 = beta with r + x2 - x2^3 + beta (x1 - x2) = 0, solved by x2 = 1/(2 sqrt 3), beta = 3/4
 * (substitute: (1/sqrt 3)(2/3 + 1/2 - 1/24 - 3/4 - 3/8) = 0). There J = [[0, 0], [3/4, 0]], a Jordan
 * block, but eigenvalues stay real (triangular), so no Hopf curve ends there; on node 2's fold curve
 * both the Bogdanov-Takens test p.v and the cusp test p.B(v,v) carry the factor 1 - 3x1^2.
 */
describe('a degenerate double zero on a one-way pair (derived closed form)', () => {
  const doc = { format: 'brinkmap/network-1', name: 'one-way cubic pair (invented)', element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.35 } },
    nodes: [{ id: 'x1' }, { id: 'x2' }], links: [{ from: 'x1', to: 'x2', weight: 1 }], coupling: { parameter: 'beta', value: 0 }, sweep: { parameter: 'beta', from: 0, to: 1 } };
  const sys = compileTwoParameter(doc, { second: 'r' });
  const map = traceMap(sys, { secondFrom: 0.3, secondTo: 0.45, regionColumns: 0, regionRows: 0 });

  it('reports one Bogdanov-Takens point at beta = 3/4, r = 2/(3 sqrt 3) with a note, and no cusp there', () => {
    const bt = map.points.filter((q) => q.type === 'bogdanov-takens');
    expect(bt).toHaveLength(1);
    const q = bt[0];
    expect(Math.abs(q.p[0] - 0.75)).toBeLessThan(1e-9);
    expect(Math.abs(q.p[1] - 2 / (3 * Math.sqrt(3)))).toBeLessThan(1e-9);
    expect(Math.abs(q.x[0] + 1 / Math.sqrt(3))).toBeLessThan(1e-9);
    expect(Math.abs(q.x[1] - 1 / (2 * Math.sqrt(3)))).toBeLessThan(1e-9);
    expect(q.note).toMatch(/no Hopf curve/);
    expect(q.evidence.cuspTestAlsoVanishes).toBeDefined();
    expect(map.points.filter((p) => p.type === 'cusp')).toEqual([]);
    const j = sys.jacobian(Float64Array.from(q.x), q.p[0], q.p[1], new Float64Array(4));
    for (const [k, v] of [[0, 0], [1, 0], [2, 0.75], [3, 0]]) expect(Math.abs(j[k] - v)).toBeLessThan(1e-9);
  });

  it('cross seeds find node 1\'s fold, the line r = 2/(3 sqrt 3) that no row at fixed r crosses (x1 = -1/sqrt 3 on it to 1e-9), and list it with the point', () => {
    const onLine = (c: { points: { p: [number, number]; x: number[] }[] }) => c.points.every((q) => Math.abs(q.p[1] - 2 / (3 * Math.sqrt(3))) < 1e-9 && Math.abs(q.x[0] + 1 / Math.sqrt(3)) < 1e-9);
    const lines = map.curves.filter((c) => c.type === 'saddle-node' && onLine(c));
    expect(lines.length).toBeGreaterThan(0);
    expect(lines.every((c) => c.seed.swept === 'second')).toBe(true);
    const bt = map.points.find((q) => q.type === 'bogdanov-takens')!;
    expect(bt.curves.some((id) => lines.some((c) => c.id === id))).toBe(true);
    // Without cross seeds the line is not there (docs/maps.md §5, what seeds can miss).
    const rowsOnly = traceMap(sys, { secondFrom: 0.3, secondTo: 0.45, crossSeeds: 0, regionColumns: 0, regionRows: 0 });
    expect(rowsOnly.curves.filter((c) => c.type === 'saddle-node' && onLine(c))).toEqual([]);
  });
});
