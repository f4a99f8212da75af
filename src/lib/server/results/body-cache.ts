/**
 * A per-process cache of encoded result bodies. Results are immutable (a result row is written once
 * and never updated), so a cached copy can never be stale; the cache only saves the database
 * transfer and the UTF-8 encoding of large diagrams on repeated reads. Bounded by total bytes
 * (RESULT_CACHE_MB, default 64) with least-recently-used eviction.
 */
const maxBytes = Math.max(0, Number(process.env.RESULT_CACHE_MB ?? 64)) * 1024 * 1024;
const entries = new Map<string, Uint8Array>();
let total = 0;

export function cachedBody(key: string): Uint8Array | undefined {
  const hit = entries.get(key);
  if (hit) {
    // Re-insert to mark as most recently used (Map iteration order is insertion order).
    entries.delete(key);
    entries.set(key, hit);
  }
  return hit;
}

export function rememberBody(key: string, bytes: Uint8Array): void {
  if (bytes.byteLength > maxBytes / 4) return;
  const old = entries.get(key);
  if (old) { total -= old.byteLength; entries.delete(key); }
  entries.set(key, bytes);
  total += bytes.byteLength;
  for (const [k, v] of entries) {
    if (total <= maxBytes) break;
    entries.delete(k);
    total -= v.byteLength;
  }
}
