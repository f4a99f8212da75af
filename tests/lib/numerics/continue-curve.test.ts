import { describe, expect, it } from 'vitest';
import { continueCurve, type CurveOptions } from '../../../src/lib/numerics/continue-curve';
import type { ExtendedSystem } from '../../../src/lib/numerics/extended-system';

/**
 * The one pseudo-arclength driver (src/lib/numerics/continue-curve.ts) on a hand-written extended
 * system: the unit circle G(x, p) = x^2 + p^2 - 1 = 0 in y = (x, p), DG = [2x, 2p]. Derivation: the
 * curve is closed with arclength 2 pi, and every accepted point satisfies G = 0 to the corrector's
 * residual tolerance; with p bounded to [-2, 0.5] the curve leaves the box at p = 0.5, where
 * x = ±sqrt(1 - 0.25) = ±sqrt(3)/2.
 */
const circle: ExtendedSystem = {
  size: 2,
  parameterIndex: [1],
  stateIndex: [0],
  residual: (y, out) => { out[0] = y[0] * y[0] + y[1] * y[1] - 1; },
  jacobian: (y, out) => { out[0] = 2 * y[0]; out[1] = 2 * y[1]; },
};
const o: CurveOptions = {
  lo: [-2], hi: [2], initialStep: 0.01, minStep: 1e-9, maxStep: 0.05, maxParameterStep: [0.05], maxTurn: 0.15,
  maxPoints: 5000, stateBound: 1e6, residualTolerance: 1e-12, stepTolerance: 1e-12, maxCorrectorIterations: 8,
};
const start = () => ({ y: Float64Array.from([1, 0]), t: Float64Array.from([0, 1]) });

describe('continueCurve on the unit circle', () => {
  it('closes the loop after an arclength of 2 pi, every point on the circle', () => {
    const { y, t } = start();
    const r = continueCurve(circle, y, t, o);
    expect(r.end).toBe('closed-loop');
    let arc = 0;
    for (let i = 1; i < r.points.length; i++) arc += Math.hypot(r.points[i].y[0] - r.points[i - 1].y[0], r.points[i].y[1] - r.points[i - 1].y[1]);
    // Chords of a circle are shorter than the arcs: 2 pi (1 - O(h^2)) with h <= 0.05 (h^2/24 < 1.1e-4).
    expect(arc).toBeGreaterThan(2 * Math.PI * (1 - 2e-4));
    expect(arc).toBeLessThanOrEqual(2 * Math.PI);
    for (const q of r.points) expect(Math.abs(q.y[0] ** 2 + q.y[1] ** 2 - 1)).toBeLessThan(1e-12);
  });

  it('without closeLoops it goes round until the point cap', () => {
    const { y, t } = start();
    const r = continueCurve(circle, y, t, { ...o, closeLoops: false, maxPoints: 400 });
    expect(r.end).toBe('point-cap');
    expect(r.points).toHaveLength(400);
  });

  it('ends exactly on the parameter bound p = 0.5, at x = sqrt(3)/2', () => {
    const { y, t } = start();
    const r = continueCurve(circle, y, t, { ...o, hi: [0.5] });
    expect(r.end).toBe('parameter-bound');
    const last = r.points.at(-1)!;
    expect(last.y[1]).toBe(0.5);
    expect(Math.abs(last.y[0] - Math.sqrt(3) / 2)).toBeLessThan(1e-12);
  });

  it("ends with the caller's stop reason and on cancellation", () => {
    const { y, t } = start();
    const r = continueCurve<{ y: Float64Array; t: Float64Array }, 'upper-left'>(circle, y, t, o, { stop: (_a, b) => (b.y[0] < 0 && b.y[1] > 0 ? 'upper-left' : null) });
    expect(r.end).toBe('upper-left');
    expect(r.points.at(-1)!.y[0]).toBeLessThan(0);
    expect(r.points.at(-2)!.y[0]).toBeGreaterThanOrEqual(0);
    let calls = 0;
    const c = continueCurve(circle, start().y, start().t, o, { isCancelled: () => ++calls > 5 });
    expect(c.end).toBe('cancelled');
    expect(c.points).toHaveLength(6);
  });

  it('stores what the system makes of each point (point data with det [DG; t^T])', () => {
    const withDet: ExtendedSystem<{ y: Float64Array; t: Float64Array; det: number }> = { ...circle, point: (y, t, det) => ({ y, t, det }) };
    const { y, t } = start();
    const r = continueCurve(withDet, y, t, { ...o, maxPoints: 20 }, {}, 2);
    // det [2x 2p; t_x t_p] with t = (-p, x) (the counter-clockwise unit tangent): 2x^2 + 2p^2 = 2 on the circle.
    for (const q of r.points) expect(Math.abs(q.det - 2)).toBeLessThan(1e-9);
  });
});
