import type { NodeRoles } from '../regimes/element-roles';
import { NoiseSettingError } from './noise-spec';

/** Which way the nodes escape: from the base side up (start all-base) or from the tipped side down. */
export type EscapeDirection = 'up' | 'down';

/**
 * Escape thresholds per node (docs/noise.md, "Monte Carlo escape sequences"). Default: halfway
 * between the element's threshold root and the root it escapes to, (threshold + tipped) / 2 going
 * up, (threshold + base) / 2 going down. `override` replaces them (one finite value per node,
 * strictly between the threshold root and the target root, else NoiseSettingError naming
 * `thresholds[i]`). Inputs are not mutated.
 */
export function escapeThresholds(roles: readonly NodeRoles[], override?: ArrayLike<number>, direction: EscapeDirection = 'up'): Float64Array {
  const target = (r: NodeRoles) => (direction === 'up' ? r.tipped : r.base);
  if (override === undefined) return Float64Array.from(roles, (r) => (r.threshold + target(r)) / 2);
  if (override.length !== roles.length) {
    throw new NoiseSettingError('thresholds', `expected ${roles.length} values (one per node), got ${override.length}`);
  }
  const out = new Float64Array(roles.length);
  roles.forEach((r, i) => {
    const v = override[i];
    const lo = Math.min(r.threshold, target(r));
    const hi = Math.max(r.threshold, target(r));
    if (!Number.isFinite(v) || v <= lo || v >= hi) {
      throw new NoiseSettingError(`thresholds[${i}]`, `must lie strictly between the threshold root ${r.threshold} and the ${direction === 'up' ? 'tipped' : 'base'} root ${target(r)}, got ${v}`);
    }
    out[i] = v;
  });
  return out;
}
