/**
 * The saddle-node (fold) curve in two parameters as an ExtendedSystem (docs/maps.md §2): the
 * standard extended system of Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., §10.2.1,
 *   F(x, a, b) = 0,   J_x(x, a, b) v = 0,   c . v - 1 = 0,
 * in y = (x, v, a, b) in R^(2n+2), 2n+1 equations. Its Jacobian is analytic (symbolic second
 * derivatives of the two-parameter compiler):
 *   [ J_x            0     F_a        F_b       ]
 *   [ d(J_x v)/dx    J_x   (J_x)_a v  (J_x)_b v ]
 *   [ 0              c^T   0          0         ]
 * Regular at a fold with a simple zero eigenvalue and nonzero quadratic coefficient or transversal
 * parameter dependence (Kuznetsov, §10.2.1, Lemma 10.1); it stays regular through a cusp, where only
 * the projection onto (a, b) turns. The normalization vector c starts as the unit null vector; when
 * |v| grows past 2 (v more than 60 degrees from c), v is rescaled to unit length and c set to it
 * (the point stays on the curve, since J v = 0 is homogeneous), so the system stays well scaled.
 *
 * Cusp test (Kuznetsov §8.2 and §10.2.2): the quadratic coefficient of the fold's normal form,
 * a2 = (1/2) w^T B(v, v), with J v = 0, J^T w = 0, w^T v = 1 and B(v, v)_i = sum_jk
 * d^2F_i/dx_j dx_k v_j v_k; a cusp is a simple zero of a2 along the curve. Bogdanov-Takens test:
 * w . v with unnormalized null vectors (foldTests).
 */
import { TwoParameterCurveSystem } from './curve-system.js';
import type { TwoParameterSystem } from './two-parameter-system.js';
import { DenseLu } from '../numerics/dense-lu.js';

export class SaddleNodeSystem extends TwoParameterCurveSystem {
  constructor(sys: TwoParameterSystem, c: ArrayLike<number>) {
    super(sys, 2 * sys.dimension + 2, sys.dimension, c);
  }

  private load(y: Float64Array): void {
    const n = this.n;
    for (let i = 0; i < n; i++) {
      this.x[i] = y[i];
      this.v[i] = y[n + i];
    }
  }

  residual(y: Float64Array, out: Float64Array): void {
    const n = this.n;
    this.load(y);
    const a = y[2 * n];
    const b = y[2 * n + 1];
    this.sys.rates(this.x, a, b, this.f);
    this.sys.jacobian(this.x, a, b, this.j);
    let cv = 0;
    for (let i = 0; i < n; i++) {
      out[i] = this.f[i];
      let s = 0;
      for (let k = 0; k < n; k++) s += this.j[i * n + k] * this.v[k];
      out[n + i] = s;
      cv += this.c[i] * this.v[i];
    }
    out[2 * n] = cv - 1;
  }

  jacobian(y: Float64Array, out: Float64Array): void {
    const n = this.n;
    const N = this.size;
    this.load(y);
    const a = y[2 * n];
    const b = y[2 * n + 1];
    this.sys.jacobian(this.x, a, b, this.j);
    this.sys.parameterDerivatives(this.x, a, b, this.fa, this.fb);
    this.sys.secondState(this.x, a, b, this.v, this.h);
    this.sys.secondParameter(this.x, a, b, this.v, this.ja, this.jb);
    out.fill(0);
    for (let i = 0; i < n; i++) {
      const r1 = i * N;
      const r2 = (n + i) * N;
      for (let k = 0; k < n; k++) {
        out[r1 + k] = this.j[i * n + k];
        out[r2 + k] = this.h[i * n + k];
        out[r2 + n + k] = this.j[i * n + k];
      }
      out[r1 + 2 * n] = this.fa[i];
      out[r1 + 2 * n + 1] = this.fb[i];
      out[r2 + 2 * n] = this.ja[i];
      out[r2 + 2 * n + 1] = this.jb[i];
    }
    const r3 = 2 * n * N;
    for (let k = 0; k < n; k++) out[r3 + n + k] = this.c[k];
  }

  /** v = y[n..2n) rescaled and c = v past 60 degrees (TwoParameterCurveSystem.rescaleNull). */
  rebase(y: Float64Array): boolean {
    return this.rescaleNull(y, this.n, this.n);
  }

  /**
   * Test functions of the codimension-two points on the fold curve at y, with v̂ = v/|v| and p the
   * left null vector of J from the bordered system [J w0; v̂ᵀ 0] (p, s) = (0, 1), i.e. Jᵀp = 0 with
   * the normalization w0 . p = 1 (a bordered system, Govaerts 2000; regular at a fold and at a
   * Bogdanov-Takens point as long as w0 . p != 0). w0 is carried along the curve (the previous
   * point's p, normalized), so the sign of p is continuous.
   *   cusp: p . B(v̂, v̂) / 2, zero where the fold's quadratic coefficient vanishes (Kuznetsov §8.2,
   *         §10.2.2); a2 = (p . B(v̂, v̂)/2) / (p . v̂) is Kuznetsov's coefficient with <p, q> = 1.
   *   bt:   p . v̂, zero where the left and right null vectors become orthogonal, i.e. the zero
   *         eigenvalue becomes double (Bogdanov-Takens; Kuznetsov §10.2.2).
   * Null when the bordered matrix is singular.
   */
  foldTests(y: Float64Array, w0: Float64Array): { cusp: number; bt: number; a2: number; p: Float64Array } | null {
    const n = this.n;
    this.load(y);
    const a = y[2 * n];
    const b = y[2 * n + 1];
    let nv = 0;
    for (let i = 0; i < n; i++) nv += this.v[i] * this.v[i];
    nv = Math.sqrt(nv);
    for (let i = 0; i < n; i++) this.v[i] /= nv;
    this.sys.jacobian(this.x, a, b, this.j);
    const m = n + 1;
    // Transposed bordered system: rows i < n: sum_k J_ki p_k + s v̂_i = 0; last row: w0 . p = 1.
    const A = new Float64Array(m * m);
    for (let i = 0; i < n; i++) {
      for (let k = 0; k < n; k++) A[i * m + k] = this.j[k * n + i];
      A[i * m + n] = this.v[i];
      A[n * m + i] = w0[i];
    }
    const rhs = new Float64Array(m);
    rhs[n] = 1;
    const sol = new DenseLu(A, m).solve(rhs);
    if (sol === null) return null;
    const p = sol.subarray(0, n);
    this.sys.secondState(this.x, a, b, this.v, this.h);
    let q = 0;
    let pv = 0;
    for (let i = 0; i < n; i++) {
      let bi = 0;
      for (let j = 0; j < n; j++) bi += this.h[i * n + j] * this.v[j];
      q += p[i] * bi;
      pv += p[i] * this.v[i];
    }
    return { cusp: 0.5 * q, bt: pv, a2: (0.5 * q) / pv, p: Float64Array.from(p) };
  }
}
