/** Small dense-vector helpers on Float64Array. Inputs are never mutated unless the name says so. */

export function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

export function norm2(a: ArrayLike<number>): number {
  return Math.sqrt(dot(a, a));
}

export function normInf(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) {
    const v = Math.abs(a[i]);
    if (v > m || Number.isNaN(v)) m = v;
  }
  return m;
}

/** Max-norm distance of two vectors of equal length. */
export function distInf(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) {
    const v = Math.abs(a[i] - b[i]);
    if (v > m || Number.isNaN(v)) m = v;
  }
  return m;
}

export function dist2(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    const d = a[i] - b[i];
    s += d * d;
  }
  return Math.sqrt(s);
}

/** a + s * b as a new array. */
export function addScaled(a: ArrayLike<number>, s: number, b: ArrayLike<number>): Float64Array {
  const out = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) out[i] = a[i] + s * b[i];
  return out;
}

export function scaled(a: ArrayLike<number>, s: number): Float64Array {
  const out = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) out[i] = s * a[i];
  return out;
}

/** a / |a|_2 as a new array (a zero vector is returned unchanged). */
export function normalized(a: ArrayLike<number>): Float64Array {
  const n = norm2(a);
  return n > 0 ? scaled(a, 1 / n) : Float64Array.from(a);
}

export function allFinite(a: ArrayLike<number>): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) return false;
  return true;
}

/** Distance from point q to the segment [a, b] in the 2-norm. */
export function distanceToSegment(q: ArrayLike<number>, a: ArrayLike<number>, b: ArrayLike<number>): number {
  let ab2 = 0;
  let aqab = 0;
  for (let i = 0; i < q.length; i++) {
    const d = b[i] - a[i];
    ab2 += d * d;
    aqab += (q[i] - a[i]) * d;
  }
  const t = ab2 > 0 ? Math.min(1, Math.max(0, aqab / ab2)) : 0;
  let s = 0;
  for (let i = 0; i < q.length; i++) {
    const d = q[i] - (a[i] + t * (b[i] - a[i]));
    s += d * d;
  }
  return Math.sqrt(s);
}
