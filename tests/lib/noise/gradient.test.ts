import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model';
import { isGradient } from '../../../src/lib/noise/gradient';
import { cubicNetwork } from '../regimes/fixtures';

const points = [[-1, -0.9], [0.1, 1.2], [0.5, -0.3], [1.1, 1]];
const pair = (twoWay: boolean) =>
  compileModelJson(cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));

describe('isGradient(system, p, points, weights)', () => {
  it('is true for two cubic elements with symmetric diffusive coupling and equal weights', () => {
    // F = -grad V with V = sum(-r x - x^2/2 + x^4/4) + beta/2 (x1 - x2)^2 (derived: -dV/dx1 =
    // r + x1 - x1^3 + beta (x2 - x1)), so J = -Hess V is symmetric.
    const t = isGradient(pair(true), 0.3, points, new Float64Array([2, 2]));
    expect(t.gradient).toBe(true);
    expect(t.residual).toBe(0);
    expect(t.samples).toBe(4);
  });

  it('is false for a one-way link, with the asymmetry relative to the Jacobian scale', () => {
    // J = [[1 - 3 x1^2, 0], [beta, 1 - 3 x2^2 - beta]]: asymmetry beta, scale max(1, max |J_ij|) (derived).
    const beta = 0.3;
    const t = isGradient(pair(false), beta, [[0, 0]], new Float64Array([1, 1]));
    expect(t.gradient).toBe(false);
    // At (0, 0): J = [[1, 0], [0.3, 0.7]], scale 1, asymmetry 0.3.
    expect(t.residual).toBeCloseTo(beta, 12);
    expect(t.worst).toEqual([0, 0]);
  });

  it('is false for symmetric coupling when the noise weights differ (D^-1 J D is not symmetric)', () => {
    // Off-diagonals of D^-1 J D: beta w2 / w1 = 0.6 and beta w1 / w2 = 0.15 at beta = 0.3 (derived).
    const t = isGradient(pair(true), 0.3, [[0, 0]], new Float64Array([1, 2]));
    expect(t.gradient).toBe(false);
    expect(t.residual).toBeCloseTo(0.45 / 1, 12);
  });

  it('is false without sample points and true for any one-variable field', () => {
    expect(isGradient(pair(true), 0.3, [], new Float64Array([1, 1])).gradient).toBe(false);
    const ode = compileModelJson({ format: 'brinkmap/ode-1', name: 'double well (textbook)', variables: ['x'], parameters: { c: 0 },
      rates: { x: 'c + x - x^3' }, sweep: { parameter: 'c', from: -0.1, to: 0.1 } });
    expect(isGradient(ode, 0, [[-1], [0], [2]], new Float64Array([1])).gradient).toBe(true);
  });

  it('counts a non-finite Jacobian as not a gradient', () => {
    const ode = compileModelJson({ format: 'brinkmap/ode-1', name: 'singular (invented)', variables: ['x', 'y'], parameters: { c: 0 },
      rates: { x: 'c - x + y', y: 'sqrt(x) - y' }, sweep: { parameter: 'c', from: -0.1, to: 0.1 } });
    const t = isGradient(ode, 0, [[0, 0]], new Float64Array([1, 1]));
    expect(t.gradient).toBe(false);
  });
});
