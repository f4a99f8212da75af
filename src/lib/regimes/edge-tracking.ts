/**
 * Edge tracking: the state on the boundary between the start state's basin and the rest, found by
 * following the boundary itself (Skufca, Yorke & Eckhardt, "Edge of chaos in a parallel shear
 * flow", Phys. Rev. Lett. 96, 174101, 2006; Schneider, Eckhardt & Yorke, Phys. Rev. Lett. 99,
 * 034502, 2007). Two points A and B on a segment, A returning to the start state and B going
 * elsewhere, are bisected until they are `bisectTolerance` apart; both are integrated forward for a
 * stretch of time (each keeps its fate: the fate of a point is the fate of its whole trajectory);
 * the pair is bisected again, and so on. The midpoint stays within the bisection tolerance of the
 * boundary, and since points on the boundary that are not attracted along it are pushed off only
 * in its one transverse direction, it settles onto the boundary's own attractor, the **edge state**:
 * an index-1 saddle where there is one, otherwise a moving state (a saddle periodic orbit, or a
 * more complicated set) that the equilibrium-only escape graph has no word for.
 *
 * Used by the band labeller where no index-1 saddle leads out of the start state
 * (docs/regimes.md, "Exits through a moving edge state"): on the bench's one-way 20-node ring with
 * chords the boundary between all-base and all-tipped carries a wave running round the ring beyond
 * β ≈ 0.19 (docs/numerics.md §12). Pure TypeScript; never throws.
 */
import type { CompiledSystem } from '../model/compiled-system';
import { integrateFlow, type FlowSettings } from './flow';
import { newtonAtFixedParameter } from './linear-algebra';
import { analyseEquilibrium, type Equilibrium } from './equilibria-at';
import { maxDist } from './escape-graph';

export interface EdgeTrackSettings {
  /** Tolerances and caps of the fate integrations (the labeller's flow settings). */
  readonly flow: FlowSettings;
  /** Total time the edge trajectory is followed when it does not settle on an equilibrium. */
  readonly trackTime: number;
  /** Time between two re-bisections (shortened while the pair separates too fast). */
  readonly trackStep: number;
  /** Max-norm distance of the pair after a bisection, relative to 1 + |x|. */
  readonly bisectTolerance: number;
  /** Fate integrations allowed for one track (each bisection step is one). */
  readonly maxIntegrations: number;
  readonly newtonTolerance: number;
  readonly newtonMaxIterations: number;
  readonly hyperbolicTolerance: number;
}

/** The edge state one track ends on. */
export type EdgeTrack =
  | {
      /** The edge trajectory settled on an equilibrium of the boundary (polished by Newton's method). */
      readonly kind: 'equilibrium';
      readonly equilibrium: Equilibrium;
      /** Index into `states` of the far side's fate. */
      readonly destination: number;
      readonly integrations: number;
    }
  | {
      /**
       * The edge trajectory kept moving for trackTime: `samples` are its points over the second half
       * of that time (one per stretch), `minSpeed` the least max-norm speed |F| among them.
       */
      readonly kind: 'moving';
      readonly samples: readonly (readonly number[])[];
      readonly minSpeed: number;
      readonly destination: number;
      readonly integrations: number;
    }
  | {
      /** No boundary between the two ends, a fate that was not decided, or the budget ran out. */
      readonly kind: 'unresolved';
      readonly why: string;
      readonly integrations: number;
    };

/**
 * Fate of a point: the index of the stable state its trajectory arrives at (inside the ball of
 * radius min(1e-2 (1 + |x_k|), 0.25 d_k) around x_k, d_k the distance to the nearest other
 * equilibrium, so the ball never reaches halfway to a neighbour: our choice, no source), or -1.
 */
function fateOf(system: CompiledSystem, p: number, x: readonly number[], states: readonly (readonly number[])[], radii: readonly number[], flow: FlowSettings): number {
  let reached = -1;
  integrateFlow(system, p, x, flow, (_t, y) => {
    for (let k = 0; k < states.length; k++) if (maxDist(y, states[k]) < radii[k]) { reached = k; return true; }
    return false;
  });
  return reached;
}

const maxAbs = (x: ArrayLike<number>) => { let m = 0; for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i])); return m; };
const mix = (a: readonly number[], b: readonly number[], s: number) => a.map((v, i) => v + s * (b[i] - v));

/**
 * Tracks the edge between the basin of `states[start]` and everything else at parameter p, starting
 * on the segment from the start state to `far` (a point whose trajectory does not return to the
 * start, e.g. another stable state). `equilibria` are every equilibrium known at p (for the arrival
 * radii). Deterministic: the same inputs give the same track.
 */
export function trackEdge(
  system: CompiledSystem,
  p: number,
  states: readonly (readonly number[])[],
  start: number,
  far: readonly number[],
  equilibria: readonly (readonly number[])[],
  settings: EdgeTrackSettings,
): EdgeTrack {
  const n = system.dimension;
  const radii = states.map((x) => {
    let nearest = Infinity;
    for (const y of equilibria) { const d = maxDist(x, y); if (d > 0 && d < nearest) nearest = d; }
    return Math.min(1e-2 * (1 + maxAbs(x)), 0.25 * nearest);
  });
  let integrations = 0;
  const fate = (x: readonly number[]) => { integrations++; return fateOf(system, p, x, states, radii, settings.flow); };
  const advance = (x: readonly number[], time: number) => {
    integrations++;
    return integrateFlow(system, p, x, { ...settings.flow, timeCap: time }, () => false);
  };
  const unresolved = (why: string): EdgeTrack => ({ kind: 'unresolved', why, integrations });

  let A: readonly number[] = states[start];
  let B: readonly number[] = far;
  let destination = fate(B);
  if (destination === start) return unresolved('the far end of the segment returns to the start state');
  if (destination < 0) return unresolved('the far end of the segment reaches no known stable state');

  const rates = new Float64Array(n);
  const xx = new Float64Array(n);
  const samples: number[][] = [];
  let minSpeed = Infinity;
  let t = 0;
  let step = settings.trackStep;
  while (t < settings.trackTime) {
    // Bisect [A, B]: A's side returns to the start, B's does not.
    const tol = settings.bisectTolerance * (1 + maxAbs(A));
    let a: readonly number[] = A;
    let b: readonly number[] = B;
    while (maxDist(a, b) > tol) {
      if (integrations >= settings.maxIntegrations) return unresolved(`${settings.maxIntegrations} integrations used before the edge state was reached`);
      const m = mix(a, b, 0.5);
      const f = fate(m);
      if (f === start) a = m;
      else if (f >= 0) { b = m; destination = f; }
      else return unresolved('a point near the boundary reached no known stable state');
    }
    const mid = mix(a, b, 0.5);
    xx.set(mid);
    system.rates(xx, p, rates);
    const speed = maxAbs(rates);
    if (speed < 1e-6 * (1 + maxAbs(mid))) {
      const polished = newtonAtFixedParameter(system, mid, p, settings.newtonTolerance, settings.newtonMaxIterations);
      if (polished.converged) {
        const e = analyseEquilibrium(system, polished.x, p, polished.residual, settings.hyperbolicTolerance);
        return { kind: 'equilibrium', equilibrium: e, destination, integrations };
      }
    }
    if (t >= settings.trackTime / 2) {
      samples.push(mid);
      minSpeed = Math.min(minSpeed, speed);
    }
    // Advance both sides; when they separate by more than 1e3 tolerances in one stretch the
    // unstable direction is fast, and the stretch is halved (and retried) so the pair stays close.
    const ra = advance(a, step);
    const rb = advance(b, step);
    if (ra.end !== 'time-cap' || rb.end !== 'time-cap') return unresolved('the integration near the boundary failed or left the state box');
    if (maxDist(ra.x, rb.x) > 1e3 * tol && step > settings.trackStep / 64) {
      step /= 2;
      A = a;
      B = b;
      continue;
    }
    A = ra.x;
    B = rb.x;
    t += step;
  }
  return { kind: 'moving', samples, minSpeed, destination, integrations };
}
