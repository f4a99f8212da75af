import type { CompiledSystem } from '../model/compiled-system.js';
import { BorderedWorkspace, correct, nullSpace, tangentAt } from './bordered.js';
import { dist2, dot, normalized } from './vector.js';

export interface BranchSwitchOptions {
  /** Distance from the branch point at which points on both branches are computed (default 1e-3). */
  probeStep: number;
  /**
   * A branch counts as having zero parameter velocity at the point when its odd (linear) part
   * |p(+h) - p(-h)| / 2 is not larger than its even part |(p(+h) + p(-h))/2 - p*| and not larger than
   * zeroVelocityFloor * h (default 1e-9) in the flat case (see docs/numerics.md).
   */
  zeroVelocityFloor: number;
  /** Third singular value below this times the largest: more than two branches (default 1e-6). */
  extraNullTolerance: number;
  residualTolerance: number;
  stepTolerance: number;
}

export const defaultBranchSwitchOptions: BranchSwitchOptions = {
  probeStep: 1e-3,
  zeroVelocityFloor: 1e-9,
  extraNullTolerance: 1e-6,
  residualTolerance: 1e-12,
  stepTolerance: 1e-13,
};

export interface BranchProbe {
  readonly plus: Float64Array | null;
  readonly minus: Float64Array | null;
  /** |p(+h) - p(-h)| / 2. */
  readonly odd: number;
  /** |(p(+h) + p(-h)) / 2 - p*|. */
  readonly even: number;
  /** (p(+h) - p(-h)) / |y(+h) - y(-h)|: the branch's parameter velocity (p-component of its unit tangent). */
  readonly velocity: number;
  readonly zeroVelocity: boolean;
}

export interface BranchSwitchResult {
  readonly ok: boolean;
  readonly classification: 'pitchfork' | 'transcritical' | 'degenerate';
  readonly reason: string;
  /** Unit tangent of the traced branch at the point (projected onto the null space). */
  readonly along: Float64Array;
  /** Unit null vector of DH orthogonal to `along`: the switching direction. */
  readonly across: Float64Array;
  readonly singularValues: number[];
  readonly traced: BranchProbe;
  readonly crossing: BranchProbe;
  /** Unit tangents for continuing the new branch from crossing.plus / crossing.minus outward. */
  readonly plusTangent: Float64Array | null;
  readonly minusTangent: Float64Array | null;
  readonly plusDet: number;
  readonly minusDet: number;
}

/**
 * Branch switching at a simple branch point y* of H(y) = 0, where DH(y*) = [J_x | F_p] has a
 * two-dimensional null space (Keller 1977; Allgower & Georg, §8.1; Seydel, §5.6).
 * The null space comes from the SVD of DH; `along` is the traced tangent projected into it and
 * `across` the null vector orthogonal to it. Points on the crossing branch are found by Newton on
 * F(y) = 0, across . (y - y*) = +-h (the hyperplane meets the traced branch only O(sqrt h) away,
 * so the corrector converges to the crossing branch). The traced branch is probed the same way.
 * Classification: pitchfork when either branch has zero parameter velocity at y* (it bends back,
 * p - p* ~ s^2: the odd part of p(+-h) is not larger than the even part), transcritical when both
 * cross with nonzero velocity, degenerate when the null space looks larger than two or both branches
 * have zero velocity (Kuznetsov, §3.3 and §10.2.1; Seydel, §2.4).
 */
export function switchAtBranchPoint(
  system: CompiledSystem,
  yStar: Float64Array,
  tracedTangent: Float64Array,
  options: Partial<BranchSwitchOptions> = {},
): BranchSwitchResult {
  const o = { ...defaultBranchSwitchOptions, ...options };
  const n = system.dimension;
  const ws = new BorderedWorkspace(n);
  const ns = nullSpace(system, yStar, ws);
  const fail = (reason: string): BranchSwitchResult => ({
    ok: false,
    classification: 'degenerate',
    reason,
    along: tracedTangent,
    across: new Float64Array(n + 1),
    singularValues: ns.singularValues,
    traced: emptyProbe(),
    crossing: emptyProbe(),
    plusTangent: null,
    minusTangent: null,
    plusDet: Number.NaN,
    minusDet: Number.NaN,
  });
  if (ns.vectors.length < 2) return fail('null space could not be computed (non-finite Jacobian)');
  const [v0, v1] = ns.vectors;
  const a0 = dot(tracedTangent, v0);
  const a1 = dot(tracedTangent, v1);
  const along = normalized(v0.map((v, i) => a0 * v + a1 * v1[i]));
  if (!along.every(Number.isFinite) || Math.hypot(a0, a1) < 0.5) {
    return fail('the traced tangent is not in the two smallest singular directions of [J_x | F_p]');
  }
  const pick = Math.abs(a0) <= Math.abs(a1) ? v0 : v1;
  const k = dot(pick, along);
  const across = normalized(pick.map((v, i) => v - k * along[i]));
  const h = o.probeStep;
  const probe = (dir: Float64Array): { probe: BranchProbe; tPlus: Float64Array | null; tMinus: Float64Array | null; dPlus: number; dMinus: number } => {
    const ends: (Float64Array | null)[] = [];
    const tans: (Float64Array | null)[] = [];
    const dets: number[] = [];
    for (const sgn of [1, -1]) {
      const vdir = dir.map((v) => sgn * v);
      const guess = yStar.map((v, i) => v + h * vdir[i]);
      const res = correct(system, guess, vdir, dot(vdir, guess), ws, {
        residualTolerance: o.residualTolerance,
        stepTolerance: o.stepTolerance,
        maxIterations: 30,
        maxDisplacement: 10 * h,
      });
      if (!res.converged) {
        ends.push(null);
        tans.push(null);
        dets.push(Number.NaN);
        continue;
      }
      const tan = tangentAt(system, res.y, vdir, ws);
      ends.push(res.y);
      tans.push(tan.ok ? tan.tangent : null);
      dets.push(tan.determinant);
    }
    const [plus, minus] = ends;
    if (plus === null || minus === null) {
      return { probe: { plus, minus, odd: Number.NaN, even: Number.NaN, velocity: Number.NaN, zeroVelocity: false }, tPlus: tans[0], tMinus: tans[1], dPlus: dets[0], dMinus: dets[1] };
    }
    const pS = yStar[n];
    const odd = Math.abs(plus[n] - minus[n]) / 2;
    const even = Math.abs((plus[n] + minus[n]) / 2 - pS);
    const velocity = (plus[n] - minus[n]) / dist2(plus, minus);
    const zeroVelocity = odd <= Math.max(even, o.zeroVelocityFloor * h);
    return { probe: { plus, minus, odd, even, velocity, zeroVelocity }, tPlus: tans[0], tMinus: tans[1], dPlus: dets[0], dMinus: dets[1] };
  };
  const cross = probe(across);
  const trace = probe(along);
  const s = ns.singularValues;
  const smax = s[s.length - 1] || 1;
  const base = {
    along,
    across,
    singularValues: s,
    traced: trace.probe,
    crossing: cross.probe,
    plusTangent: cross.tPlus,
    minusTangent: cross.tMinus,
    plusDet: cross.dPlus,
    minusDet: cross.dMinus,
  };
  if (cross.probe.plus === null || cross.probe.minus === null) {
    return { ...base, ok: cross.probe.plus !== null || cross.probe.minus !== null, classification: 'degenerate', reason: 'the corrector did not converge on one or both sides of the crossing branch' };
  }
  if (s.length >= 3 && s[2] < o.extraNullTolerance * smax) {
    return { ...base, ok: true, classification: 'degenerate', reason: `three or more small singular values of [J_x | F_p] (${s.slice(0, 3).map((v) => v.toExponential(2)).join(', ')}): more than two branches may meet here` };
  }
  const zc = cross.probe.zeroVelocity;
  const zt = trace.probe.plus !== null && trace.probe.minus !== null && trace.probe.zeroVelocity;
  if (zc && zt) {
    return { ...base, ok: true, classification: 'degenerate', reason: 'both branches have zero parameter velocity at the point' };
  }
  if (zc || zt) {
    return { ...base, ok: true, classification: 'pitchfork', reason: `${zc ? 'crossing' : 'traced'} branch has zero parameter velocity (odd part ${(zc ? cross : trace).probe.odd.toExponential(3)} <= even part ${(zc ? cross : trace).probe.even.toExponential(3)} at probe step ${h})` };
  }
  return { ...base, ok: true, classification: 'transcritical', reason: `both branches cross with nonzero parameter velocity (crossing ${cross.probe.velocity.toPrecision(4)}, traced ${trace.probe.velocity.toPrecision(4)})` };
}

function emptyProbe(): BranchProbe {
  return { plus: null, minus: null, odd: Number.NaN, even: Number.NaN, velocity: Number.NaN, zeroVelocity: false };
}
