/**
 * Equilibrium branches at a fixed second parameter as an ExtendedSystem (docs/maps.md §2):
 * G(x, a) = F(x, a, b0) in y = (x, a), DG = [J_x | F_a], on the two-parameter compiler's functions.
 * The one-parameter engine continues the same equations on its own compiled system
 * (numerics/pseudo-arclength.ts, EquilibriumBranch); both go through the one driver
 * (numerics/continue-curve.ts), as do the saddle-node, Hopf and pitchfork curves.
 */
import type { ExtendedSystem } from '../numerics/extended-system.js';
import type { TwoParameterSystem } from './two-parameter-system.js';

export class EquilibriumSystem implements ExtendedSystem {
  readonly size: number;
  readonly parameterIndex: readonly number[];
  readonly stateIndex: readonly number[];
  private readonly x: Float64Array;
  private readonly j: Float64Array;
  private readonly fa: Float64Array;
  private readonly fb: Float64Array;

  constructor(readonly sys: TwoParameterSystem, readonly second: number) {
    const n = sys.dimension;
    this.size = n + 1;
    this.parameterIndex = [n];
    this.stateIndex = Array.from({ length: n }, (_, i) => i);
    this.x = new Float64Array(n);
    this.j = new Float64Array(n * n);
    this.fa = new Float64Array(n);
    this.fb = new Float64Array(n);
  }

  residual(y: Float64Array, out: Float64Array): void {
    const n = this.sys.dimension;
    for (let i = 0; i < n; i++) this.x[i] = y[i];
    this.sys.rates(this.x, y[n], this.second, out);
  }

  jacobian(y: Float64Array, out: Float64Array): void {
    const n = this.sys.dimension;
    for (let i = 0; i < n; i++) this.x[i] = y[i];
    this.sys.jacobian(this.x, y[n], this.second, this.j);
    this.sys.parameterDerivatives(this.x, y[n], this.second, this.fa, this.fb);
    for (let i = 0; i < n; i++) {
      for (let k = 0; k < n; k++) out[i * (n + 1) + k] = this.j[i * n + k];
      out[i * (n + 1) + n] = this.fa[i];
    }
  }
}
