import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram, Eigenvalue } from '../atlas/types';
import { newtonAtFixedParameter, spectrum } from './linear-algebra';
import { fmt } from './element-roles';

/** An equilibrium at one parameter value, refined and with its spectrum. */
export interface Equilibrium {
  readonly x: number[];
  /** Max norm of F at x after refinement. */
  readonly residual: number;
  readonly eigenvalues: Eigenvalue[];
  /** Eigenvalues with Re > tolerance. */
  readonly unstable: number;
  /** Eigenvalues with |Re| <= tolerance (non-hyperbolic when > 0). */
  readonly neutral: number;
  /** Index-1 saddles: the unstable eigenvalue and its unit eigenvector (largest component positive). */
  readonly unstableValue?: number;
  readonly unstableVector?: number[];
  /** Branch the starting guess came from. */
  readonly branch?: string;
}

export interface EquilibriaSettings {
  readonly newtonTolerance: number;
  readonly newtonMaxIterations: number;
  readonly duplicateTolerance: number;
  readonly hyperbolicTolerance: number;
}

export const isStable = (e: Equilibrium) => e.unstable === 0 && e.neutral === 0;
export const isIndexOneSaddle = (e: Equilibrium) => e.unstable === 1 && e.neutral === 0 && e.unstableVector !== undefined;

/**
 * Every equilibrium the diagram shows at parameter p: on each branch, every segment between
 * consecutive points whose parameter values enclose p gives a guess by linear interpolation in p,
 * refined by Newton's method at fixed p; converged points closer than duplicateTolerance
 * (max norm relative to 1 + |x|) are merged. Each gets the eigenvalues of J_x(x, p).
 */
export function equilibriaAt(
  system: CompiledSystem,
  diagram: Diagram,
  p: number,
  settings: EquilibriaSettings,
): { equilibria: Equilibrium[]; diagnostics: Diagnostic[] } {
  const guesses: { x: number[]; branch: string }[] = [];
  for (const b of diagram.branches) {
    const pts = b.points;
    for (let k = 0; k + 1 < pts.length; k++) {
      const a = pts[k];
      const c = pts[k + 1];
      if ((p - a.p) * (p - c.p) > 0) continue;
      const t = c.p === a.p ? 0.5 : (p - a.p) / (c.p - a.p);
      guesses.push({ x: a.x.map((v, i) => v + t * (c.x[i] - v)), branch: b.id });
    }
    if (pts.length === 1 && pts[0].p === p) guesses.push({ x: pts[0].x.slice(), branch: b.id });
  }
  const found: { x: Float64Array; residual: number; branch: string }[] = [];
  let failures = 0;
  for (const g of guesses) {
    const r = newtonAtFixedParameter(system, g.x, p, settings.newtonTolerance, settings.newtonMaxIterations);
    if (!r.converged) { failures++; continue; }
    if (found.some((f) => sameState(f.x, r.x, settings.duplicateTolerance))) continue;
    found.push({ x: r.x, residual: r.residual, branch: g.branch });
  }
  const diagnostics: Diagnostic[] = [];
  if (failures > 0) {
    diagnostics.push({ level: 'info', code: 'refine-failed', p,
      message: `${failures} of ${guesses.length} branch guesses at ${system.parameter} = ${fmt(p)} did not converge under Newton's method and were left out` });
  }
  return { equilibria: found.map((f) => analyseEquilibrium(system, f.x, p, f.residual, settings.hyperbolicTolerance, f.branch)), diagnostics };
}

/** Spectrum and saddle data of one equilibrium. */
export function analyseEquilibrium(system: CompiledSystem, x: Float64Array, p: number, residual: number, tol: number, branch?: string): Equilibrium {
  const n = system.dimension;
  const jac = system.jacobian(x, p, new Float64Array(n * n));
  const s = spectrum(jac, n);
  let unstable = 0;
  let neutral = 0;
  let k1 = -1;
  for (let k = 0; k < n; k++) {
    if (s.re[k] > tol) { unstable++; k1 = k; } else if (s.re[k] >= -tol) neutral++;
  }
  const eigenvalues = s.re.map((re, k) => ({ re, im: s.im[k] }));
  let unstableValue: number | undefined;
  let unstableVector: number[] | undefined;
  if (unstable === 1 && neutral === 0) {
    const v = s.vector(k1);
    if (v) {
      let big = 0;
      for (let i = 1; i < n; i++) if (Math.abs(v[i]) > Math.abs(v[big])) big = i;
      unstableVector = v[big] < 0 ? v.map((c) => -c) : v;
      unstableValue = s.re[k1];
    }
  }
  return { x: Array.from(x), residual, eigenvalues, unstable, neutral, unstableValue, unstableVector, branch };
}

export function sameState(a: ArrayLike<number>, b: ArrayLike<number>, tol: number): boolean {
  for (let i = 0; i < a.length; i++) {
    if (Math.abs(a[i] - b[i]) > tol * (1 + Math.abs(a[i]))) return false;
  }
  return true;
}
