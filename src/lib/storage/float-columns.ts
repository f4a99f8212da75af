/**
 * Lossless transforms of Float64 columns before a general-purpose compressor: each value's 64 bits
 * are read as a signed integer, replaced by its difference from a prediction out of the values before
 * it (order 0: none, 1: the previous value, 2: linear extrapolation 2a - b), and the eight bytes of
 * all values are then regrouped by byte position ("byte shuffle"), so that the slowly changing sign,
 * exponent and high mantissa bytes of neighbouring points sit together where deflate finds them.
 *
 * Integer arithmetic wraps modulo 2^64 (BigInt.asIntN), so every bit pattern, NaN payloads and -0
 * included, comes back exactly. Smooth continuation branches leave small second differences, hence
 * order 2 for point coordinates. (Delta coding and byte shuffling of floating-point data: common
 * practice, no source; the orders were chosen by measurement, docs/storage.md.)
 */

export type PredictionOrder = 0 | 1 | 2;

/** Residuals of `values` (as int64 bit patterns) against the prediction of the given order, written to `out`. */
export function predictResiduals(values: Float64Array, order: PredictionOrder, out: BigInt64Array): void {
  const w = new BigInt64Array(values.buffer, values.byteOffset, values.length);
  const n = values.length;
  if (out.length !== n) throw new RangeError(`predictResiduals: out has ${out.length} slots for ${n} values`);
  for (let i = 0; i < n; i++) {
    if (order === 0 || i === 0) out[i] = w[i];
    else if (order === 1 || i === 1) out[i] = BigInt.asIntN(64, w[i] - w[i - 1]);
    else out[i] = BigInt.asIntN(64, w[i] - 2n * w[i - 1] + w[i - 2]);
  }
}

/** Inverse of predictResiduals: the values whose residuals are `residuals`, written to `out`. */
export function undoResiduals(residuals: BigInt64Array, order: PredictionOrder, out: Float64Array): void {
  const n = residuals.length;
  if (out.length !== n) throw new RangeError(`undoResiduals: out has ${out.length} slots for ${n} residuals`);
  const w = new BigInt64Array(out.buffer, out.byteOffset, n);
  for (let i = 0; i < n; i++) {
    if (order === 0 || i === 0) w[i] = residuals[i];
    else if (order === 1 || i === 1) w[i] = BigInt.asIntN(64, residuals[i] + w[i - 1]);
    else w[i] = BigInt.asIntN(64, residuals[i] + 2n * w[i - 1] - w[i - 2]);
  }
}

/** Byte k of value i goes to position k * n + i (n = bytes.length / width). */
export function shuffleBytes(bytes: Uint8Array, width: number): Uint8Array {
  if (bytes.length % width !== 0) throw new RangeError(`shuffleBytes: ${bytes.length} bytes are not a whole number of ${width}-byte values`);
  const n = bytes.length / width;
  const out = new Uint8Array(bytes.length);
  for (let k = 0; k < width; k++) {
    const base = k * n;
    for (let i = 0, j = k; i < n; i++, j += width) out[base + i] = bytes[j];
  }
  return out;
}

/** Inverse of shuffleBytes. */
export function unshuffleBytes(bytes: Uint8Array, width: number): Uint8Array {
  if (bytes.length % width !== 0) throw new RangeError(`unshuffleBytes: ${bytes.length} bytes are not a whole number of ${width}-byte values`);
  const n = bytes.length / width;
  const out = new Uint8Array(bytes.length);
  for (let k = 0; k < width; k++) {
    const base = k * n;
    for (let i = 0, j = k; i < n; i++, j += width) out[j] = bytes[base + i];
  }
  return out;
}
