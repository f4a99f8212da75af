import { det, polynomialRoot } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { compileModelJson } from '../../../src/lib/model/index.js';

// Two identical cubic elements x' = r + x - x^3 (r = 0.1, invented) coupled diffusively both ways.
const r = 0.1;
const doc = {
  format: 'brinkmap/network-1',
  name: 'Two coupled cubic elements (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r } },
  nodes: [{ id: 'left' }, { id: 'right' }],
  links: [{ from: 'left', to: 'right', weight: 1, twoWay: true }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
};

/** Roots of r + x - x^3 = 0 by mathjs polynomialRoot (an independent general-purpose solver), sorted. */
function elementRoots(): number[] {
  const roots = polynomialRoot(r, 1, 0, -1) as unknown as (number | { re: number; im: number })[];
  return roots
    .map((z) => (typeof z === 'number' ? { re: z, im: 0 } : z))
    .filter((z) => Math.abs(z.im) < 1e-12)
    .map((z) => z.re)
    .sort((a, b) => a - b);
}

describe('traceDiagram on two identical diffusively coupled cubic elements', () => {
  const system = compileModelJson(doc);
  const d = traceDiagram(system);
  const [xLow, xMid, xHigh] = elementRoots();

  it('finds the pitchfork of the symmetric middle equilibrium at beta* = f\'(x0)/2', () => {
    // On (x0, x0) the coupling vanishes, J = [[f'(x0) - beta, beta], [beta, f'(x0) - beta]] with
    // eigenvectors (1, 1): f'(x0) and (1, -1): f'(x0) - 2 beta. The antisymmetric one crosses zero at
    // beta* = f'(x0)/2 = (1 - 3 x0^2)/2; the exchange symmetry x1 <-> x2 makes it a pitchfork.
    const betaStar = (1 - 3 * xMid * xMid) / 2;
    const pf = d.bifurcations.filter((s) => s.type === 'pitchfork');
    expect(pf).toHaveLength(1);
    expect(Math.abs(pf[0].p - betaStar)).toBeLessThan(1e-9);
    expect(Math.abs(pf[0].x[0] - xMid)).toBeLessThan(1e-9);
    expect(Math.abs(pf[0].x[1] - xMid)).toBeLessThan(1e-9);
  });

  it('keeps the three symmetric equilibria unchanged at every coupling', () => {
    for (const x0 of [xLow, xMid, xHigh]) {
      const br = d.branches.find((b) => Math.abs(b.points[0].x[0] - x0) < 1e-9 && Math.abs(b.points[0].x[1] - x0) < 1e-9);
      expect(br, `branch through (${x0}, ${x0})`).toBeDefined();
      for (const q of br!.points) {
        expect(Math.abs(q.x[0] - x0)).toBeLessThan(1e-9);
        expect(Math.abs(q.x[1] - x0)).toBeLessThan(1e-9);
      }
      expect(Math.min(...br!.points.map((q) => q.p))).toBe(0);
      expect(Math.max(...br!.points.map((q) => q.p))).toBe(1);
    }
  });

  it('ends the partially tipped branches in saddle-nodes (zero eigenvalue checked with mathjs det)', () => {
    const folds = d.bifurcations.filter((s) => s.type === 'saddle-node');
    // One fold per mirror image: (low, high)-type and (high, low)-type states.
    expect(folds).toHaveLength(2);
    expect(Math.abs(folds[0].p - folds[1].p)).toBeLessThan(1e-9);
    expect(folds[0].x[0]).toBeCloseTo(folds[1].x[1], 8);
    for (const f of folds) {
      const j = system.jacobian(Float64Array.from(f.x), f.p, new Float64Array(4));
      expect(Math.abs(det([[j[0], j[1]], [j[2], j[3]]]) as number)).toBeLessThan(1e-8);
      // The fold's branch starts and ends at beta = 0 (both states exist only below the fold).
      const br = d.branches.find((b) => b.id === f.branches[0])!;
      expect(br.points[0].p).toBe(0);
      expect(br.points.at(-1)!.p).toBe(0);
      expect(Math.max(...br.points.map((q) => q.p))).toBeCloseTo(f.p, 9);
      // Unstable dimension changes by one across the fold: 1 on one side, 0 or 2 on the other.
      const counts = new Set(br.points.filter((q) => Math.abs(q.p - f.p) > 1e-4).map((q) => q.unstable));
      expect(counts.size).toBe(2);
    }
  });

  it('traces all nine uncoupled combinations without tracing any branch twice', () => {
    const startsOnBranches = d.branches.flatMap((b) => [b.points[0], b.points.at(-1)!]).filter((q) => q.p === 0);
    // 9 = 3^2 element combinations at beta = 0, each reached exactly once by a branch end.
    const keys = new Set(startsOnBranches.map((q) => q.x.map((v) => v.toFixed(6)).join(',')));
    expect(keys.size).toBe(9);
    // Each combination is the end of exactly one branch: 3 symmetric branches (one end at beta = 0),
    // 2 fold branches (both ends) and the branch through the pitchfork (both ends): 3 + 4 + 2 = 9.
    expect(startsOnBranches).toHaveLength(9);
    expect(d.branches).toHaveLength(6);
  });
});
