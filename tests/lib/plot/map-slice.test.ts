import { describe, expect, it } from 'vitest';
import { documentAtSecond, snapSecond } from '../../../src/lib/plot/map-slice';

/** Invented documents. */
const network = {
  format: 'brinkmap/network-1', name: 'n', element: { variable: 'P', rate: 'a - b * P', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'u', parameters: { b: 0.7 } }, { id: 'l' }], links: [], coupling: { parameter: 'beta', value: 0 }, sweep: { parameter: 'beta', from: 0, to: 1 },
};
const ode = { format: 'brinkmap/ode-1', variables: ['x'], parameters: { a: 1, r: 2 }, rates: { x: 'a - x' }, sweep: { parameter: 'a', from: 0, to: 1 } };

describe('documentAtSecond(document, name, value)', () => {
  it('sets an element default and keeps node overrides and the input unchanged', () => {
    const out = documentAtSecond(network, 'b', 0.62) as typeof network;
    expect(out.element.parameters).toEqual({ a: 0.05, b: 0.62 });
    expect(out.nodes[0].parameters).toEqual({ b: 0.7 });
    expect(network.element.parameters.b).toBe(0.6);
  });
  it('sets the coupling value of a network and a parameter of an ode document', () => {
    expect((documentAtSecond({ ...network, sweep: { parameter: 'a', from: 0, to: 1 } }, 'beta', 0.3) as typeof network).coupling.value).toBe(0.3);
    expect((documentAtSecond(ode, 'r', 2.5) as typeof ode).parameters).toEqual({ a: 1, r: 2.5 });
  });
  it('returns null for an unknown parameter or a value that is not finite', () => {
    expect(documentAtSecond(network, 'nope', 1)).toBeNull();
    expect(documentAtSecond(ode, 'r', Number.NaN)).toBeNull();
  });
});

describe('snapSecond(value, range)', () => {
  it('rounds to the power of ten just below 1/1000 of the range and stays inside it', () => {
    // range 0.2: 0.2/1000 = 2e-4, step 1e-4
    expect(snapSecond(0.1234567, [0.05, 0.25])).toBe(0.1235);
    expect(snapSecond(0.0412, [0.05, 0.25])).toBe(0.05);
    expect(snapSecond(0.2999, [0.25, 0.05])).toBe(0.25);
    // range 40: step 0.01
    expect(snapSecond(-3.14159, [-20, 20])).toBe(-3.14);
  });
  it('leaves a value alone when the range is empty or the value is not finite', () => {
    expect(snapSecond(0.123456, [1, 1])).toBe(0.123456);
    expect(snapSecond(Number.NaN, [0, 1])).toBeNaN();
  });
});
