import { eigs } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { compileModelJson } from '../../../src/lib/model/index.js';

const sigma = 10;
const b = 8 / 3;
const lorenz = {
  format: 'brinkmap/ode-1',
  name: 'Lorenz system',
  variables: ['x', 'y', 'z'],
  parameters: { sigma, rho: 0, b },
  rates: { x: 'sigma * (y - x)', y: 'x * (rho - z) - y', z: 'x * y - b * z' },
  sweep: { parameter: 'rho', from: 0, to: 30 },
  start: [[0, 0, 0]],
};

describe('traceDiagram on the Lorenz system (sigma = 10, b = 8/3, rho swept over [0, 30])', () => {
  const system = compileModelJson(lorenz);
  const d = traceDiagram(system);

  it('finds the pitchfork at rho = 1 on the origin branch (Lorenz 1963; Sparrow 1982, ch. 1)', () => {
    // At the origin J = [[-sigma, sigma, 0], [rho, -1, 0], [0, 0, -b]]; det of the upper block is
    // sigma (1 - rho), zero at rho = 1, and the symmetry (x, y, z) -> (-x, -y, z) makes it a pitchfork.
    const pf = d.bifurcations.filter((s) => s.type === 'pitchfork');
    expect(pf).toHaveLength(1);
    expect(Math.abs(pf[0].p - 1)).toBeLessThan(1e-9);
    expect(pf[0].x.every((v) => Math.abs(v) < 1e-9)).toBe(true);
    expect(pf[0].branches).toHaveLength(2);
  });

  it('finds the Hopf point rho = sigma (sigma + b + 3) / (sigma - b - 1) = 470/19 on both non-trivial equilibria', () => {
    // At C+- = (+-sqrt(b (rho - 1)), same, rho - 1) the characteristic polynomial is
    //   lambda^3 + (sigma + b + 1) lambda^2 + b (sigma + rho) lambda + 2 b sigma (rho - 1) = 0.
    // lambda = i omega: the imaginary part gives omega^2 = b (sigma + rho), the real part
    // (sigma + b + 1) omega^2 = 2 b sigma (rho - 1); together rho_H = sigma (sigma + b + 3) / (sigma - b - 1),
    // = 470/19 for sigma = 10, b = 8/3 (Sparrow 1982, §1.3).
    const rhoH = (sigma * (sigma + b + 3)) / (sigma - b - 1);
    expect(rhoH).toBeCloseTo(470 / 19, 12);
    const hopf = d.bifurcations.filter((s) => s.type === 'hopf');
    expect(hopf).toHaveLength(2);
    for (const h of hopf) {
      expect(Math.abs(h.p - rhoH)).toBeLessThan(1e-9);
      const xc = Math.sqrt(b * (rhoH - 1));
      expect(Math.abs(Math.abs(h.x[0]) - xc)).toBeLessThan(1e-8);
      expect(Math.abs(h.x[2] - (rhoH - 1))).toBeLessThan(1e-8);
      // Frequency from the derivation above ...
      expect(Math.abs(h.frequency! - Math.sqrt(b * (sigma + rhoH)))).toBeLessThan(1e-8);
      // ... and from an independent eigenvalue computation (mathjs eigs) of the compiled Jacobian there.
      const j = system.jacobian(Float64Array.from(h.x), h.p, new Float64Array(9));
      const m = [0, 1, 2].map((r) => [0, 1, 2].map((c) => j[r * 3 + c]));
      const values = eigs(m).values as unknown as ({ re: number; im: number } | number)[];
      const ims = values.map((v) => (typeof v === 'number' ? 0 : Math.abs(v.im)));
      expect(Math.abs(Math.max(...ims) - h.frequency!)).toBeLessThan(1e-8);
    }
    // Mirror images: different states, both reported.
    expect(Math.sign(hopf[0].x[0])).not.toBe(Math.sign(hopf[1].x[0]));
  });

  it('counts unstable eigenvalues: the origin has one for rho > 1; C+- gain two past the Hopf point', () => {
    const origin = d.branches.find((br) => br.points.every((q) => q.x.every((v) => v === 0)))!;
    for (const q of origin.points) if (Math.abs(q.p - 1) > 1e-6) expect(q.unstable).toBe(q.p > 1 ? 1 : 0);
    const other = d.branches.find((br) => br !== origin)!;
    const rhoH = 470 / 19;
    for (const q of other.points) {
      if (q.p > 1 + 1e-6 && Math.abs(q.p - rhoH) > 1e-6) expect(q.unstable).toBe(q.p > rhoH ? 2 : 0);
    }
    expect(d.branches).toHaveLength(2);
  });

  it('does not report the neutral saddle on the origin branch as a Hopf point', () => {
    // At the origin the eigenvalues -b and the roots of lambda^2 + (sigma + 1) lambda + sigma (1 - rho);
    // a real pair lambda, -lambda (sum zero) occurs where one of them equals +b: b^2 + 11 b + 10 (1 - rho) = 0,
    // rho = 1 + b (b + 11)/10 = 4.6444..., where only real eigenvalues meet the pair-sum test.
    expect(d.bifurcations.some((s) => Math.abs(s.p - (1 + (b * (b + 11)) / 10)) < 1e-3)).toBe(false);
    expect(d.diagnostics.some((g) => g.code === 'neutral-saddle')).toBe(true);
  });
});
