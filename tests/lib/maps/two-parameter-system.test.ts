import { describe, expect, it } from 'vitest';
import { compileModelJson, ModelError } from '../../../src/lib/model/index';
import { compileTwoParameter } from '../../../src/lib/maps/index';
import { cubicNetwork } from '../regimes/fixtures';

// Invented test models (no real data). A network with a nonlinear coupling term and node overrides,
// and an explicit ODE using both parameters nonlinearly, so every second derivative is nonzero.
const network = {
  ...cubicNetwork({ r: 0.1, nodes: ['p', 'q', 'w'], links: [{ from: 'p', to: 'q', twoWay: true, weight: 0.7 }, { from: 'q', to: 'w', weight: 1.3 }], nodeR: { w: 0.05 }, term: 'tanh(source - target) * (1 + r * target^2)' }),
};
const ode = {
  format: 'brinkmap/ode-1', name: 'invented two-variable system', variables: ['u', 'v'],
  rates: { u: 'a * u - u^3 + b * sin(v) * u', v: 'exp(-a * v) - b * v + u * v^2' },
  parameters: { a: 0.3, b: 1.2, c: 2 }, sweep: { parameter: 'a', from: 0, to: 1 },
};

/** Central differences (step 1e-5, error O(h^2) ~ 1e-10 times the third derivative), an independent computation. */
function centralDiff(f: (t: number) => number, t: number, h = 1e-5): number {
  return (f(t + h) - f(t - h)) / (2 * h);
}

describe('compileTwoParameter (both document forms)', () => {
  for (const [name, doc, second, x0, a0, b0] of [
    ['network, second = element parameter r', network, 'r', [0.3, -0.8, 1.1], 0.4, 0.12],
    ['network, second = coupling (sweep r)', { ...network, sweep: { parameter: 'r', from: 0, to: 0.3 } }, 'beta', [0.3, -0.8, 1.1], 0.12, 0.4],
    ['ode', ode, 'b', [0.7, -0.4], 0.3, 1.2],
  ] as const) {
    it(`${name}: J_x, F_a, F_b and the second derivatives agree with central differences of F and J to 1e-7`, () => {
      const sys = compileTwoParameter(doc, { second });
      const n = sys.dimension;
      const x = Float64Array.from(x0);
      const F = (xx: Float64Array, a: number, b: number) => sys.rates(xx, a, b, new Float64Array(n));
      const J = (xx: Float64Array, a: number, b: number) => sys.jacobian(xx, a, b, new Float64Array(n * n));
      const j = J(x, a0, b0);
      const fa = new Float64Array(n);
      const fb = new Float64Array(n);
      sys.parameterDerivatives(x, a0, b0, fa, fb);
      const v = Float64Array.from({ length: n }, (_, i) => 0.3 + 0.2 * i);
      const h = sys.secondState(x, a0, b0, v, new Float64Array(n * n));
      const ja = new Float64Array(n);
      const jb = new Float64Array(n);
      sys.secondParameter(x, a0, b0, v, ja, jb);
      const Jv = (xx: Float64Array, a: number, b: number) => {
        const m = J(xx, a, b);
        return Array.from({ length: n }, (_, i) => v.reduce((s, vk, k) => s + m[i * n + k] * vk, 0));
      };
      for (let i = 0; i < n; i++) {
        for (let k = 0; k < n; k++) {
          const shifted = (t: number) => { const y = Float64Array.from(x); y[k] = t; return y; };
          expect(Math.abs(j[i * n + k] - centralDiff((t) => F(shifted(t), a0, b0)[i], x[k]))).toBeLessThan(1e-7);
          expect(Math.abs(h[i * n + k] - centralDiff((t) => Jv(shifted(t), a0, b0)[i], x[k]))).toBeLessThan(1e-7);
        }
        expect(Math.abs(fa[i] - centralDiff((t) => F(x, t, b0)[i], a0))).toBeLessThan(1e-7);
        expect(Math.abs(fb[i] - centralDiff((t) => F(x, a0, t)[i], b0))).toBeLessThan(1e-7);
        expect(Math.abs(ja[i] - centralDiff((t) => Jv(x, t, b0)[i], a0))).toBeLessThan(1e-7);
        expect(Math.abs(jb[i] - centralDiff((t) => Jv(x, a0, t)[i], b0))).toBeLessThan(1e-7);
      }
    });

    it(`${name}: at a fixed second value the rates equal today's one-parameter compiler's (document with that value) to 1e-14`, () => {
      const sys = compileTwoParameter(doc, { second });
      const n = sys.dimension;
      const one = sys.atSecond(b0);
      const x = Float64Array.from(x0);
      const f2 = sys.rates(x, a0, b0, new Float64Array(n));
      const f1 = one.rates(x, a0, new Float64Array(n));
      for (let i = 0; i < n; i++) expect(Math.abs(f2[i] - f1[i])).toBeLessThan(1e-14);
      // And the plain compile of the document is untouched by the maps layer: its value at b = document value.
      const plain = compileModelJson(doc).rates(x, a0, new Float64Array(n));
      const atDoc = sys.rates(x, a0, sys.secondValue, new Float64Array(n));
      for (let i = 0; i < n; i++) expect(Math.abs(plain[i] - atDoc[i])).toBeLessThan(1e-14);
    });
  }

  it('names the field "second" for an unknown, swept or everywhere-overridden second parameter', () => {
    const issue = (f: () => unknown) => { try { f(); } catch (e) { return (e as ModelError).issues[0]; } return null; };
    expect(issue(() => compileTwoParameter(network, { second: 'zz' }))).toMatchObject({ path: 'second' });
    expect(issue(() => compileTwoParameter(network, { second: 'beta' }))?.message).toMatch(/already the swept parameter/);
    const all = cubicNetwork({ r: 0.1, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }], nodeR: { p: 0.1, q: 0.2 } });
    expect(issue(() => compileTwoParameter(all, { second: 'r' }))?.message).toMatch(/every node overrides/);
    expect(issue(() => compileTwoParameter({ ...ode, rates: { u: 'zz' } }, { second: 'b' }))).not.toBeNull();
  });
});
