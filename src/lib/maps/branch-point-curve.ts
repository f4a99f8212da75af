/**
 * Pitchfork (symmetry-breaking branch point) curves of symmetric networks in two parameters
 * (docs/maps.md §3). With an involutive permutation sigma of the variables that commutes with F
 * (F(sigma x) = sigma F(x) for all x, a, b), the fixed space Fix = {x : sigma x = x} is invariant and
 * J_x at x in Fix maps Fix and its complement Anti = {sigma v = -v} into themselves. A pitchfork of
 * the symmetric branch is a zero eigenvalue of J_x restricted to Anti. Written in coordinates
 * x = P s (s in R^k) and v = Q u (u in R^m), k + m = n, the curve is the solution set of
 *   F_r(P s, a, b) = 0   for one representative r of every orbit of sigma   (k equations)
 *   (J_x Q u)_i = 0      for one index i of every swapped pair             (m equations)
 *   c . u - 1 = 0,
 * in y = (s, u, a, b) in R^(n+2): the fold system (Kuznetsov, Elements of Applied Bifurcation Theory,
 * 3rd ed., §10.2.1) of the problem restricted to the fixed-point subspace (Golubitsky, Stewart &
 * Schaeffer, Singularities and Groups in Bifurcation Theory, Vol. II, 1988: fixed-point subspaces
 * are invariant under equivariant flows; chapter not checked, from memory), regular where the zero
 * eigenvalue of J on Anti is simple and crosses transversally.
 * The full system's fold system is singular there (the extra F-equations are dependent), which is why
 * the restriction is used.
 */
import { TwoParameterCurveSystem } from './curve-system.js';
import type { TwoParameterSystem } from './two-parameter-system.js';
import { DenseLu } from '../numerics/dense-lu.js';

export interface Symmetry {
  /** sigma as an index map (sigma[sigma[i]] = i). */
  readonly sigma: readonly number[];
  /** Orbit representatives: fixed indices and the smaller index of each pair (Fix coordinates). */
  readonly orbits: readonly (readonly number[])[];
  /** Swapped pairs [i, j], i < j (Anti coordinates). */
  readonly pairs: readonly (readonly [number, number])[];
}

/**
 * A candidate symmetry read off a branch point (x*, phi): indices i, j with x*_i = x*_j and
 * phi_i = -phi_j != 0 are swapped, the rest fixed (tolerance 1e-4 relative to |x*|, |phi|); it is
 * accepted when it is an involution with at least one pair and F commutes with it to 1e-10 (relative)
 * at five pseudo-random (x, a, b) around the point (a numerical check, not a proof).
 */
export function findSymmetry(sys: TwoParameterSystem, x: ArrayLike<number>, phi: ArrayLike<number>, a: number, b: number): Symmetry | null {
  const n = sys.dimension;
  let sx = 0;
  let sp = 0;
  for (let i = 0; i < n; i++) {
    sx = Math.max(sx, Math.abs(x[i]));
    sp = Math.max(sp, Math.abs(phi[i]));
  }
  // Loose on purpose: a located pitchfork is accurate to ~1e-6 in x only (the branch-point system is
  // nearly singular there), and its null vector correspondingly less; the equivariance check decides.
  const tx = 1e-4 * (1 + sx);
  const tp = 1e-4 * sp;
  const sigma = Array.from({ length: n }, (_, i) => i);
  const used = new Array<boolean>(n).fill(false);
  for (let i = 0; i < n; i++) {
    if (used[i] || Math.abs(phi[i]) <= tp) continue;
    for (let j = i + 1; j < n; j++) {
      if (used[j] || Math.abs(x[i] - x[j]) > tx || Math.abs(phi[i] + phi[j]) > tp) continue;
      sigma[i] = j;
      sigma[j] = i;
      used[i] = used[j] = true;
      break;
    }
    if (!used[i]) return null;
  }
  const pairs: [number, number][] = [];
  const orbits: number[][] = [];
  for (let i = 0; i < n; i++) {
    if (sigma[i] === i) orbits.push([i]);
    else if (sigma[i] > i) {
      pairs.push([i, sigma[i]]);
      orbits.push([i, sigma[i]]);
    }
  }
  if (pairs.length === 0) return null;
  // Equivariance check at pseudo-random points (fixed LCG seed, so the answer is reproducible).
  let seed = 20261204;
  const rand = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 2 ** 32) - 0.5;
  const xs = new Float64Array(n);
  const xsig = new Float64Array(n);
  const f1 = new Float64Array(n);
  const f2 = new Float64Array(n);
  for (let trial = 0; trial < 5; trial++) {
    for (let i = 0; i < n; i++) xs[i] = x[i] + 0.5 * (1 + sx) * rand();
    for (let i = 0; i < n; i++) xsig[sigma[i]] = xs[i];
    const aa = a + 0.1 * (1 + Math.abs(a)) * rand();
    const bb = b + 0.1 * (1 + Math.abs(b)) * rand();
    sys.rates(xs, aa, bb, f1);
    sys.rates(xsig, aa, bb, f2);
    let scale = 1;
    for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(f1[i]));
    for (let i = 0; i < n; i++) if (!(Math.abs(f2[sigma[i]] - f1[i]) <= 1e-10 * scale)) return null;
  }
  return { sigma, orbits, pairs };
}

export class SymmetricBranchPointSystem extends TwoParameterCurveSystem {
  /** Orbits of sigma (Fix coordinates) and swapped pairs (Anti coordinates). */
  readonly k: number;
  readonly m: number;

  constructor(sys: TwoParameterSystem, readonly symmetry: Symmetry, c: ArrayLike<number>) {
    const k = symmetry.orbits.length;
    const m = symmetry.pairs.length;
    super(sys, k + m + 2, k, c);
    this.k = k;
    this.m = m;
  }

  /** Full state x = P s. */
  stateOf(y: ArrayLike<number>, out: Float64Array = new Float64Array(this.n)): Float64Array {
    this.symmetry.orbits.forEach((orbit, o) => {
      for (const i of orbit) out[i] = y[o];
    });
    return out;
  }

  /** Reduced coordinates of a symmetric state and an antisymmetric vector: s_o = x_rep, u_q = phi_i. */
  reduce(x: ArrayLike<number>, phi: ArrayLike<number>, a: number, b: number): Float64Array {
    const y = new Float64Array(this.size);
    // Orbit means: the symmetric projection of x (the located branch point is only nearly symmetric).
    this.symmetry.orbits.forEach((orbit, o) => (y[o] = orbit.reduce((sum, i) => sum + x[i], 0) / orbit.length));
    this.symmetry.pairs.forEach(([i, j], q) => (y[this.k + q] = (phi[i] - phi[j]) / 2));
    y[this.k + this.m] = a;
    y[this.k + this.m + 1] = b;
    return y;
  }

  private load(y: Float64Array): void {
    this.stateOf(y, this.x);
    this.v.fill(0);
    this.symmetry.pairs.forEach(([i, j], q) => {
      this.v[i] = y[this.k + q];
      this.v[j] = -y[this.k + q];
    });
  }

  residual(y: Float64Array, out: Float64Array): void {
    const { n, k, m } = this;
    this.load(y);
    const a = y[k + m];
    const b = y[k + m + 1];
    this.sys.rates(this.x, a, b, this.f);
    this.sys.jacobian(this.x, a, b, this.j);
    this.symmetry.orbits.forEach((orbit, o) => (out[o] = this.f[orbit[0]]));
    let cu = 0;
    this.symmetry.pairs.forEach(([i], q) => {
      let s = 0;
      for (let l = 0; l < n; l++) s += this.j[i * n + l] * this.v[l];
      out[k + q] = s;
      cu += this.c[q] * y[k + q];
    });
    out[k + m] = cu - 1;
  }

  jacobian(y: Float64Array, out: Float64Array): void {
    const { n, k, m, size: N } = this;
    this.load(y);
    const a = y[k + m];
    const b = y[k + m + 1];
    this.sys.jacobian(this.x, a, b, this.j);
    this.sys.parameterDerivatives(this.x, a, b, this.fa, this.fb);
    this.sys.secondState(this.x, a, b, this.v, this.h);
    this.sys.secondParameter(this.x, a, b, this.v, this.ja, this.jb);
    out.fill(0);
    const { orbits, pairs } = this.symmetry;
    orbits.forEach((orbit, o) => {
      const r = orbit[0];
      orbits.forEach((cols, o2) => {
        let s = 0;
        for (const l of cols) s += this.j[r * n + l];
        out[o * N + o2] = s;
      });
      out[o * N + k + m] = this.fa[r];
      out[o * N + k + m + 1] = this.fb[r];
    });
    pairs.forEach(([i], q) => {
      const row = (k + q) * N;
      orbits.forEach((cols, o2) => {
        let s = 0;
        for (const l of cols) s += this.h[i * n + l];
        out[row + o2] = s;
      });
      pairs.forEach(([p1, p2], q2) => (out[row + k + q2] = this.j[i * n + p1] - this.j[i * n + p2]));
      out[row + k + m] = this.ja[i];
      out[row + k + m + 1] = this.jb[i];
    });
    for (let q = 0; q < m; q++) out[(k + m) * N + k + q] = this.c[q];
  }

  /**
   * det of J_x restricted to Fix (the k x k matrix (J P) on the orbit representatives): zero where
   * the symmetric branch itself has a saddle-node, i.e. where a saddle-node curve of symmetric
   * states meets the pitchfork curve (both blocks singular: a double zero eigenvalue, one
   * symmetric and one antisymmetric null vector). Continuous along the curve, sign changes there.
   */
  symmetricDeterminant(y: Float64Array): number {
    const { n, k, m } = this;
    this.load(y);
    this.sys.jacobian(this.x, y[k + m], y[k + m + 1], this.j);
    const a = new Float64Array(k * k);
    const { orbits } = this.symmetry;
    orbits.forEach((orbit, o) => {
      orbits.forEach((cols, o2) => {
        let s = 0;
        for (const l of cols) s += this.j[orbit[0] * n + l];
        a[o * k + o2] = s;
      });
    });
    return new DenseLu(a, k).determinant;
  }

  /**
   * Cubic coefficient of the pitchfork at y, from the centre-manifold reduction (the cusp coefficient
   * formula of Kuznetsov §8.7, with the quadratic term vanishing by symmetry):
   *   c3 = p . C(v, v, v) / 6 - p . B(v, h) / 2,   J h = B(v, v) solved on Fix (J is regular there),
   * v the unit antisymmetric null vector, J^T p = 0 with p . v = 1. Zero where the pitchfork changes
   * side (a degenerate pitchfork), which is where a saddle-node curve of asymmetric states ends on
   * the pitchfork curve. C(v, v, v) = d/dt B_{x+tv}(v, v) is a central difference of the analytic
   * second derivatives with step eps = 1e-4 (1 + |x|_inf): error eps^2 |d5F| / 6 plus rounding
   * ~1e-16 |B| / eps, i.e. about 1e-9 relative for smooth rates (exact up to rounding for cubic
   * ones); used only for its sign changes. NaN when a bordered or Fix system is singular.
   */
  cubicCoefficient(y: Float64Array): number {
    const { n, k, m } = this;
    this.load(y);
    const a = y[k + m];
    const b = y[k + m + 1];
    let nv = 0;
    for (let i = 0; i < n; i++) nv += this.v[i] * this.v[i];
    nv = Math.sqrt(nv);
    const v = Float64Array.from(this.v, (t) => t / nv);
    const x = Float64Array.from(this.x);
    this.sys.jacobian(x, a, b, this.j);
    // p: [J^T v; v^T 0] (p, s) = (0, 1).
    const M = n + 1;
    const A = new Float64Array(M * M);
    for (let i = 0; i < n; i++) {
      for (let l = 0; l < n; l++) A[i * M + l] = this.j[l * n + i];
      A[i * M + n] = v[i];
      A[n * M + i] = v[i];
    }
    const e = new Float64Array(M);
    e[n] = 1;
    const ps = new DenseLu(A, M).solve(e);
    if (ps === null) return Number.NaN;
    const bvv = (at: Float64Array, out: Float64Array) => {
      this.sys.secondState(at, a, b, v, this.h);
      for (let i = 0; i < n; i++) {
        let t = 0;
        for (let l = 0; l < n; l++) t += this.h[i * n + l] * v[l];
        out[i] = t;
      }
      return out;
    };
    const B0 = bvv(x, new Float64Array(n));
    // h on Fix: (J P) hs = B(v, v) on the orbit representatives.
    const { orbits } = this.symmetry;
    const Jf = new Float64Array(k * k);
    const rhs = new Float64Array(k);
    orbits.forEach((orbit, o) => {
      orbits.forEach((cols, o2) => {
        let t = 0;
        for (const l of cols) t += this.j[orbit[0] * n + l];
        Jf[o * k + o2] = t;
      });
      rhs[o] = B0[orbit[0]];
    });
    const hs = new DenseLu(Jf, k).solve(rhs);
    if (hs === null) return Number.NaN;
    const h = new Float64Array(n);
    orbits.forEach((orbit, o) => {
      for (const i of orbit) h[i] = hs[o];
    });
    // B(v, h) = H(h) v.
    this.sys.secondState(x, a, b, h, this.h);
    let pbvh = 0;
    for (let i = 0; i < n; i++) {
      let t = 0;
      for (let l = 0; l < n; l++) t += this.h[i * n + l] * v[l];
      pbvh += ps[i] * t;
    }
    // C(v, v, v) by a central difference of B_{x + t v}(v, v).
    let size = 0;
    for (let i = 0; i < n; i++) size = Math.max(size, Math.abs(x[i]));
    const eps = 1e-4 * (1 + size);
    const xp = Float64Array.from(x, (t, i) => t + eps * v[i]);
    const xm = Float64Array.from(x, (t, i) => t - eps * v[i]);
    const Bp = bvv(xp, new Float64Array(n));
    const Bm = bvv(xm, new Float64Array(n));
    let pc = 0;
    for (let i = 0; i < n; i++) pc += (ps[i] * (Bp[i] - Bm[i])) / (2 * eps);
    return pc / 6 - pbvh / 2;
  }

  /** u = y[k..k+m) rescaled and c = u past 60 degrees (TwoParameterCurveSystem.rescaleNull). */
  rebase(y: Float64Array): boolean {
    return this.rescaleNull(y, this.k, this.m);
  }
}
