/**
 * Projections of an equilibrium x ∈ Rⁿ onto the diagram's vertical axis.
 * Pure functions; the state vector is never mutated.
 */
import type { Diagram } from '../atlas/types';

export type Projection =
  | { readonly kind: 'node'; readonly index: number }
  | { readonly kind: 'mean' }
  | { readonly kind: 'tipped'; readonly thresholds: readonly number[] }
  | { readonly kind: 'norm' };

/** A broken contract between the caller and the plotting code (wrong lengths, unknown ids). */
export class PlotInputError extends Error {
  constructor(readonly field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'PlotInputError';
  }
}

/**
 * Value of x under a projection.
 *  node:   x_i
 *  mean:   (1/n) Σ x_i
 *  tipped: #{ i : x_i > θ_i }, θ_i the node's threshold (its uncoupled unstable equilibrium)
 *  norm:   ‖x‖₂ = sqrt(Σ x_i²), accumulated with Math.hypot to avoid overflow of the squares
 */
export function project(x: readonly number[], projection: Projection): number {
  switch (projection.kind) {
    case 'node': {
      if (projection.index < 0 || projection.index >= x.length) {
        throw new PlotInputError('projection.index', `node ${projection.index} does not exist in a state of ${x.length} variables`);
      }
      return x[projection.index];
    }
    case 'mean': {
      if (x.length === 0) throw new PlotInputError('x', 'the mean of an empty state is undefined');
      let s = 0;
      for (const v of x) s += v;
      return s / x.length;
    }
    case 'tipped': {
      const t = projection.thresholds;
      if (t.length !== x.length) {
        throw new PlotInputError('thresholds', `expected one threshold per node (${x.length}), got ${t.length}`);
      }
      let count = 0;
      for (let i = 0; i < x.length; i++) if (x[i] > t[i]) count++;
      return count;
    }
    case 'norm':
      return Math.hypot(...x);
  }
}

/** Axis label of a projection, in words. */
export function projectionLabel(projection: Projection, variables: readonly string[]): string {
  switch (projection.kind) {
    case 'node': return `state of ${variables[projection.index] ?? `node ${projection.index + 1}`}`;
    case 'mean': return 'mean state';
    case 'tipped': return 'number of tipped nodes';
    case 'norm': return 'Euclidean norm of the state';
  }
}

/** Stable string key of a projection, for form controls and URLs. */
export function projectionKey(projection: Projection): string {
  return projection.kind === 'node' ? `node:${projection.index}` : projection.kind;
}

/** The projections a diagram offers: each variable, the mean, the tipped count (only with thresholds), the norm. */
export function availableProjections(diagram: Pick<Diagram, 'variables'>, thresholds?: readonly number[]): { key: string; label: string; projection: Projection }[] {
  const out: { key: string; label: string; projection: Projection }[] = [];
  diagram.variables.forEach((_, index) => {
    const projection: Projection = { kind: 'node', index };
    out.push({ key: projectionKey(projection), label: projectionLabel(projection, diagram.variables), projection });
  });
  if (diagram.variables.length > 1) {
    const mean: Projection = { kind: 'mean' };
    out.push({ key: 'mean', label: projectionLabel(mean, diagram.variables), projection: mean });
  }
  if (thresholds && thresholds.length === diagram.variables.length) {
    const tipped: Projection = { kind: 'tipped', thresholds };
    out.push({ key: 'tipped', label: projectionLabel(tipped, diagram.variables), projection: tipped });
  }
  const norm: Projection = { kind: 'norm' };
  out.push({ key: 'norm', label: projectionLabel(norm, diagram.variables), projection: norm });
  return out;
}

/** Looks a key from projectionKey back up; unknown keys fall back to the first variable. */
export function projectionFromKey(key: string, thresholds?: readonly number[]): Projection {
  if (key.startsWith('node:')) return { kind: 'node', index: Number(key.slice(5)) || 0 };
  if (key === 'mean') return { kind: 'mean' };
  if (key === 'norm') return { kind: 'norm' };
  if (key === 'tipped' && thresholds) return { kind: 'tipped', thresholds };
  return { kind: 'node', index: 0 };
}
