import { describe, expect, it } from 'vitest';
import { compileModel, compileModelJson, ModelError, validateModelDocument } from '../../../src/lib/model';
import { copy, threeLakes } from './fixtures';
import { fdJacobian, fdParameter, maxAbsDiff } from './numeric-helpers';

/*
 * Hand derivation for the three-lake example (issue 3):
 *   f(P; a, b) = a - b P + P^8 / (1 + P^8)
 *   f'(P) = -b + [8 P^7 (1 + P^8) - P^8 * 8 P^7] / (1 + P^8)^2 = -b + 8 P^7 / (1 + P^8)^2
 *   Links after expanding twoWay: upper->middle, middle->lower, lower->middle (all weight 1).
 *   With g(s, t) = s - t and states (u, m, l):
 *     F_u = f(u; a = 0.05)
 *     F_m = f(m; a = 0.07) + beta (u - m) + beta (l - m)
 *     F_l = f(l; a = 0.05) + beta (m - l)
 *   J = [[f'(u), 0, 0], [beta, f'(m) - 2 beta, beta], [0, beta, f'(l) - beta]]
 *   dF/dbeta = [0, (u - m) + (l - m), m - l]
 *   dF/da (sweep a; middle overrides a, so only upper and lower vary) = [1, 0, 1]
 */
const f = (P: number, a: number, b = 0.6) => a - b * P + P ** 8 / (1 + P ** 8);
const fp = (P: number, b = 0.6) => -b + (8 * P ** 7) / (1 + P ** 8) ** 2;

const samples: [number, number, number, number][] = [
  [0.3, 0.5, 1.1, 0.2],
  [0.05, 1.2, 0.9, 0.75],
  [1.4, 0.2, 0.6, 0.0],
];

describe('compileModelJson on the three-lake network (sweep over beta)', () => {
  const sys = compileModelJson(threeLakes);

  it('reports dimension, node ids as variables, the swept parameter, range and structure', () => {
    expect(sys.dimension).toBe(3);
    expect(sys.variables).toEqual(['upper', 'middle', 'lower']);
    expect(sys.parameter).toBe('beta');
    expect(sys.sweep).toEqual({ from: 0, to: 1 });
    expect(sys.start).toEqual([]);
    expect(sys.network?.nodeIds).toEqual(['upper', 'middle', 'lower']);
    expect(sys.network?.links).toEqual([
      { from: 0, to: 1, weight: 1 },
      { from: 1, to: 2, weight: 1 },
      { from: 2, to: 1, weight: 1 },
    ]);
    expect(sys.network?.sweepIsCoupling).toBe(true);
    expect(sys.network?.couplingValue).toBe(0);
  });

  it.each(samples)('rates at (%f, %f, %f), beta = %f match the hand-derived formula', (u, m, l, beta) => {
    const out = sys.rates(Float64Array.from([u, m, l]), beta, new Float64Array(3));
    // Source: hand derivation above.
    const expected = [f(u, 0.05), f(m, 0.07) + beta * (u - m) + beta * (l - m), f(l, 0.05) + beta * (m - l)];
    expect(maxAbsDiff(out, expected)).toBeLessThan(1e-15);
  });

  it.each(samples)('jacobian at (%f, %f, %f), beta = %f matches the hand formula and central differences', (u, m, l, beta) => {
    const x = Float64Array.from([u, m, l]);
    const J = sys.jacobian(x, beta, new Float64Array(9));
    // Source: hand derivation above.
    const hand = [fp(u), 0, 0, beta, fp(m) - 2 * beta, beta, 0, beta, fp(l) - beta];
    expect(maxAbsDiff(J, hand)).toBeLessThan(1e-14);
    // Source: independent computation, central differences of `rates` (truncation ~1e-10).
    expect(maxAbsDiff(J, fdJacobian(sys, x, beta))).toBeLessThan(1e-7);
  });

  it.each(samples)('parameterDerivative over beta at (%f, %f, %f) matches the hand formula and central differences', (u, m, l, beta) => {
    const x = Float64Array.from([u, m, l]);
    const dp = sys.parameterDerivative(x, beta, new Float64Array(3));
    expect(maxAbsDiff(dp, [0, u - m + (l - m), m - l])).toBeLessThan(1e-15); // hand derivation above
    expect(maxAbsDiff(dp, fdParameter(sys, x, beta))).toBeLessThan(1e-7); // central differences
  });

  it('elementRate and elementDerivative give the uncoupled element of each node with its own a', () => {
    const net = sys.network!;
    expect(net.elementRate(0, 0.4, 0.3)).toBeCloseTo(f(0.4, 0.05), 15);
    expect(net.elementRate(1, 0.4, 0.3)).toBeCloseTo(f(0.4, 0.07), 15);
    expect(net.elementDerivative(2, 1.3, 0.3)).toBeCloseTo(fp(1.3), 14);
  });

  it('does not mutate its input vector', () => {
    const x = Float64Array.from([0.3, 0.5, 1.1]);
    sys.rates(x, 0.5, new Float64Array(3));
    sys.jacobian(x, 0.5, new Float64Array(9));
    sys.parameterDerivative(x, 0.5, new Float64Array(3));
    expect([...x]).toEqual([0.3, 0.5, 1.1]);
  });
});

describe('compileModel with the sweep over an element parameter a that node "middle" overrides', () => {
  const doc = copy(threeLakes);
  doc.coupling.value = 0.25;
  doc.sweep = { parameter: 'a', from: 0, to: 0.2 };
  const sys = compileModelJson(doc);
  const beta = 0.25;

  it.each([[0.3, 0.5, 1.1, 0.01], [0.9, 1.3, 0.2, 0.12]])('rates at (%f, %f, %f), a = %f vary a on upper and lower only', (u, m, l, a) => {
    const out = sys.rates(Float64Array.from([u, m, l]), a, new Float64Array(3));
    // Hand derivation above with beta = 0.25 fixed; middle keeps its own a = 0.07.
    const expected = [f(u, a), f(m, 0.07) + beta * (u - m) + beta * (l - m), f(l, a) + beta * (m - l)];
    expect(maxAbsDiff(out, expected)).toBeLessThan(1e-15);
  });

  it('parameterDerivative is [1, 0, 1] (hand derivation) and agrees with central differences', () => {
    const x = Float64Array.from([0.3, 0.5, 1.1]);
    const dp = sys.parameterDerivative(x, 0.04, new Float64Array(3));
    expect([...dp]).toEqual([1, 0, 1]);
    expect(maxAbsDiff(dp, fdParameter(sys, x, 0.04))).toBeLessThan(1e-7);
    expect(sys.network?.sweepIsCoupling).toBe(false);
    expect(sys.network?.couplingValue).toBe(0.25);
  });

  it('jacobian agrees with central differences', () => {
    const x = Float64Array.from([0.7, 1.05, 0.4]);
    expect(maxAbsDiff(sys.jacobian(x, 0.1, new Float64Array(9)), fdJacobian(sys, x, 0.1))).toBeLessThan(1e-7);
  });

  it('a coupling term using the swept parameter adds beta * w * dg/da on free receiving nodes', () => {
    const d = copy(doc);
    d.coupling.term = 'a * source';
    const s = compileModelJson(d);
    const [u, m, l] = [0.3, 0.5, 1.1];
    const x = Float64Array.from([u, m, l]);
    const dp = s.parameterDerivative(x, 0.04, new Float64Array(3));
    // Hand: F_l = f(l; a) + beta * a * m, so dF_l/da = 1 + beta * m; middle overrides a -> 0; upper has no inflow -> 1.
    expect(maxAbsDiff(dp, [1, 0, 1 + beta * m])).toBeLessThan(1e-15);
    expect(maxAbsDiff(dp, fdParameter(s, x, 0.04))).toBeLessThan(1e-7);
  });

  it('elementRate uses p on nodes that do not override a and the node value otherwise', () => {
    expect(sys.network!.elementRate(0, 0.4, 0.11)).toBeCloseTo(f(0.4, 0.11), 15);
    expect(sys.network!.elementRate(1, 0.4, 0.11)).toBeCloseTo(f(0.4, 0.07), 15);
  });

  it('options.sweepParameter switches the sweep back to beta, keeping a at its document values', () => {
    const s = compileModel(doc, { sweepParameter: 'beta' });
    expect(s.parameter).toBe('beta');
    const [u, m, l] = [0.3, 0.5, 1.1];
    const out = s.rates(Float64Array.from([u, m, l]), 0.5, new Float64Array(3));
    // Hand derivation above with beta = 0.5 and the document's a values.
    const expected = [f(u, 0.05), f(m, 0.07) + 0.5 * (u - m) + 0.5 * (l - m), f(l, 0.05) + 0.5 * (m - l)];
    expect(maxAbsDiff(out, expected)).toBeLessThan(1e-15);
  });
});

describe('coupling terms', () => {
  const x = Float64Array.from([0.3, 0.5, 1.1]);
  const [u, m, l] = x;
  const beta = 0.4;

  it('"source" (linear forcing): F_m = f(m) + beta (u + l), J middle row [beta, f\'(m), beta]', () => {
    const d = copy(threeLakes);
    d.coupling.term = 'source';
    const s = compileModelJson(d);
    const out = s.rates(x, beta, new Float64Array(3));
    // Hand: g = s, so g_s = 1 and g_t = 0.
    expect(maxAbsDiff(out, [f(u, 0.05), f(m, 0.07) + beta * (u + l), f(l, 0.05) + beta * m])).toBeLessThan(1e-15);
    const J = s.jacobian(x, beta, new Float64Array(9));
    expect(maxAbsDiff(J, [fp(u), 0, 0, beta, fp(m), beta, 0, beta, fp(l)])).toBeLessThan(1e-14);
    expect(maxAbsDiff(J, fdJacobian(s, x, beta))).toBeLessThan(1e-7);
  });

  it('"(source + 1) / 2" (tipped fraction): g_s = 1/2, g_t = 0', () => {
    const d = copy(threeLakes);
    d.coupling.term = '(source + 1) / 2';
    const s = compileModelJson(d);
    const out = s.rates(x, beta, new Float64Array(3));
    const expected = [f(u, 0.05), f(m, 0.07) + beta * ((u + 1) / 2 + (l + 1) / 2), f(l, 0.05) + beta * ((m + 1) / 2)];
    expect(maxAbsDiff(out, expected)).toBeLessThan(1e-15);
    const J = s.jacobian(x, beta, new Float64Array(9));
    expect(maxAbsDiff(J, [fp(u), 0, 0, beta / 2, fp(m), beta / 2, 0, beta / 2, fp(l)])).toBeLessThan(1e-14);
    expect(maxAbsDiff(s.parameterDerivative(x, beta, new Float64Array(3)), fdParameter(s, x, beta))).toBeLessThan(1e-7);
  });

  it('default term is "source - target" when coupling.term is left out', () => {
    const d = copy(threeLakes);
    delete d.coupling.term;
    const v = validateModelDocument(d);
    expect(v.ok && v.document.format === 'brinkmap/network-1' && v.document.coupling.term).toBe('source - target');
    const a = compileModelJson(d).rates(x, beta, new Float64Array(3));
    const b = compileModelJson(threeLakes).rates(x, beta, new Float64Array(3));
    expect([...a]).toEqual([...b]);
  });

  it('weights, a self-link and a nonlinear term agree with central differences', () => {
    const d = copy(threeLakes);
    d.coupling.term = 'tanh(source - target) * b';
    d.links = [
      { from: 'upper', to: 'middle', weight: 0.7 },
      { from: 'lower', to: 'upper', weight: -1.5, twoWay: true },
      { from: 'lower', to: 'lower', weight: 2 },
    ];
    const s = compileModelJson(d);
    expect(s.network?.links.length).toBe(4);
    for (const p of [0.1, 0.9]) {
      expect(maxAbsDiff(s.jacobian(x, p, new Float64Array(9)), fdJacobian(s, x, p))).toBeLessThan(1e-7);
      expect(maxAbsDiff(s.parameterDerivative(x, p, new Float64Array(3)), fdParameter(s, x, p))).toBeLessThan(1e-7);
    }
  });
});

describe('parameter names that exist on Object.prototype', () => {
  it('"constructor" and "toString" are ordinary parameters, not inherited properties', () => {
    const d = copy(threeLakes);
    d.element.rate = 'constructor - toString * P';
    d.element.parameters = { constructor: 0.05, toString: 0.6 };
    d.nodes[1].parameters = { constructor: 0.07 };
    const s = compileModelJson(d);
    const out = s.rates(Float64Array.from([1, 2, 3]), 0, new Float64Array(3));
    // Hand: with beta = 0 each node is c - 0.6 P with its own c.
    expect([...out]).toEqual([0.05 - 0.6 * 1, 0.07 - 0.6 * 2, 0.05 - 0.6 * 3]);
  });
});

describe('compileModel contract', () => {
  it('throws ModelError naming options.sweepParameter for an unknown parameter', () => {
    const v = validateModelDocument(threeLakes);
    if (!v.ok) throw new Error('fixture invalid');
    expect(() => compileModel(v.document, { sweepParameter: 'gamma' })).toThrow(ModelError);
    expect(() => compileModel(v.document, { sweepParameter: 'gamma' })).toThrow(/^options\.sweepParameter: unknown parameter 'gamma'/);
  });

  it('validates hand-built objects too and names the field in a one-line message', () => {
    const d = copy(threeLakes);
    d.element.rate = 'a - c * P';
    let error: unknown;
    try {
      compileModel(d);
    } catch (err) {
      error = err;
    }
    expect(error).toBeInstanceOf(ModelError);
    expect((error as ModelError).message).toBe("element.rate: unknown symbol 'c' (allowed: P, a, b)");
    expect((error as ModelError).issues).toEqual([{ path: 'element.rate', message: "unknown symbol 'c' (allowed: P, a, b)" }]);
  });

  it('compiles a 64-node chain within the caps', () => {
    const nodes = Array.from({ length: 64 }, (_, i) => ({ id: `n${i}` }));
    const links = nodes.slice(1).map((node, i) => ({ from: nodes[i].id, to: node.id, weight: 1 }));
    const s = compileModelJson({ ...copy(threeLakes), nodes, links });
    expect(s.dimension).toBe(64);
    const x = Float64Array.from({ length: 64 }, (_, i) => 0.1 + 0.02 * i);
    expect(maxAbsDiff(s.jacobian(x, 0.3, new Float64Array(64 * 64)), fdJacobian(s, x, 0.3))).toBeLessThan(1e-7);
  });
});
