/** Shapes of the critical-coupling analysis (docs/onset.md). Plain data, serializable as it is. */
import type { Diagnostic } from '../atlas/types';
import type { TraceSettings } from '../atlas/trace-settings';

/**
 * Settings of criticalCoupling. Continuation and location use the engine's trace settings
 * (defaultTraceSettings, same scaling rules as traceDiagram); the flow past the fold uses the
 * regime analysis's integration defaults (docs/regimes.md).
 */
export interface CriticalCouplingOptions {
  /** Sweep start; default the document's sweep.from. The single-tipped patterns are built here. */
  readonly from?: number;
  /** Sweep end; default sweep.to. Branches are followed from `from` towards `to` only. */
  readonly to?: number;
  /** Node indices to analyse (default all, in order). */
  readonly nodes?: readonly number[];
  /** Continuation and location settings (partial; missing ones are the engine's defaults). */
  readonly trace: Partial<TraceSettings>;
  /**
   * The flow is integrated at p_fold + dir × pastFold × |to − from| (default 1e-5: 170 times finer than the
   * engine's special-point resolution, width / 600, and short enough a ghost passage, ∝ pastFold^(-1/2)).
   */
  readonly pastFold: number;
  /** Grid points of the root scan of each uncoupled element on [−rootSearchBound, rootSearchBound] (default 4001, bound 10). */
  readonly scanPoints: number;
  readonly rootSearchBound: number;
  /** Flow integration (odex): tolerances, caps; defaults rtol 1e-8, atol 1e-10, time cap 1e6, 200 000 steps, box 1e6. */
  readonly relativeTolerance: number;
  readonly absoluteTolerance: number;
  readonly timeCap: number;
  readonly maxSteps: number;
  readonly stateBound: number;
  /** The flow has settled when max|F| falls below this (default 1e-10). */
  readonly settledSpeed: number;
  /** Newton polish of the settled state at fixed p: residual tolerance (max norm) and cap (defaults 1e-12, 40). */
  readonly newtonTolerance: number;
  readonly newtonMaxIterations: number;
  /** Eigenvalues with |Re| below this count as zero (default 1e-9). */
  readonly hyperbolicTolerance: number;
}

export type NodeOnsetStatus = 'fold' | 'none-in-range' | 'failed' | 'cancelled';

/** The critical coupling of one node. */
export interface NodeOnset {
  readonly index: number;
  readonly id: string;
  readonly status: NodeOnsetStatus;
  /** Coupling at the first saddle-node of the branch through "only this node tipped"; null unless status is 'fold'. */
  readonly critical: number | null;
  /**
   * Ids of nodes that are tipped where the flow just past the fold settles and were base before
   * (empty: nobody follows); null when there is no fold or the destination was not resolved.
   */
  readonly next: string[] | null;
  /** Ids of nodes tipped before and base at the destination (usually the node itself when it is pulled back). */
  readonly recovered: string[] | null;
  /** State at the fold. */
  readonly foldState: number[] | null;
  /** Location of the fold: bracket width in p, iterations, converged. */
  readonly located: { readonly converged: boolean; readonly iterations: number; readonly parameterBracket: number } | null;
  /** Set when the branch lost stability (eigenvalue crossing, e.g. a branch point or Hopf point) before its fold. */
  readonly lostStabilityAt: number | null;
  /** Stable state the flow past the fold settled in, and the parameter it was integrated at. */
  readonly destination: { readonly p: number; readonly x: number[]; readonly time: number } | null;
  /** Continuation points computed on this branch. */
  readonly points: number;
}

export interface CriticalCouplingResult {
  /** Name of the swept (coupling) parameter. */
  readonly parameter: string;
  readonly from: number;
  readonly to: number;
  readonly nodes: NodeOnset[];
  readonly diagnostics: Diagnostic[];
  /** True when every analysed node ended with status 'fold' or 'none-in-range' and, at a fold, a resolved destination. */
  readonly converged: boolean;
  /** Continuation points over all branches (the work done). */
  readonly iterations: number;
}

export interface CriticalCouplingHooks {
  /** Called after every node with the fraction done (0..1) and a short phrase. */
  readonly onProgress?: (fraction: number, phrase: string) => void;
  /** Polled at every continuation step; true ends the analysis with the remaining nodes 'cancelled'. */
  readonly isCancelled?: () => boolean;
}

/** Broken contract of the input (not numerical trouble): `field` names the offending field. */
export class OnsetInputError extends Error {
  readonly field: string;
  constructor(field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'OnsetInputError';
    this.field = field;
  }
}
