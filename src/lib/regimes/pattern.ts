import type { NodeState } from './types';
import type { NodeRoles } from './element-roles';

/**
 * Pattern of a network state: node i is 'tipped' when x_i lies above the threshold of its uncoupled
 * element, 'base' otherwise (a state exactly at the threshold counts as base).
 */
export function patternOf(x: ArrayLike<number>, roles: readonly NodeRoles[]): NodeState[] {
  const out: NodeState[] = [];
  for (let i = 0; i < roles.length; i++) out.push(x[i] > roles[i].threshold ? 'tipped' : 'base');
  return out;
}

/**
 * Progress of node i from base to threshold: (x_i - base_i) / (threshold_i - base_i), so 0 at the
 * base equilibrium, 1 at the threshold and tipped_i's own value (> 1) at the tipped equilibrium.
 */
export function progressOf(x: ArrayLike<number>, roles: readonly NodeRoles[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < roles.length; i++) {
    const r = roles[i];
    out.push((x[i] - r.base) / (r.threshold - r.base));
  }
  return out;
}

/** Progress of the tipped equilibrium itself, per node. */
export function tippedProgress(roles: readonly NodeRoles[]): number[] {
  return roles.map((r) => (r.tipped - r.base) / (r.threshold - r.base));
}

export function countTipped(pattern: readonly NodeState[]): number {
  let k = 0;
  for (const s of pattern) if (s === 'tipped') k++;
  return k;
}

export function isAll(pattern: readonly NodeState[], state: NodeState): boolean {
  return pattern.every((s) => s === state);
}

export function samePattern(a: readonly NodeState[], b: readonly NodeState[]): boolean {
  return a.length === b.length && a.every((s, i) => s === b[i]);
}
