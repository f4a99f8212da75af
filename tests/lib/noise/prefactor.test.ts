import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model';
import { noiseGraphAt } from '../../../src/lib/noise/graph-at';
import { eyringKramersPrefactor } from '../../../src/lib/noise/prefactor';
import { cubicNetwork, symmetricPairDiagram } from '../regimes/fixtures';

const re = (...v: number[]) => v.map((x) => ({ re: x, im: 0 }));

describe('eyringKramersPrefactor(state, saddle)', () => {
  it('gives sqrt(2) / (2 pi) for the double well x\' = x - x^3', () => {
    // V = x^4/4 - x^2/2: V''(-1) = 2, V''(0) = -1, so J(-1) = -2, J(0) = 1 and
    // C = 1/(2 pi) sqrt(2 / 1) (Kramers 1940; Berglund 2013: E tau = pi sqrt 2 exp(1 / (2 sigma^2)) = 1 / C e^{...}).
    const r = eyringKramersPrefactor(re(-2), re(1));
    expect(r.ok).toBe(true);
    expect(r.prefactor).toBeCloseTo(Math.SQRT2 / (2 * Math.PI), 15);
    expect(1 / r.prefactor).toBeCloseTo(Math.PI * Math.SQRT2, 14);
  });

  it('matches the closed-form Hessians of the gradient pair at every (state, saddle) pair', () => {
    // x1' = r + x1 - x1^3 + beta (x2 - x1), x2' likewise: F = -grad V with
    // V = sum_i (x_i^4/4 - x_i^2/2 - r x_i) + beta/2 (x1 - x2)^2, Hess V = -J with
    // J(x) = [[1 - 3 x1^2 - beta, beta], [beta, 1 - 3 x2^2 - beta]] (derived by hand). Direct evaluation:
    // det J and the eigenvalues tr/2 +- sqrt(tr^2/4 - det) of the 2x2 matrix, then
    // C = mu(s) / (2 pi) sqrt(|det J(m)| / |det J(s)|) (Berglund 2013, derivation in prefactor.ts).
    const r = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 1 } }));
    for (const beta of [0.1, 0.3]) {
      const g = noiseGraphAt(system, symmetricPairDiagram(r, 0, 1), beta);
      if (!g.ok) throw new Error(g.reason);
      const jac = (x: readonly number[]) => {
        const a11 = 1 - 3 * x[0] ** 2 - beta;
        const a22 = 1 - 3 * x[1] ** 2 - beta;
        const det = a11 * a22 - beta * beta;
        const tr = a11 + a22;
        return { det, top: tr / 2 + Math.sqrt((tr * tr) / 4 - det) };
      };
      let pairs = 0;
      g.graph.saddles.forEach((edge, e) => {
        for (const k of [edge.from, edge.to]) {
          const m = jac(g.graph.states[k].x);
          const s = jac(edge.x);
          const expected = (s.top / (2 * Math.PI)) * Math.sqrt(Math.abs(m.det) / Math.abs(s.det));
          const got = eyringKramersPrefactor(g.states[k].eigenvalues, g.saddles[e].eigenvalues);
          expect(got.ok).toBe(true);
          expect(got.prefactor / expected - 1).toBeCloseTo(0, 9);
          expect(got.unstableEigenvalue).toBeCloseTo(s.top, 9);
          pairs++;
        }
      });
      expect(pairs).toBeGreaterThanOrEqual(4);
    }
  });

  it('is not defined at a degenerate saddle, an unstable state or an index-2 saddle', () => {
    expect(eyringKramersPrefactor(re(-2, -1), re(1, 1e-12)).ok).toBe(false);
    expect(eyringKramersPrefactor(re(-2, 0.5), re(1, -1)).ok).toBe(false);
    expect(eyringKramersPrefactor(re(-2, -1), re(1, 1)).ok).toBe(false);
    expect(eyringKramersPrefactor(re(-2), re(1, -1)).reason).toMatch(/same/);
  });

  it('uses moduli for complex pairs at the state: |det J| = |lambda|^2', () => {
    // State with eigenvalues -1 +- 2i (|det| = 5) and saddle eigenvalues 1, -5 (|det| = 5): C = 1/(2 pi).
    const r = eyringKramersPrefactor([{ re: -1, im: 2 }, { re: -1, im: -2 }], re(1, -5));
    expect(r.prefactor).toBeCloseTo(1 / (2 * Math.PI), 15);
  });
});
