/** Invented cubic-element networks of issue 12 (scripts/bench.ts and measure-trace-blocks.ts): x' = r_i + x - x^3, r_i spread over [0.05, 0.15], diffusive links. */
export function cubicDoc(name: string, nodes: number, links: { from: number; to: number; twoWay?: boolean }[]) {
  return {
    format: 'brinkmap/network-1',
    name,
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: Array.from({ length: nodes }, (_, i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + (0.1 * i) / (nodes - 1) } })),
    links: links.map((l) => ({ from: `n${l.from + 1}`, to: `n${l.to + 1}`, weight: 1, ...(l.twoWay ? { twoWay: true } : {}) })),
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  };
}
export const chain = (k: number, twoWay: boolean) => Array.from({ length: k - 1 }, (_, i) => ({ from: i, to: i + 1, twoWay }));
export { diagramAgreement } from '../src/lib/atlas/diagram-agreement.js';
