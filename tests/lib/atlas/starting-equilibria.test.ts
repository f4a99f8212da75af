import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { defaultTraceSettings, findStartingEquilibria, type ResolvedTraceSettings } from '../../../src/lib/atlas/index';

// Invented chain of four cubic elements r + x - x^3 with r = 0.03, two-way links of weight 0.5.
const chain = (from: number) => compileModelJson({
  format: 'brinkmap/network-1', name: 'four cubic nodes (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.03 } },
  nodes: ['n0', 'n1', 'n2', 'n3'].map((id) => ({ id })),
  links: [0, 1, 2].map((i) => ({ from: `n${i}`, to: `n${i + 1}`, weight: 0.5, twoWay: true })),
  coupling: { parameter: 'beta', value: 0 },
  sweep: { parameter: 'beta', from, to: 0.6 },
});

describe('findStartingEquilibria', () => {
  it('finds all 3^4 equilibria at a coupling of 5e-324 as it does at 0 (sweeps must not lose branches by starting off zero)', () => {
    // Derivation: each uncoupled cubic with |r| < 2/(3 sqrt 3) has three simple roots (Strogatz,
    // Nonlinear Dynamics and Chaos, ch. 3), so the uncoupled network has 3^4 = 81 hyperbolic
    // equilibria; a coupling of 5e-324 perturbs F by less than rounding, and each persists (implicit
    // function theorem). Before, a start off zero used quasi-random guesses only and found fewer.
    const settings = (from: number) => ({ ...defaultTraceSettings, from, to: 0.6 }) as ResolvedTraceSettings;
    const atZero = findStartingEquilibria(chain(0), 0, settings(0));
    const offZero = findStartingEquilibria(chain(5e-324), 5e-324, settings(5e-324));
    expect(atZero.method).toBe('uncoupled');
    expect(offZero.method).toBe('multi-start');
    expect(atZero.points).toHaveLength(81);
    expect(offZero.points).toHaveLength(81);
  });
});
