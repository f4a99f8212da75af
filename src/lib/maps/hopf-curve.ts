/**
 * The Hopf curve in two parameters as an ExtendedSystem (docs/maps.md §3): a pair of eigenvalues
 * ±iω of J_x, written with κ = ω² so that no complex arithmetic is needed (Kuznetsov, Elements of
 * Applied Bifurcation Theory, 3rd ed., §10.2.2, the system with J² + κ I):
 *   F(x, a, b) = 0,   (J_x² + κ I) v = 0,   v . v - 1 = 0,   c . v = 0,
 * in y = (x, v, κ, a, b) in R^(2n+3), 2n+2 equations. At a Hopf point the null space of J² + κ I is
 * the real two-dimensional invariant subspace of the pair; |v| = 1 and c . v = 0 pick one vector in
 * it. Jacobian (H(w) = secondState(w), the derivative of J_x w with respect to x):
 *   d/dx [J (J v)] = H(J v) + J H(v),   d/da [J (J v)] = J_a (J v) + J (J_a v),   d/dv = J² + κ I,   d/dκ = v.
 * κ > 0 on the Hopf curve, κ = 0 at a Bogdanov-Takens point (double zero eigenvalue), κ < 0 on the
 * continuation as a neutral saddle (eigenvalues ±sqrt(-κ), not a Hopf point): the Hopf curve is
 * stopped where κ changes sign and that point is located as Bogdanov-Takens.
 * c is kept inside the invariant subspace and orthogonal to v: c = J v - (v . J v) v, normalized
 * (J maps the subspace into itself), renewed when it has turned by more than about 8 degrees.
 */
import { TwoParameterCurveSystem } from './curve-system.js';
import type { TwoParameterSystem } from './two-parameter-system.js';

export class HopfSystem extends TwoParameterCurveSystem {
  /** Scratch beyond the shared ones: J v, H(J v), and J_a v, J_b v (ja, jb hold J_a (J v), J_b (J v)). */
  private readonly jv: Float64Array;
  private readonly h1: Float64Array;
  private readonly ja2: Float64Array;
  private readonly jb2: Float64Array;

  constructor(sys: TwoParameterSystem, c: ArrayLike<number>) {
    const n = sys.dimension;
    super(sys, 2 * n + 3, n, c);
    this.jv = new Float64Array(n);
    this.h1 = new Float64Array(n * n);
    this.ja2 = new Float64Array(n);
    this.jb2 = new Float64Array(n);
  }

  /** Loads x, v and J at y; also J v. */
  private load(y: Float64Array): { a: number; b: number; kappa: number } {
    const n = this.n;
    for (let i = 0; i < n; i++) {
      this.x[i] = y[i];
      this.v[i] = y[n + i];
    }
    const kappa = y[2 * n];
    const a = y[2 * n + 1];
    const b = y[2 * n + 2];
    this.sys.jacobian(this.x, a, b, this.j);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += this.j[i * n + k] * this.v[k];
      this.jv[i] = s;
    }
    return { a, b, kappa };
  }

  residual(y: Float64Array, out: Float64Array): void {
    const n = this.n;
    const { a, b, kappa } = this.load(y);
    this.sys.rates(this.x, a, b, this.f);
    let vv = 0;
    let cv = 0;
    for (let i = 0; i < n; i++) {
      out[i] = this.f[i];
      let s = 0;
      for (let k = 0; k < n; k++) s += this.j[i * n + k] * this.jv[k];
      out[n + i] = s + kappa * this.v[i];
      vv += this.v[i] * this.v[i];
      cv += this.c[i] * this.v[i];
    }
    out[2 * n] = vv - 1;
    out[2 * n + 1] = cv;
  }

  jacobian(y: Float64Array, out: Float64Array): void {
    const n = this.n;
    const N = this.size;
    const { a, b, kappa } = this.load(y);
    this.sys.parameterDerivatives(this.x, a, b, this.fa, this.fb);
    this.sys.secondState(this.x, a, b, this.jv, this.h1); // H(J v)
    this.sys.secondState(this.x, a, b, this.v, this.h); // H(v)
    this.sys.secondParameter(this.x, a, b, this.jv, this.ja, this.jb); // J_a (J v), J_b (J v)
    this.sys.secondParameter(this.x, a, b, this.v, this.ja2, this.jb2); // J_a v, J_b v
    out.fill(0);
    const j = this.j;
    for (let i = 0; i < n; i++) {
      const r1 = i * N;
      const r2 = (n + i) * N;
      for (let k = 0; k < n; k++) {
        out[r1 + k] = j[i * n + k];
        // d/dx_k [J (J v)]_i = H(Jv)_ik + sum_l J_il H(v)_lk
        let s = this.h1[i * n + k];
        let q = 0;
        for (let l = 0; l < n; l++) {
          s += j[i * n + l] * this.h[l * n + k];
          q += j[i * n + l] * j[l * n + k];
        }
        out[r2 + k] = s;
        out[r2 + n + k] = q + (i === k ? kappa : 0);
      }
      out[r1 + 2 * n + 1] = this.fa[i];
      out[r1 + 2 * n + 2] = this.fb[i];
      out[r2 + 2 * n] = this.v[i];
      let sa = this.ja[i];
      let sb = this.jb[i];
      for (let l = 0; l < n; l++) {
        sa += j[i * n + l] * this.ja2[l];
        sb += j[i * n + l] * this.jb2[l];
      }
      out[r2 + 2 * n + 1] = sa;
      out[r2 + 2 * n + 2] = sb;
    }
    for (let k = 0; k < n; k++) {
      out[2 * n * N + n + k] = 2 * this.v[k];
      out[(2 * n + 1) * N + n + k] = this.c[k];
    }
  }

  /** c_new = J v - (v . J v) v, normalized; the solution y does not move (c . v = 0 still holds). */
  rebase(y: Float64Array): boolean {
    const n = this.n;
    this.load(y);
    let vjv = 0;
    let vv = 0;
    for (let i = 0; i < n; i++) {
      vjv += this.v[i] * this.jv[i];
      vv += this.v[i] * this.v[i];
    }
    const cn = new Float64Array(n);
    let nn = 0;
    for (let i = 0; i < n; i++) {
      cn[i] = this.jv[i] - (vjv / vv) * this.v[i];
      nn += cn[i] * cn[i];
    }
    nn = Math.sqrt(nn);
    if (!(nn > 1e-12)) return false;
    let d = 0;
    for (let i = 0; i < n; i++) {
      cn[i] /= nn;
      d += cn[i] * this.c[i];
    }
    if (d < 0) {
      for (let i = 0; i < n; i++) cn[i] = -cn[i];
      d = -d;
    }
    if (d > 0.99) return false;
    this.c.set(cn);
    return true;
  }
}
