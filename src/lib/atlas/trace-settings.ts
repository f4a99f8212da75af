import { z } from 'zod';

/**
 * Settings of a diagram trace. Arclength steps (measured in the raw (x, p) coordinates) are fractions
 * of max(|to - from|, 1 + max |x| over the starting equilibria); the parameter step and the switch
 * step are fractions of the sweep width |to - from|; everything else is absolute. Defaults are common practice
 * (no source) chosen and checked on the test models; see docs/numerics.md for the reasoning.
 */
export interface TraceSettings {
  /** Sweep start; default the document's sweep.from. Starting equilibria are computed here. */
  from?: number;
  /** Sweep end; default the document's sweep.to. */
  to?: number;
  /** First arclength step, as a fraction of the arclength scale (default 2e-3). */
  initialStep: number;
  /** Smallest arclength step before a branch ends with 'step-collapse' (default 1e-9). */
  minStep: number;
  /** Largest arclength step (default 2e-2). */
  maxStep: number;
  /** Largest parameter change per step (default 1/600 = 0.00167): special points closer than this fraction of the sweep width apart in p can merge. */
  maxParameterStep: number;
  /** Largest angle in radians between consecutive tangents (default 0.15). */
  maxTurn: number;
  /** Point cap per branch, both directions together (default 20000). */
  maxPointsPerBranch: number;
  /** Cap on the number of branches in a diagram (default 400). */
  maxBranches: number;
  /** Up to this many per-node combinations of element equilibria are all used as starts (default 3^8 = 6561). */
  maxStartCombinations: number;
  /**
   * 'auto' (default): every combination of element equilibria up to maxStartCombinations, the
   * restricted set beyond; 'restricted': the restricted set whatever the count (docs/numerics.md §12).
   */
  startSelection: StartSelection;
  /**
   * Restricted set only: starts allowed in all, patterns at the sweep start plus stable states added
   * from the start state's escape graph (default 1000: k = 2 nodes off base at 20 nodes, 822
   * patterns). k, the largest number of nodes off base, is chosen for min(startBudget, maxBranches)
   * starts, leaving room for n added states; at 20 nodes k = 2 therefore needs maxBranches raised.
   */
  startBudget: number;
  /** Restricted set only: cap on the manifold-branch integrations spent on growing it (default 4000; 0 turns growth off). */
  growthIntegrations: number;
  /** Restricted set only: evenly spaced interior parameter values where the start state's escape graph is followed (default 8), besides those next to the start branch's saddle-nodes. */
  growthValues: number;
  /** Cap on starting equilibria traced (default 6561). */
  maxStartingPoints: number;
  /** Corrector: residual |F|_inf tolerance (default 1e-10), step tolerance relative to 1 + |y| (default 1e-10), iteration cap (default 8). */
  residualTolerance: number;
  stepTolerance: number;
  maxCorrectorIterations: number;
  /** Location of special points: stop when the bracket is narrower than this in p (default 1e-11). */
  locateParameterTolerance: number;
  /** Iteration cap of the location (default 100). */
  locateMaxIterations: number;
  /** Branch stops when |x|_inf exceeds this (default 1e6). */
  stateBound: number;
  /** Interval [-b, b] scanned for element equilibria of a network node (default 10). */
  rootSearchBound: number;
  /** Cells of that scan (default 4000). */
  rootSearchCells: number;
  /** Extra multi-start Newton guesses (quasi-random in [-box, box]^n) when the start is not uncoupled (default 24, box 3). */
  multiStartCount: number;
  multiStartBox: number;
  /** Distance from a branch point at which the crossing branch is first computed, fraction of the sweep width (default 1e-3). */
  switchStep: number;
  /** Store eigenvalues with every branch point (default false; special points always carry them in evidence). */
  storeEigenvalues: boolean;
  /**
   * Fixed split of a full enumeration's starting equilibria into blocks traced independently and
   * merged in block order (docs/numerics.md §11), so that a trace on any number of threads gives the
   * same diagram: 'auto' (default) is one block below 512 starts and two from 512 on; a number
   * asks for that many (at most one per start). Restricted starts are always one block.
   */
  traceBlocks: 'auto' | number;
  /**
   * Parameter values (the far end and values evenly inside the sweep) at which multi-start Newton
   * looks for equilibria on branches that do not reach the sweep's start, traced after the blocks
   * (interior-seeds.ts; default 4; 0 turns it off).
   */
  interiorSeedValues: number;
}

export const defaultTraceSettings: Readonly<Required<Omit<TraceSettings, 'from' | 'to'>>> = Object.freeze({
  initialStep: 2e-3,
  minStep: 1e-9,
  maxStep: 2e-2,
  maxParameterStep: 1 / 600,
  maxTurn: 0.15,
  maxPointsPerBranch: 20000,
  maxBranches: 400,
  maxStartCombinations: 6561,
  startSelection: 'auto',
  startBudget: 1000,
  growthIntegrations: 4000,
  growthValues: 8,
  maxStartingPoints: 6561,
  residualTolerance: 1e-10,
  stepTolerance: 1e-10,
  maxCorrectorIterations: 8,
  locateParameterTolerance: 1e-11,
  locateMaxIterations: 100,
  stateBound: 1e6,
  rootSearchBound: 10,
  rootSearchCells: 4000,
  multiStartCount: 24,
  multiStartBox: 3,
  switchStep: 1e-3,
  storeEigenvalues: false,
  traceBlocks: 'auto',
  interiorSeedValues: 4,
});

export type ResolvedTraceSettings = Required<TraceSettings>;

export type StartSelection = 'auto' | 'restricted';

/**
 * The start-selection settings as a strict zod schema, for callers that take them from people
 * (a run's settings, the CLI): the same names and limits the engine checks (checkSettings).
 */
export const startSelectionSettingsSchema = z.object({
  startSelection: z.enum(['auto', 'restricted'], { message: "must be 'auto' or 'restricted'" }).optional(),
  startBudget: z.number().int('must be a whole number').min(2, 'at least 2').max(100_000, 'at most 100000').optional(),
  growthIntegrations: z.number().int('must be a whole number').min(0, 'at least 0').max(1_000_000, 'at most 1000000').optional(),
  growthValues: z.number().int('must be a whole number').min(0, 'at least 0').max(1000, 'at most 1000').optional(),
  interiorSeedValues: z.number().int('must be a whole number').min(0, 'at least 0').max(64, 'at most 64').optional(),
}).strict();
