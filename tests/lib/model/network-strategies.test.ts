import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileModelJson, validateModelDocument, type NetworkDocument } from '../../../src/lib/model';
import { compileNetwork, UNROLL_MAX_LINKS } from '../../../src/lib/model/compile-network';
import { copy, threeLakes } from './fixtures';
import { maxAbsDiff } from './numeric-helpers';

function validated(d: unknown): NetworkDocument {
  const r = validateModelDocument(d);
  if (!r.ok || r.document.format !== 'brinkmap/network-1') throw new Error(JSON.stringify(r));
  return r.document;
}

const variants: [string, (d: any) => void][] = [
  ['sweep over beta, diffusive', () => {}],
  ['sweep over a with an override, beta = 0.3', (d) => { d.sweep = { parameter: 'a', from: 0, to: 0.2 }; d.coupling.value = 0.3; }],
  ['term using the swept a', (d) => { d.sweep = { parameter: 'a', from: 0, to: 0.2 }; d.coupling.value = 0.3; d.coupling.term = 'a * source - b * target^2'; }],
  ['tipped-fraction term, weights and a self-link', (d) => {
    d.coupling.term = '(source + 1) / 2';
    d.links = [{ from: 'upper', to: 'middle', weight: 0.4 }, { from: 'lower', to: 'upper', weight: -2, twoWay: true }, { from: 'middle', to: 'middle', weight: 1.5 }];
  }],
];

/*
 * The unrolled generator (per-node trees with inlined parameters) and the loop evaluator (per-node
 * parameter vectors) assemble rates, Jacobian and parameter derivative independently from the same
 * symbolic pieces; they must agree (independent computation).
 */
describe('compileNetwork: unrolled and loop strategies agree', () => {
  for (const [title, edit] of variants) {
    it(title, () => {
      const d = copy(threeLakes);
      edit(d);
      const doc = validated(d);
      const a = compileNetwork(doc, doc.sweep.parameter, doc.sweep, 'unrolled');
      const b = compileNetwork(doc, doc.sweep.parameter, doc.sweep, 'loop');
      fc.assert(
        fc.property(
          fc.array(fc.double({ min: -2, max: 2, noNaN: true }), { minLength: 3, maxLength: 3 }),
          fc.double({ min: -1, max: 1, noNaN: true }),
          (xs, p) => {
            const x = Float64Array.from(xs);
            expect(maxAbsDiff(a.rates(x, p, new Float64Array(3)), b.rates(x, p, new Float64Array(3)))).toBeLessThan(1e-13);
            expect(maxAbsDiff(a.jacobian(x, p, new Float64Array(9)), b.jacobian(x, p, new Float64Array(9)))).toBeLessThan(1e-12);
            expect(maxAbsDiff(a.parameterDerivative(x, p, new Float64Array(3)), b.parameterDerivative(x, p, new Float64Array(3)))).toBeLessThan(1e-12);
          },
        ),
        { numRuns: 200 },
      );
    });
  }

  it(`switches to loops above ${UNROLL_MAX_LINKS} directed links and still matches the unrolled form`, () => {
    const nodes = Array.from({ length: 40 }, (_, i) => ({ id: `n${i}` }));
    const links = nodes.flatMap((a, i) => nodes.filter((_, j) => j !== i).map((b) => ({ from: a.id, to: b.id, weight: 1 / (1 + i) })));
    expect(links.length).toBeGreaterThan(UNROLL_MAX_LINKS);
    const doc = validated({ ...copy(threeLakes), nodes, links });
    const auto = compileModelJson(doc);
    const unrolled = compileNetwork(doc, 'beta', doc.sweep, 'unrolled');
    const x = Float64Array.from({ length: 40 }, (_, i) => Math.sin(i));
    expect(maxAbsDiff(auto.rates(x, 0.2, new Float64Array(40)), unrolled.rates(x, 0.2, new Float64Array(40)))).toBeLessThan(1e-12);
    expect(maxAbsDiff(auto.jacobian(x, 0.2, new Float64Array(1600)), unrolled.jacobian(x, 0.2, new Float64Array(1600)))).toBeLessThan(1e-12);
  });
});

describe('integer powers compiled to multiplications', () => {
  it('x^k for k = -32..32 agrees with Math.pow to a few ulp, for negative and positive bases', () => {
    for (let k = -32; k <= 32; k++) {
      const sys = compileModelJson({
        format: 'brinkmap/ode-1', name: 'power', variables: ['x'], parameters: { c: 1 },
        rates: { x: `c * x ^ ${k}` }, sweep: { parameter: 'c', from: 0, to: 1 },
      });
      for (const x of [-1.7, -0.3, 0.45, 1.3, 2.9]) {
        const got = sys.rates(Float64Array.from([x]), 1, new Float64Array(1))[0];
        const want = Math.pow(x, k); // independent computation: the platform's pow
        expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-14 * Math.abs(want));
        // d/dx c x^k = c k x^(k-1) (power rule)
        const d = sys.jacobian(Float64Array.from([x]), 1, new Float64Array(1))[0];
        expect(Math.abs(d - k * Math.pow(x, k - 1))).toBeLessThanOrEqual(1e-13 * Math.max(1, Math.abs(k * Math.pow(x, k - 1))));
      }
    }
  });
});
