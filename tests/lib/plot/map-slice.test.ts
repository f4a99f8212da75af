import { describe, expect, it } from 'vitest';
import { documentAtSecond } from '../../../src/lib/plot/map-slice';

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
