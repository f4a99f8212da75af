import { EigenvalueDecomposition, LuDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { findStartingEquilibria } from '../../../src/lib/atlas/starting-equilibria.js';
import { defaultTraceSettings } from '../../../src/lib/atlas/trace-settings.js';
import { compileModelJson } from '../../../src/lib/model/index.js';
import { DenseLu } from '../../../src/lib/numerics/dense-lu.js';
import { symmetricEigenvalues } from '../../../src/lib/numerics/symmetric-eigenvalues.js';
import { distInf, normInf } from '../../../src/lib/numerics/vector.js';

// Issue 12: the speed-ups must leave every number of a diagram as it was. The
// reference here is the library the engine used before (ml-matrix), compared to the last bit.

/** Seeded linear congruential generator (Numerical Recipes constants), values in [-1, 1). */
function lcg(seed: number) {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32) * 2 - 1;
}

describe('DenseLu against ml-matrix LuDecomposition', () => {
  it('gives the same determinant, singularity and solution to the last bit on 6000 random, rank-deficient and structured matrices', () => {
    const rand = lcg(7);
    let singularSeen = 0;
    let compared = 0;
    for (let t = 0; t < 6000; t++) {
      const n = 1 + (t % 10);
      const a = Float64Array.from({ length: n * n }, rand);
      if (t % 4 === 1 && n > 1) for (let j = 0; j < n; j++) a[(n - 1) * n + j] = 2 * a[j]; // exactly dependent rows
      if (t % 4 === 2) for (let i = 0; i < n * n; i++) if (Math.abs(a[i]) < 0.5) a[i] = 0; // sparse, ties and zero pivots
      if (t % 4 === 3) for (let i = 0; i < n * n; i++) a[i] = Math.round(a[i] * 3); // small integers: exact zeros after elimination
      const ref = new LuDecomposition(Matrix.from1DArray(n, n, a));
      const ours = new DenseLu(a, n);
      expect(ours.singular).toBe(ref.isSingular());
      expect(Object.is(ours.determinant, ref.isSingular() ? 0 : ref.determinant)).toBe(true);
      if (ref.isSingular()) {
        singularSeen++;
        expect(ours.solve(new Float64Array(n).fill(1))).toBeNull();
        continue;
      }
      const b = Float64Array.from({ length: n }, rand);
      const z = ref.solve(Matrix.columnVector(Array.from(b)));
      const mine = ours.solve(b);
      const finite = Array.from({ length: n }, (_, i) => z.get(i, 0)).every(Number.isFinite);
      if (!finite) { expect(mine).toBeNull(); continue; }
      for (let i = 0; i < n; i++) expect(Object.is(mine![i], z.get(i, 0))).toBe(true);
      compared++;
    }
    // Not vacuous: both kinds of matrices occurred.
    expect(singularSeen).toBeGreaterThan(500);
    expect(compared).toBeGreaterThan(3000);
  });

  it('reports non-finite input as singular with a NaN determinant, as before', () => {
    const lu = new DenseLu(Float64Array.of(1, Number.NaN, 0, 1), 2);
    expect(lu.singular).toBe(true);
    expect(lu.determinant).toBeNaN();
    expect(lu.solve([1, 1])).toBeNull();
  });
});

describe('symmetricEigenvalues against ml-matrix EigenvalueDecomposition (symmetric path)', () => {
  it('gives the same eigenvalues to the last bit on 4000 random, sparse, diffusive-coupling and repeated-eigenvalue matrices', () => {
    const rand = lcg(11);
    for (let t = 0; t < 4000; t++) {
      const n = 1 + (t % 12);
      const a = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) a[i * n + j] = a[j * n + i] = rand();
      if (t % 3 === 1) for (let i = 0; i < n * n; i++) if (Math.abs(a[i]) < 0.6) a[i] = 0;
      if (t % 3 === 2) {
        // A two-way chain's Jacobian: diagonal f'(x_i) - beta deg_i, beta off the diagonal; identical nodes give repeated values.
        a.fill(0);
        const beta = Math.abs(rand());
        for (let i = 0; i < n; i++) a[i * n + i] = -2 - (i > 0 ? beta : 0) - (i < n - 1 ? beta : 0);
        for (let i = 0; i + 1 < n; i++) a[i * n + i + 1] = a[(i + 1) * n + i] = beta;
      }
      const ref = new EigenvalueDecomposition(Matrix.from1DArray(n, n, a)).realEigenvalues;
      const ours = symmetricEigenvalues(a, n);
      for (let i = 0; i < n; i++) expect(Object.is(ours[i], ref[i])).toBe(true);
    }
  });
});

describe('starting equilibria of an 8-node network', () => {
  it('keeps the 6561 patterns in the order and with the duplicates a plain scan would drop', () => {
    const doc = {
      format: 'brinkmap/network-1',
      name: 'invented 8-node one-way chain',
      element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
      nodes: Array.from({ length: 8 }, (_, i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + (0.1 * i) / 7 } })),
      links: Array.from({ length: 7 }, (_, i) => ({ from: `n${i + 1}`, to: `n${i + 2}`, weight: 1 })),
      coupling: { parameter: 'beta', value: 0, term: 'source - target' },
      sweep: { parameter: 'beta', from: 0, to: 1 },
      // Guesses that converge to patterns already listed: the duplicate test must drop them.
      start: [[-1, -1, -1, -1, -1, -1, -1, -1], [1.05, 1.05, 1.05, 1.05, 1.05, 1.05, 1.05, 1.05]],
    };
    const system = compileModelJson(doc);
    const found = findStartingEquilibria(system, 0, { ...defaultTraceSettings, from: 0, to: 1 });
    expect(found.points).toHaveLength(3 ** 8);
    // The plain scan over the same points: no kept point is a duplicate of an earlier one.
    for (let k = 0; k < found.points.length; k += 37) {
      const x = found.points[k];
      expect(found.points.slice(0, k).some((q) => distInf(q, x) < 1e-7 * (1 + normInf(q)))).toBe(false);
    }
  });
});

describe('dropping the spectra of examined points (issue 12)', () => {
  it('gives the same diagram as a trace that stores every eigenvalue, pitchforks included', async () => {
    const { traceDiagram } = await import('../../../src/lib/atlas/index.js');
    // Four identical invented lakes on a two-way ring: exactly symmetric Jacobians, pitchforks and saddle-nodes.
    const doc = {
      format: 'brinkmap/network-1',
      name: 'invented ring of four lakes',
      element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
      nodes: Array.from({ length: 4 }, (_, i) => ({ id: `lake${i + 1}` })),
      links: [[1, 2], [2, 3], [3, 4], [4, 1]].map(([a, b]) => ({ from: `lake${a}`, to: `lake${b}`, weight: 1, twoWay: true })),
      coupling: { parameter: 'beta', value: 0, term: 'source - target' },
      sweep: { parameter: 'beta', from: 0, to: 1 },
    };
    const system = compileModelJson(doc);
    const lean = traceDiagram(system);
    const full = traceDiagram(system, { storeEigenvalues: true });
    expect(lean.bifurcations.some((b) => b.type === 'pitchfork')).toBe(true);
    expect(lean.branches.map((b) => b.points.map((q) => [q.p, ...q.x, q.unstable]))).toEqual(full.branches.map((b) => b.points.map((q) => [q.p, ...q.x, q.unstable])));
    expect(JSON.stringify(lean.bifurcations)).toBe(JSON.stringify(full.bifurcations));
    // The stored eigenvalues are those of the point: their unstable count matches.
    for (const b of full.branches) for (const q of b.points) expect(q.eigenvalues!.filter((e) => e.re > 1e-9 * Math.max(1, ...q.eigenvalues!.map((z) => Math.hypot(z.re, z.im)))).length).toBe(q.unstable);
  });
});
