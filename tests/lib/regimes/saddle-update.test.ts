import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { compileModelJson, type CompiledSystem } from '../../../src/lib/model/index';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { analyseEquilibrium, equilibriaAt, isIndexOneSaddle, labelRegimes, resolveOptions } from '../../../src/lib/regimes/index';
import { updateSaddle, type SaddleUpdateOutcome } from '../../../src/lib/regimes/saddle-update';
import { newtonAtFixedParameter, solveLinear } from '../../../src/lib/regimes/linear-algebra';
import { lakeNetwork, benchCubicNetwork } from './fixtures';

/**
 * updateSaddle (src/lib/regimes/saddle-update.ts): the unstable eigenpair of a continued index-1
 * saddle from the previous one, against the full eigen-decomposition of ml-matrix
 * (EigenvalueDecomposition, JAMA's Hessenberg QR with vectors: an independent general-purpose
 * computation), and the fallbacks that must refuse an update.
 */

const cubic = benchCubicNetwork;
const allToAll = (k: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k - i - 1 }, (_, j) => ({ from: i, to: i + j + 1, twoWay: true }))).flat();
const ring = (k: number) => Array.from({ length: k }, (_, i) => [{ from: i, to: (i + 1) % k }, { from: i, to: (i + 3) % k }]).flat();

const o = resolveOptions({});

/** ml-matrix's eigenvalues of J and the unit eigenvector of its one eigenvalue with Re > tol (null when not exactly one, or it is complex). */
function reference(system: CompiledSystem, x: ArrayLike<number>, p: number) {
  const n = system.dimension;
  const jac = system.jacobian(Float64Array.from(x), p, new Float64Array(n * n));
  const evd = new EigenvalueDecomposition(Matrix.from1DArray(n, n, Array.from(jac)));
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  const unstable = re.flatMap((v, k) => (v > o.hyperbolicTolerance ? [k] : []));
  const neutral = re.filter((v) => Math.abs(v) <= o.hyperbolicTolerance).length;
  if (unstable.length !== 1 || im[unstable[0]] !== 0) return { unstable: unstable.length, neutral, value: Number.NaN, vector: null };
  const k = unstable[0];
  const v = evd.eigenvectorMatrix.getColumn(k);
  const norm = Math.hypot(...v);
  let big = 0;
  for (let i = 1; i < n; i++) if (Math.abs(v[i]) > Math.abs(v[big])) big = i;
  const s = v[big] < 0 ? -1 : 1;
  return { unstable: 1, neutral, value: re[k], vector: v.map((c) => (s * c) / norm) };
}

/** Every index-1 saddle the diagram shows at p0, continued to p1 (tangent predictor and Newton's method), as the labeller continues them. */
function continued(system: CompiledSystem, p0: number, p1: number) {
  const n = system.dimension;
  const diagram = traceDiagram(system);
  const saddles = equilibriaAt(system, diagram, p0, o).equilibria.filter(isIndexOneSaddle);
  return saddles.flatMap((e) => {
    const x0 = Float64Array.from(e.x);
    const jac = system.jacobian(x0, p0, new Float64Array(n * n));
    const fp = system.parameterDerivative(x0, p0, new Float64Array(n));
    const dx = solveLinear(jac, n, Array.from(fp, (v) => -v));
    if (!dx) return [];
    const r = newtonAtFixedParameter(system, e.x.map((c, i) => c + (p1 - p0) * dx[i]), p1, o.newtonTolerance, o.newtonMaxIterations);
    return r.converged ? [{ previous: e, x: r.x, residual: r.residual }] : [];
  });
}

describe('updateSaddle(system, x, p, residual, tol, previous) on continued saddles', () => {
  const cases = [
    ['4 cubic nodes, all-to-all (symmetric Jacobian)', compileModelJson(cubic(4, allToAll(4))), 0.05, 0.052],
    ['5 cubic nodes, one-way ring with chords (not symmetric)', compileModelJson(cubic(5, ring(5))), 0.04, 0.041],
    ['three lakes, one-way chain (not symmetric)', compileModelJson(lakeNetwork([0.08, 0.06, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1 }], 1.2)), 0.1, 0.102],
  ] as const;
  for (const [name, system, p0, p1] of cases) {
    it(`${name}: an accepted update is the index-1 saddle ml-matrix's eigen-decomposition finds, eigenvalue to 1e-10 and eigenvector to 1e-8`, () => {
      const items = continued(system, p0, p1);
      expect(items.length).toBeGreaterThan(2);
      let accepted = 0;
      for (const it of items) {
        const outcome = { reason: 'accepted' as SaddleUpdateOutcome };
        const u = updateSaddle(system, it.x, p1, it.residual, o.hyperbolicTolerance, it.previous, outcome);
        const ref = reference(system, it.x, p1);
        if (!u) {
          expect(outcome.reason).not.toBe('accepted');
          continue;
        }
        accepted++;
        expect(ref.unstable).toBe(1);
        expect(ref.neutral).toBe(0);
        expect(u.unstable).toBe(1);
        expect(Math.abs(u.unstableValue! - ref.value)).toBeLessThan(1e-10 * Math.max(1, Math.abs(ref.value)));
        for (let i = 0; i < system.dimension; i++) expect(Math.abs(u.unstableVector![i] - ref.vector![i])).toBeLessThan(1e-8);
        // The full path of the engine (analyseEquilibrium) gives the same pair.
        const full = analyseEquilibrium(system, it.x, p1, it.residual, o.hyperbolicTolerance);
        expect(Math.abs(u.unstableValue! - full.unstableValue!)).toBeLessThan(1e-12 * Math.max(1, Math.abs(full.unstableValue!)));
        // Eigenvalues on request: the full spectrum.
        expect(u.eigenvalues.filter((l) => l.re > o.hyperbolicTolerance)).toHaveLength(1);
      }
      // A small step along the branch: nearly every update is accepted.
      expect(accepted).toBeGreaterThanOrEqual(Math.ceil(0.5 * items.length));
    });
  }

  it('4 cubic nodes, all-to-all: a step of 0.3 in beta refuses updates (separation), none accepted wrongly', () => {
    const system = compileModelJson(cubic(4, allToAll(4)));
    const items = continued(system, 0.02, 0.32);
    let refused = 0;
    for (const it of items) {
      const outcome = { reason: 'accepted' as SaddleUpdateOutcome };
      const u = updateSaddle(system, it.x, 0.32, it.residual, o.hyperbolicTolerance, it.previous, outcome);
      const ref = reference(system, it.x, 0.32);
      if (u) {
        expect(ref.unstable).toBe(1);
        expect(Math.abs(u.unstableValue! - ref.value)).toBeLessThan(1e-10 * Math.max(1, Math.abs(ref.value)));
      } else {
        refused++;
        expect(outcome.reason).toBe('separation');
      }
    }
    expect(refused).toBeGreaterThan(0);
  });
});

/**
 * A linear vector field x' = A(p) x (equilibrium x = 0), so that the Jacobian is chosen by hand.
 * A(p) = [[1, 0, 0], [0, -1, M], [0, p, -1]]: at p = 0 the eigenvalues are 1, -1, -1 (an index-1
 * saddle); the lower block has eigenvalues -1 ± sqrt(M p) (characteristic polynomial
 * (λ + 1)² - M p), so with M = 1e4 and p = 2.25e-4 they are 0.5 and -2.5: index 2, although
 * ‖A(p) - A(0)‖_F = p is tiny. A is far from normal, so the separation test (exact for normal
 * matrices) is fooled and the parity test must refuse.
 */
function handMade(m: number): CompiledSystem {
  return {
    dimension: 3, variables: ['u', 'v', 'w'], parameter: 'p', sweep: { from: 0, to: 1 }, start: [],
    rates(x, p, out) {
      out[0] = x[0];
      out[1] = -x[1] + m * x[2];
      out[2] = p * x[1] - x[2];
      return out;
    },
    jacobian(_x, p, out) {
      out.set([1, 0, 0, 0, -1, m, 0, p, -1]);
      return out;
    },
    parameterDerivative(x, _p, out) {
      out.set([0, 0, x[1]]);
      return out;
    },
  };
}

describe('updateSaddle fallbacks on a hand-made non-normal Jacobian', () => {
  const zero = new Float64Array(3);
  it('refuses by parity where the eigenvalue -1 + sqrt(M p) has crossed zero (index 2, ml-matrix confirms)', () => {
    const system = handMade(1e4);
    const previous = analyseEquilibrium(system, zero, 0, 0, o.hyperbolicTolerance);
    expect(previous.unstable).toBe(1);
    const p = 2.25e-4;
    expect(reference(system, zero, p).unstable).toBe(2);
    const outcome = { reason: 'accepted' as SaddleUpdateOutcome };
    expect(updateSaddle(system, zero, p, 0, o.hyperbolicTolerance, previous, outcome)).toBeNull();
    expect(outcome.reason).toBe('parity');
  });
  it('accepts a small step that keeps index 1 (-1 + sqrt(M p) = -0.9 at M p = 0.01) and matches ml-matrix', () => {
    const system = handMade(1e4);
    const previous = analyseEquilibrium(system, zero, 0, 0, o.hyperbolicTolerance);
    const u = updateSaddle(system, zero, 1e-6, 0, o.hyperbolicTolerance, previous);
    const ref = reference(system, zero, 1e-6);
    expect(ref.unstable).toBe(1);
    expect(u).not.toBeNull();
    expect(Math.abs(u!.unstableValue! - ref.value)).toBeLessThan(1e-12);
    // The eigenvector of eigenvalue 1 is e_1 exactly (A is block diagonal).
    u!.unstableVector!.forEach((c, i) => expect(Math.abs(c - (i === 0 ? 1 : 0))).toBeLessThan(1e-14));
  });
  it('refuses by separation when ‖A(p) - A(0)‖_F = |p| reaches half the gap 1 - (-1)', () => {
    const system = handMade(1);
    const previous = analyseEquilibrium(system, zero, 0, 0, o.hyperbolicTolerance);
    const outcome = { reason: 'accepted' as SaddleUpdateOutcome };
    expect(updateSaddle(system, zero, 1, 0, o.hyperbolicTolerance, previous, outcome)).toBeNull();
    expect(outcome.reason).toBe('separation');
  });
  it('refuses without a reference (an equilibrium not from a full spectrum)', () => {
    const system = handMade(1);
    const outcome = { reason: 'accepted' as SaddleUpdateOutcome };
    const bare = { x: [0, 0, 0], residual: 0, eigenvalues: [], unstable: 1, neutral: 0, unstableValue: 1, unstableVector: [1, 0, 0] };
    expect(updateSaddle(system, zero, 0, 0, o.hyperbolicTolerance, bare, outcome)).toBeNull();
    expect(outcome.reason).toBe('no-reference');
  });
});

describe('labelRegimes(system, diagram) with and without the saddle update', () => {
  const networks = [
    ['4 cubic nodes, all-to-all', cubic(4, allToAll(4))],
    ['5 cubic nodes, one-way ring with chords', cubic(5, ring(5))],
    ['three lakes, one-way chain', lakeNetwork([0.08, 0.06, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1 }], 1.2)],
  ] as const;
  for (const [name, doc] of networks) {
    it(`${name}: the same bands, crossovers and escape graphs (saddleUpdate: false computes every spectrum)`, () => {
      const system = compileModelJson(doc);
      const diagram = traceDiagram(system);
      const a = labelRegimes(system, diagram, { saddleUpdate: false });
      const b = labelRegimes(system, diagram);
      expect(b.regimes.length).toBeGreaterThan(0);
      expect(JSON.stringify(b.regimes)).toBe(JSON.stringify(a.regimes));
      expect(JSON.stringify(b.crossovers)).toBe(JSON.stringify(a.crossovers));
      expect(JSON.stringify(b.escapeGraphs)).toBe(JSON.stringify(a.escapeGraphs));
    });
  }
});
