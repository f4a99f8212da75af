/** Example documents from issue 3 (invented demo data: a fictional chain of three lakes; Lorenz 1963). */
export const threeLakes = {
  format: 'brinkmap/network-1',
  name: 'Three lakes, downstream flow',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper' }, { id: 'middle', parameters: { a: 0.07 } }, { id: 'lower' }],
  links: [
    { from: 'upper', to: 'middle', weight: 1 },
    { from: 'middle', to: 'lower', weight: 1, twoWay: true },
  ],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
} as const;

export const lorenz = {
  format: 'brinkmap/ode-1',
  name: 'Lorenz system',
  variables: ['x', 'y', 'z'],
  parameters: { sigma: 10, rho: 0, b: 2.6666666666666665 },
  rates: { x: 'sigma * (y - x)', y: 'x * (rho - z) - y', z: 'x * y - b * z' },
  sweep: { parameter: 'rho', from: 0, to: 30 },
  start: [[0, 0, 0]],
} as const;

/** Deep copy as a mutable plain object, for tests that edit a field. */
export function copy<T>(value: T): any {
  return JSON.parse(JSON.stringify(value));
}
