/**
 * Exact mean first-passage time of a one-dimensional diffusion, the finite-noise reference beside
 * Kramers' law (docs/noise.md, "Weak-noise prediction").
 */

export interface FirstPassage1dOptions {
  /** Reflecting left end L (stands in for -infinity); default x0 - 4. */
  readonly left?: number;
  /** Grid cells of the first pass on [L, b]; default 4000. */
  readonly cells: number;
  /** Stop when two Richardson-extrapolated passes (N, 2N cells) agree to this, relative; default 1e-9. */
  readonly tolerance: number;
  /** Cap on grid doublings; default 8. */
  readonly maxDoublings: number;
}

export const defaultFirstPassage1dOptions: FirstPassage1dOptions = { cells: 4000, tolerance: 1e-9, maxDoublings: 8 };

export interface FirstPassage1dResult {
  /** E[time to first reach b from x0]. */
  readonly value: number;
  readonly converged: boolean;
  /** Grid doublings done. */
  readonly iterations: number;
  /** Relative change of the last extrapolated value. */
  readonly residual: number;
}

/**
 * E[tau_b | X_0 = x0] for dX = F(X) dt + sigma dW, b > x0, reflecting at L < x0:
 *   T(x0) = (2 / sigma^2) int_{x0}^{b} dy int_{L}^{y} exp(2 (V(y) - V(z)) / sigma^2) dz,  V' = -F
 * (the backward equation sigma^2/2 T'' + F T' = -1 with T(b) = 0, T'(L) = 0; Gardiner, Handbook of
 * Stochastic Methods, chapter on first-passage times, one-variable case). Method: V by the trapezoidal
 * rule on a grid uniform on [L, x0] and on [x0, b]; the inner integral w(y) = int_L^y exp(2 (V(y) - V(z)) / sigma^2) dz by the
 * overflow-free recurrence w(y + h) = e^{2 (V(y+h) - V(y)) / sigma^2} w(y) + (trapezoid of the last
 * cell); the outer integral by the trapezoidal rule; Richardson extrapolation (4 T_2N - T_N) / 3 of the
 * O(h^2) passes, doubling N until two extrapolations agree to `tolerance` or `maxDoublings`.
 * As sigma -> 0 with F = x - x^3, x0 = -1 and b past the saddle, T = pi sqrt 2 e^{1/(2 sigma^2)} (1 + (3/4) sigma^2
 * + O(sigma^4)) (Kramers' law with its Laplace-method correction, derived in the test).
 * Throws RangeError naming the argument for sigma <= 0, b <= x0 or L >= x0.
 */
export function meanFirstPassage1d(
  drift: (x: number) => number,
  x0: number,
  b: number,
  sigma: number,
  options?: Partial<FirstPassage1dOptions>,
): FirstPassage1dResult {
  const o = { ...defaultFirstPassage1dOptions, ...(options ?? {}) };
  const left = o.left ?? x0 - 4;
  if (!(Number.isFinite(sigma) && sigma > 0)) throw new RangeError(`sigma: must be positive and finite, got ${sigma}`);
  if (!(b > x0)) throw new RangeError(`b: must exceed x0 (${x0}), got ${b}`);
  if (!(left < x0)) throw new RangeError(`left: must be below x0 (${x0}), got ${left}`);
  // Two uniform pieces, [L, x0] and [x0, b], so that L, x0 and b are grid points of every pass.
  const total = Math.max(2, Math.floor(o.cells));
  const outerCells0 = Math.max(1, Math.round((total * (b - x0)) / (b - left)));
  const innerCells0 = Math.max(1, total - outerCells0);
  const k = 2 / (sigma * sigma);
  const pass = (m: number): number => {
    const start = innerCells0 * m;
    const cells = start + outerCells0 * m;
    const hIn = (x0 - left) / start;
    const hOut = (b - x0) / (outerCells0 * m);
    let xPrev = left;
    let fPrev = drift(left);
    let w = 0;
    let outer = 0;
    let wPrev = 0;
    for (let j = 1; j <= cells; j++) {
      const x = j <= start ? left + j * hIn : x0 + (j - start) * hOut;
      const h = x - xPrev;
      const f = drift(x);
      const g = Math.exp(-0.5 * k * h * (f + fPrev));
      w = g * w + 0.5 * h * (g + 1);
      if (j > start) outer += 0.5 * h * (w + wPrev);
      wPrev = w;
      fPrev = f;
      xPrev = x;
    }
    return k * outer;
  };
  let m = 1;
  let coarse = pass(m);
  let fine = pass(2 * m);
  let prev = (4 * fine - coarse) / 3;
  let residual = Infinity;
  for (let it = 1; it <= o.maxDoublings; it++) {
    m *= 2;
    coarse = fine;
    fine = pass(2 * m);
    const extrapolated = (4 * fine - coarse) / 3;
    residual = Math.abs(extrapolated - prev) / Math.abs(extrapolated);
    prev = extrapolated;
    if (residual <= o.tolerance) return { value: extrapolated, converged: true, iterations: it, residual };
  }
  return { value: prev, converged: false, iterations: o.maxDoublings, residual };
}
