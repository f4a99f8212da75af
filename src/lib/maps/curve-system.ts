/**
 * What the saddle-node, Hopf and pitchfork systems of the maps (saddle-node-curve.ts, hopf-curve.ts,
 * branch-point-curve.ts) share: an ExtendedSystem in y = (..., a, b) with the two free parameters
 * last, a state block at the front, a normalization vector c, and scratch buffers for F, J and the
 * derivatives the two-parameter compiler provides (two-parameter-system.ts). Continued by the one
 * driver, numerics/continue-curve.ts.
 */
import type { ExtendedSystem } from '../numerics/extended-system.js';
import type { TwoParameterSystem } from './two-parameter-system.js';

export abstract class TwoParameterCurveSystem implements ExtendedSystem {
  readonly size: number;
  readonly parameterIndex: readonly number[];
  readonly stateIndex: readonly number[];
  /** Dimension of the model's state. */
  readonly n: number;
  /** Normalization vector of the null vector (renewed by rebase). */
  c: Float64Array;
  /** Scratch: state x, vector v, F, J, H(v) = d(J v)/dx (n x n), F_a, F_b, J_a v, J_b v. */
  protected readonly x: Float64Array;
  protected readonly v: Float64Array;
  protected readonly f: Float64Array;
  protected readonly j: Float64Array;
  protected readonly h: Float64Array;
  protected readonly fa: Float64Array;
  protected readonly fb: Float64Array;
  protected readonly ja: Float64Array;
  protected readonly jb: Float64Array;

  /** size N of y (a = y[N-2], b = y[N-1]); the state is y[0..stateCount). */
  constructor(readonly sys: TwoParameterSystem, size: number, stateCount: number, c: ArrayLike<number>) {
    const n = sys.dimension;
    this.n = n;
    this.size = size;
    this.parameterIndex = [size - 2, size - 1];
    this.stateIndex = Array.from({ length: stateCount }, (_, i) => i);
    this.c = Float64Array.from(c);
    this.x = new Float64Array(n);
    this.v = new Float64Array(n);
    this.f = new Float64Array(n);
    this.j = new Float64Array(n * n);
    this.h = new Float64Array(n * n);
    this.fa = new Float64Array(n);
    this.fb = new Float64Array(n);
    this.ja = new Float64Array(n);
    this.jb = new Float64Array(n);
  }

  abstract residual(y: Float64Array, out: Float64Array): void;
  abstract jacobian(y: Float64Array, out: Float64Array): void;

  /**
   * Rebase of a null vector u = y[offset .. offset + len) normalized by c . u = 1: with |c| = 1,
   * |u| = 1 / cos(angle(c, u)) >= 1; past 60 degrees (|u| > 2) u is rescaled to unit length and c set
   * to it. The point stays on the curve (the null-vector equations are homogeneous in u).
   */
  protected rescaleNull(y: Float64Array, offset: number, len: number): boolean {
    let sq = 0;
    for (let i = 0; i < len; i++) sq += y[offset + i] * y[offset + i];
    if (sq <= 4) return false;
    const s = 1 / Math.sqrt(sq);
    for (let i = 0; i < len; i++) {
      y[offset + i] *= s;
      this.c[i] = y[offset + i];
    }
    return true;
  }
}
