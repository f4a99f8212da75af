import type { EdgeKind, NodeState } from './types';
import type { NodeRoles } from './element-roles';
import type { RegimeOptions } from './options';
import { progressOf, tippedProgress } from './pattern';

export interface EdgeClassification {
  readonly kind: EdgeKind;
  /** Nodes that tip along the edge (tipped at the far end). */
  readonly tipping: number[];
  /** Nodes at least engagedProgress of the way from base to threshold at the saddle. */
  readonly engaged: number[];
  /** Tipping nodes that were not engaged at the saddle: the ones committed by the others. */
  readonly committed: number[];
  /** Progress of every node at the saddle (0 base, 1 threshold). */
  readonly progress: number[];
  /** Why an all-tipped edge is not synchronous, in words (absent otherwise). */
  readonly notTogether?: string;
}

/**
 * Kind of an edge leaving the all-base state, from the saddle x_s, its unit unstable eigenvector v
 * and the pattern of the stable state at the far end (D = its tipped nodes, assumed non-empty).
 * Progress s_i = (x_i - base_i) / (threshold_i - base_i) (0 at base, 1 at threshold, tau_i at tipped).
 * - D is not every node: contained when every node of D is engaged (s_i >= engagedProgress) at the
 *   saddle, cascading when D holds a node that was not (it was committed by the others).
 * - D is every node: synchronous when every node is near its threshold at the saddle
 *   (engagedProgress <= s_i <= 1 + (1 - engagedProgress)(tau_i - 1): closer to its threshold than to
 *   either stable state for the default 0.5) and v has one sign on all nodes with
 *   min |v_i| / max |v_i| >= comparableRatio; otherwise cascading.
 * For other start states the caller mirrors the problem so that the start is all-base.
 */
export function classifyEdge(
  saddle: ArrayLike<number>,
  direction: ArrayLike<number>,
  target: readonly NodeState[],
  roles: readonly NodeRoles[],
  settings: Pick<RegimeOptions, 'engagedProgress' | 'comparableRatio'>,
): EdgeClassification {
  const n = roles.length;
  const s = progressOf(saddle, roles);
  const tau = tippedProgress(roles);
  const tipping: number[] = [];
  const engaged: number[] = [];
  for (let i = 0; i < n; i++) {
    if (target[i] === 'tipped') tipping.push(i);
    if (s[i] >= settings.engagedProgress) engaged.push(i);
  }
  const committed = tipping.filter((i) => s[i] < settings.engagedProgress);
  if (tipping.length < n) {
    return { kind: committed.length === 0 ? 'contained' : 'cascading', tipping, engaged, committed, progress: s };
  }
  const reasons: string[] = [];
  const nearBase = tipping.filter((i) => s[i] < settings.engagedProgress);
  const farPast = tipping.filter((i) => s[i] > 1 + (1 - settings.engagedProgress) * (tau[i] - 1));
  if (nearBase.length > 0) reasons.push('near-base');
  if (farPast.length > 0) reasons.push('far-past');
  const comps = tipping.map((i) => direction[i]);
  const oneSign = comps.every((c) => c > 0) || comps.every((c) => c < 0);
  const mags = comps.map(Math.abs);
  const ratio = Math.min(...mags) / Math.max(...mags);
  if (!oneSign) reasons.push('mixed-sign');
  else if (!(ratio >= settings.comparableRatio)) reasons.push('uneven');
  if (reasons.length === 0) return { kind: 'synchronous', tipping, engaged, committed: [], progress: s };
  return { kind: 'cascading', tipping, engaged, committed, progress: s, notTogether: reasons.join(',') };
}
