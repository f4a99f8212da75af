/**
 * Shapes of the noise layer: additive noise dx = F(x; p) dt + diag(sigma) dW (docs/noise.md).
 *
 * Scaling convention. sigma_i = level * weight_i, where `level` is the document's (or the run's)
 * amplitude and weight_i = sigma_i / level (1 for variables without an override). In the scaled
 * coordinates y_i = x_i / weight_i the noise is isotropic with amplitude `level`, so every barrier
 * below is measured in units of level^2: rates go like exp(-barrier / level^2), and the action of a
 * path is S_T[phi] = 1/2 int sum_i (phi_i' - F_i(phi))^2 / weight_i^2 dt.
 */
import type { Diagnostic } from '../atlas/types';
import type { Equilibrium } from '../regimes/equilibria-at';
import type { NodeRoles } from '../regimes/element-roles';
import type { EscapeGraph } from '../regimes/types';

/** Noise of one study, resolved per state variable. */
export interface NoiseSpec {
  /** The amplitude every barrier is measured against (sigma = level * weights[i]). */
  readonly level: number;
  /** weights[i] = sigma_i / level, all positive and finite; length n. */
  readonly weights: Float64Array;
}

/**
 * The escape graph at one parameter value with what the noise layer needs beyond it: the full
 * equilibrium data (spectra, unstable eigenvectors) of its stable states and saddles, and the node
 * roles that define escape thresholds. `states[k]` belongs to `graph.states[k]`, `saddles[e]` to
 * `graph.saddles[e]`.
 */
export interface NoiseGraph {
  readonly p: number;
  readonly graph: EscapeGraph;
  readonly states: readonly Equilibrium[];
  readonly saddles: readonly Equilibrium[];
  /** Per node: base < threshold < tipped of the uncoupled element at p. */
  readonly roles: readonly NodeRoles[];
  readonly diagnostics: readonly Diagnostic[];
}

/** How a barrier was computed. */
export type BarrierMethod = 'potential' | 'minimum-action';

/** The quasi-potential barrier from one stable state to one adjacent index-1 saddle. */
export interface Barrier {
  readonly p: number;
  /** Index into NoiseGraph.graph.states: the state left. */
  readonly from: number;
  /** Index into NoiseGraph.graph.saddles: the saddle crossed. */
  readonly saddle: number;
  /** Index into NoiseGraph.graph.states: where the other manifold branch of the saddle ends. */
  readonly to: number;
  /** Quasi-potential V(saddle) - V(state) in units of level^2 (gradient systems: 2 (U(saddle) - U(state))). */
  readonly barrier: number;
  readonly method: BarrierMethod;
  /** The minimum-action path from the state to the saddle, in original coordinates. */
  readonly path: readonly (readonly number[])[];
  /** Whether the path method met its tolerance (always true for 'potential'). */
  readonly converged: boolean;
  /** Method details: iterations, discretization, last change, gradient-test residual. */
  readonly detail: Readonly<Record<string, number | string | boolean>>;
}

/** Where the lowest barrier out of a state passes from one saddle to another along the parameter. */
export interface ExitSwitch {
  readonly p: number;
  /** Index of the state (in the escape graph next to the switch) and its pattern. */
  readonly state: string;
  /** The two saddles (by pattern words) whose barriers cross. */
  readonly saddles: readonly [string, string];
  readonly barrier: number;
}

/** Progress report of a long loop; `fraction` in [0, 1]. */
export type Progress = (report: { readonly fraction: number; readonly pathsDone?: number; readonly stage?: string }) => void;

/** Cancellation: loops check `aborted` at least every few milliseconds of work. */
export interface CancelSignal { readonly aborted: boolean }
