import { describe, expect, it } from 'vitest';
import { compileModelJson, DOCUMENT_FUNCTIONS, ModelError } from '../../../src/lib/model';
import { copy, lorenz } from './fixtures';
import { fdJacobian, fdParameter, maxAbsDiff } from './numeric-helpers';

/*
 * Lorenz (1963): x' = sigma (y - x), y' = x (rho - z) - y, z' = x y - b z.
 * Hand derivation: J = [[-sigma, sigma, 0], [rho - z, -1, -x], [y, x, -b]], dF/drho = [0, x, 0].
 */
const sigma = 10;
const b = 2.6666666666666665;
const points: [number, number, number, number][] = [
  [1, 2, 3, 28],
  [-8.4, -8.4, 27, 28],
  [0.1, -0.3, 5, 0.5],
];

describe('compileModelJson on the Lorenz ode-1 example (sweep over rho)', () => {
  const sys = compileModelJson(lorenz);

  it('keeps variables, parameter, range and start guesses', () => {
    expect(sys.dimension).toBe(3);
    expect(sys.variables).toEqual(['x', 'y', 'z']);
    expect(sys.parameter).toBe('rho');
    expect(sys.sweep).toEqual({ from: 0, to: 30 });
    expect(sys.start.map((s) => [...s])).toEqual([[0, 0, 0]]);
    expect(sys.start[0]).toBeInstanceOf(Float64Array);
    expect(sys.network).toBeUndefined();
  });

  it.each(points)('rates at (%f, %f, %f), rho = %f match the Lorenz equations', (x, y, z, rho) => {
    const out = sys.rates(Float64Array.from([x, y, z]), rho, new Float64Array(3));
    expect([...out]).toEqual([sigma * (y - x), x * (rho - z) - y, x * y - b * z]);
  });

  it.each(points)('jacobian at (%f, %f, %f), rho = %f matches the hand derivation and central differences', (x, y, z, rho) => {
    const s = Float64Array.from([x, y, z]);
    const J = sys.jacobian(s, rho, new Float64Array(9));
    expect([...J]).toEqual([-sigma, sigma, 0, rho - z, -1, -x, y, x, -b]); // hand derivation above
    expect(maxAbsDiff(J, fdJacobian(sys, s, rho))).toBeLessThan(1e-6); // central differences, |F| ~ 100
  });

  it.each(points)('parameterDerivative at (%f, %f, %f), rho = %f is [0, x, 0]', (x, y, z, rho) => {
    const s = Float64Array.from([x, y, z]);
    const dp = sys.parameterDerivative(s, rho, new Float64Array(3));
    expect([...dp]).toEqual([0, x, 0]); // hand derivation above
    expect(maxAbsDiff(dp, fdParameter(sys, s, rho))).toBeLessThan(1e-7);
  });

  it('a jacobian output buffer with stale values is fully overwritten', () => {
    const out = new Float64Array(9).fill(123);
    sys.jacobian(Float64Array.from([1, 2, 3]), 28, out);
    expect(out[2]).toBe(0);
  });

  it('options.sweepParameter = sigma keeps rho at its document value 0', () => {
    const s = compileModelJson(lorenz, { sweepParameter: 'sigma', sweep: { from: 1, to: 20 } });
    expect(s.parameter).toBe('sigma');
    expect(s.sweep).toEqual({ from: 1, to: 20 });
    const x = Float64Array.from([1, 2, 3]);
    // Hand: with rho = 0, F = [p (y - x), -x z - y, x y - b z]; dF/dsigma = [y - x, 0, 0].
    expect([...s.rates(x, 4, new Float64Array(3))]).toEqual([4 * (2 - 1), -1 * 3 - 2, 1 * 2 - b * 3]);
    expect([...s.parameterDerivative(x, 4, new Float64Array(3))]).toEqual([1, 0, 0]);
  });
});

describe('derivatives of every allowed function', () => {
  // Each function applied to a non-trivial inner expression u = 0.3 * x + 0.2 * k inside its domain.
  const samples: Record<keyof typeof DOCUMENT_FUNCTIONS, string> = {
    exp: 'exp(u)', log: 'log(u + 2)', sqrt: 'sqrt(u + 2)', sin: 'sin(u)', cos: 'cos(u)', tan: 'tan(u)',
    asin: 'asin(u / 3)', acos: 'acos(u / 3)', atan: 'atan(u)', sinh: 'sinh(u)', cosh: 'cosh(u)',
    tanh: 'tanh(u)', abs: 'abs(u)', pow: 'pow(u + 2, k + 0.5)',
  };
  for (const [name, text] of Object.entries(samples)) {
    it(`${name}: jacobian and parameterDerivative agree with central differences`, () => {
      const expr = text.replaceAll('u', '(0.3 * x + 0.2 * k)');
      const sys = compileModelJson({
        format: 'brinkmap/ode-1', name: `derivative of ${name}`, variables: ['x'],
        parameters: { k: 0.5 }, rates: { x: expr }, sweep: { parameter: 'k', from: 0, to: 1 },
      });
      for (const [x, k] of [[0.7, 0.4], [-1.1, 0.9], [2.3, -0.6]]) {
        const s = Float64Array.from([x]);
        // Source: central differences (independent of the symbolic derivative).
        expect(Math.abs(sys.jacobian(s, k, new Float64Array(1))[0] - fdJacobian(sys, s, k)[0])).toBeLessThan(1e-7);
        expect(Math.abs(sys.parameterDerivative(s, k, new Float64Array(1))[0] - fdParameter(sys, s, k)[0])).toBeLessThan(1e-7);
      }
    });
  }

  it('abs has derivative sign(u), finite at u = 0 (a subgradient) instead of 0/0', () => {
    const sys = compileModelJson({
      format: 'brinkmap/ode-1', name: 'kink', variables: ['x'], parameters: { k: 1 },
      rates: { x: 'k * abs(x)' }, sweep: { parameter: 'k', from: 0, to: 1 },
    });
    expect(sys.jacobian(Float64Array.from([0]), 2, new Float64Array(1))[0]).toBe(0);
    expect(sys.jacobian(Float64Array.from([-3]), 2, new Float64Array(1))[0]).toBe(-2);
  });

  it('pi and e are constants unless the document names a parameter so', () => {
    const base = { format: 'brinkmap/ode-1', name: 'constants', variables: ['x'], sweep: { parameter: 'k', from: 0, to: 1 } };
    const a = compileModelJson({ ...base, parameters: { k: 1 }, rates: { x: 'pi * x + e' } });
    expect(a.rates(Float64Array.from([2]), 0, new Float64Array(1))[0]).toBe(Math.PI * 2 + Math.E);
    const c = compileModelJson({ ...base, parameters: { k: 1, e: 0.5 }, rates: { x: 'pi * x + e' } });
    expect(c.rates(Float64Array.from([2]), 0, new Float64Array(1))[0]).toBe(Math.PI * 2 + 0.5);
  });

  it('a symbol named like an internal code name cannot reach generated code unmapped', () => {
    const sys = compileModelJson({
      format: 'brinkmap/ode-1', name: 'names', variables: ['x', 'v0'], parameters: { k0: 2, q: 3, p: 5 },
      rates: { x: 'k0 * v0 + q', v0: 'p * x' }, sweep: { parameter: 'q', from: 0, to: 1 },
    });
    // Hand: F = [k0 v0 + q, p x] with k0 = 2, p = 5 fixed and q swept.
    expect([...sys.rates(Float64Array.from([7, 11]), 1.5, new Float64Array(2))]).toEqual([2 * 11 + 1.5, 5 * 7]);
    expect([...sys.jacobian(Float64Array.from([7, 11]), 1.5, new Float64Array(4))]).toEqual([0, 2, 5, 0]);
  });
});

describe('operands that both depend on the variable', () => {
  it('x^x, x / sin(x) and x * exp(x) differentiate like central differences', () => {
    const sys = compileModelJson({
      format: 'brinkmap/ode-1', name: 'both operands', variables: ['x', 'y'], parameters: { c: 1 },
      rates: { x: 'x^x + x / sin(x) * c', y: 'x * exp(x) * y^y' }, sweep: { parameter: 'c', from: 0, to: 2 },
    });
    for (const [x, y] of [[0.7, 1.3], [1.9, 0.4]]) {
      const s = Float64Array.from([x, y]);
      // Source: central differences (independent of the symbolic derivative).
      expect(maxAbsDiff(sys.jacobian(s, 1.2, new Float64Array(4)), fdJacobian(sys, s, 1.2))).toBeLessThan(1e-7);
      expect(maxAbsDiff(sys.parameterDerivative(s, 1.2, new Float64Array(2)), fdParameter(sys, s, 1.2))).toBeLessThan(1e-7);
    }
  });
});

describe('compile errors', () => {
  it('refuses a dense nonlinear 64-variable system whose symbolic Jacobian exceeds the cap, naming the rate', () => {
    const vars = Array.from({ length: 64 }, (_, i) => `x${i}`);
    const rate = `exp(sin(${vars.join(' * ')}) * cos(${vars.join(' + ')}))`;
    let error: unknown;
    try {
      compileModelJson({
        format: 'brinkmap/ode-1', name: 'dense', variables: vars, parameters: { c: 1 },
        rates: Object.fromEntries(vars.map((v) => [v, rate])), sweep: { parameter: 'c', from: 0, to: 1 },
      });
    } catch (err) {
      error = err;
    }
    expect(error).toBeInstanceOf(ModelError);
    expect((error as ModelError).message).toMatch(/^rates\.x\d+: the symbolic Jacobian grows beyond 500000 terms/);
  });

  it('throws ModelError naming rates.y for a bad rate', () => {
    const d = copy(lorenz);
    d.rates.y = 'x * (rho - w) - y';
    expect(() => compileModelJson(d)).toThrow(ModelError);
    expect(() => compileModelJson(d)).toThrow("rates.y: unknown symbol 'w' (allowed: x, y, z, sigma, rho, b)");
  });
});
