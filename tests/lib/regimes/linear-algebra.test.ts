import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compileModelJson } from '../../../src/lib/model/index';
import { newton } from '../../../src/lib/numerics/newton';
import { newtonAtFixedParameter } from '../../../src/lib/regimes/linear-algebra';
import { lakeNetwork } from './fixtures';

/**
 * newtonAtFixedParameter (regimes/linear-algebra.ts) runs the engine's damped Newton iteration
 * (numerics/newton.ts with linearSolver 'flat') on work arrays kept per dimension; the engine's own
 * function is the independent computation: the same converged flag, iteration count, residual and
 * state, bit for bit, from random starting guesses (converging, failing and diverging ones alike).
 */
describe('newtonAtFixedParameter(system, x0, p, tolerance, maxIterations)', () => {
  const cubic = compileModelJson({
    format: 'brinkmap/network-1', name: 'invented cubic ring',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: [0.05, 0.08, 0.11, 0.15].map((r, i) => ({ id: `n${i + 1}`, parameters: { r } })),
    links: [{ from: 'n1', to: 'n2', weight: 1 }, { from: 'n2', to: 'n3', weight: 1, twoWay: true }, { from: 'n3', to: 'n4', weight: 0.5 }, { from: 'n4', to: 'n1', weight: 1 }],
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  });
  const lakes = compileModelJson(lakeNetwork([0.08, 0.06, 0.05], [{ from: 0, to: 1, weight: 1 }, { from: 1, to: 2, weight: 1 }], 1.2));
  for (const [name, system, lo, hi] of [['4 cubic nodes', cubic, -2, 2], ['three lakes', lakes, -0.5, 3]] as const) {
    it(`${name}: the same result as numerics' newton with the flat solver, bit for bit`, () => {
      fc.assert(fc.property(
        fc.array(fc.double({ min: lo, max: hi, noNaN: true }), { minLength: system.dimension, maxLength: system.dimension }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.integer({ min: 1, max: 40 }),
        (x0, p, cap) => {
          const a = newtonAtFixedParameter(system, x0, p, 1e-12, cap);
          const b = newton(system, x0, p, { residualTolerance: 1e-12, maxIterations: cap, linearSolver: 'flat' });
          expect(a.converged).toBe(b.converged);
          expect(a.iterations).toBe(b.iterations);
          expect(Object.is(a.residual, b.residual) || a.residual === b.residual).toBe(true);
          expect(Array.from(a.x)).toEqual(Array.from(b.x));
        },
      ), { numRuns: 300, seed: 12 });
    });
  }
  it('does not mutate x0 and returns a new array each call', () => {
    const x0 = [-1, -1, -1, -1];
    const a = newtonAtFixedParameter(cubic, x0, 0.2, 1e-12, 40);
    const b = newtonAtFixedParameter(cubic, x0, 0.2, 1e-12, 40);
    expect(x0).toEqual([-1, -1, -1, -1]);
    expect(a.x).not.toBe(b.x);
    expect(Array.from(a.x)).toEqual(Array.from(b.x));
  });
});
