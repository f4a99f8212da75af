import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { compileModelJson } from '../../../src/lib/model/index.js';

// Shallow-lake phosphorus model P' = a - b P + P^q / (1 + P^q) (Carpenter, Ludwig & Brock 1999,
// Ecological Applications 9(3)), q = 8, b = 0.6 (invented parameter choice), swept in the loading a.
const b = 0.6;
const lake = {
  format: 'brinkmap/ode-1',
  name: 'One shallow lake (invented parameters)',
  variables: ['P'],
  parameters: { a: 0, b },
  rates: { P: 'a - b * P + P^8 / (1 + P^8)' },
  sweep: { parameter: 'a', from: -0.3, to: 0.6 },
};

/**
 * Independent computation of the folds. With g(P) = P^8/(1+P^8): f = a - bP + g(P) = 0 and
 * f_P = -b + g'(P) = 0, g'(P) = 8 P^7 / (1 + P^8)^2. g'' = 8 P^6 (7 (1 + P^8) - 16 P^8) / (1 + P^8)^3
 * vanishes at P_m = (7/9)^(1/8), where g' is largest, so g'(P) = b has one root on each side of P_m
 * (for b < g'(P_m)); each is found by bisection and gives a = b P - g(P).
 */
function foldsByBisection(): { P: number; a: number }[] {
  const g = (P: number) => P ** 8 / (1 + P ** 8);
  const dg = (P: number) => (8 * P ** 7) / (1 + P ** 8) ** 2;
  const pm = (7 / 9) ** (1 / 8);
  const bisect = (lo: number, hi: number) => {
    const h = (P: number) => dg(P) - b;
    for (let i = 0; i < 200; i++) {
      const m = 0.5 * (lo + hi);
      if (h(m) * h(lo) > 0) lo = m;
      else hi = m;
    }
    return 0.5 * (lo + hi);
  };
  return [bisect(1e-6, pm), bisect(pm, 10)].map((P) => ({ P, a: b * P - g(P) }));
}

describe('traceDiagram on the shallow-lake model', () => {
  it('locates the two saddle-nodes in a where the fold conditions say (bisection on g\'(P) = b)', () => {
    const ref = foldsByBisection().sort((u, v) => u.a - v.a);
    expect(ref[0].a).toBeLessThan(ref[1].a);
    const d = traceDiagram(compileModelJson(lake));
    const folds = d.bifurcations.filter((s) => s.type === 'saddle-node');
    expect(folds).toHaveLength(2);
    expect(d.bifurcations).toHaveLength(2);
    for (let i = 0; i < 2; i++) {
      expect(Math.abs(folds[i].p - ref[i].a)).toBeLessThan(1e-10);
      expect(Math.abs(folds[i].x[0] - ref[i].P)).toBeLessThan(1e-7);
      // The location bracket itself is below the 1e-10 asked for in p.
      expect(folds[i].evidence.parameterBracket as number).toBeLessThan(1e-10);
    }
    // One S-shaped branch from the single clear-water equilibrium at a = -0.3 to the turbid one at a = 0.6.
    expect(d.branches).toHaveLength(1);
    const pts = d.branches[0].points;
    expect([pts[0].p, pts.at(-1)!.p].sort()).toEqual([-0.3, 0.6]);
    // The middle part between the folds is unstable (f_P > 0 there), the outer parts stable.
    const mid = pts.filter((q) => q.x[0] > Math.min(ref[0].P, ref[1].P) + 1e-3 && q.x[0] < Math.max(ref[0].P, ref[1].P) - 1e-3);
    expect(mid.length).toBeGreaterThan(0);
    for (const q of mid) expect(q.unstable).toBe(1);
    const outer = pts.filter((q) => q.x[0] < Math.min(ref[0].P, ref[1].P) - 1e-3 || q.x[0] > Math.max(ref[0].P, ref[1].P) + 1e-3);
    for (const q of outer) expect(q.unstable).toBe(0);
  });
});
