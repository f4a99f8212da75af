/** Shapes of a computed diagram. Plain arrays, so a diagram serializes to JSON as it is. */

export interface Eigenvalue { readonly re: number; readonly im: number }

/** One point on a branch. */
export interface BranchPoint {
  readonly p: number;
  readonly x: number[];
  /** Number of eigenvalues of J_x with positive real part. */
  readonly unstable: number;
  readonly eigenvalues?: Eigenvalue[];
}

export type BranchEnd =
  | 'sweep-bound'      // reached the edge of the sweep range
  | 'closed-loop'      // returned to its own start
  | 'merged'           // met a branch already traced
  | 'point-cap'        // hit the point cap
  | 'step-collapse'    // step size fell below the minimum
  | 'newton-failure'   // corrector failed repeatedly
  | 'state-bound';     // state left the allowed box

export interface Branch {
  readonly id: string;
  readonly points: BranchPoint[];
  /** How the branch was found: from a starting equilibrium, or by switching at a branch point. */
  readonly origin: { readonly kind: 'start' | 'switch'; readonly from?: string };
  /** How each end of the branch came to stop. */
  readonly ends: readonly [BranchEnd, BranchEnd];
}

export type SpecialPointType = 'saddle-node' | 'pitchfork' | 'transcritical' | 'hopf' | 'degenerate';

export interface SpecialPoint {
  readonly id: string;
  readonly type: SpecialPointType;
  readonly p: number;
  readonly x: number[];
  /** Ids of the branches passing through the point. */
  readonly branches: string[];
  /** Hopf only: the imaginary part of the critical pair. */
  readonly frequency?: number;
  /** The test-function values and criteria behind the classification, in words and numbers. */
  readonly evidence: { readonly reason: string; readonly [key: string]: unknown };
  /** Set for degenerate or doubtful cases. */
  readonly note?: string;
}

export interface Diagnostic {
  readonly level: 'info' | 'warning' | 'error';
  readonly code: string;
  readonly message: string;
  readonly branch?: string;
  readonly p?: number;
}

/**
 * Which starting equilibria a network trace used (docs/numerics.md §12). Present only when the
 * patterns were restricted: a diagram without it started from every combination of element
 * equilibria (or is not a network at an uncoupled start).
 */
export interface StartCoverage {
  readonly mode: 'restricted';
  /** k: every pattern with at most this many nodes off base (tipped or at a threshold) was started from. */
  readonly maxOffBase: number;
  /** Patterns selected at the sweep start: within k (of them stable at zero coupling), all-tipped and its neighbouring saddles. */
  readonly patterns: { readonly withinK: number; readonly stable: number; readonly nearAllTipped: number };
  /** Starting equilibria at the sweep start (Newton-refined patterns, plus the document's start guesses). */
  readonly starts: number;
  /** Near-uniform equilibria at the sweep end (strong-coupling seeds) traced as well. */
  readonly farEnd: number;
  /** The whole pattern space, e.g. "3^20", and its size. */
  readonly of: string;
  readonly ofCount: number;
  /** The budget of starts k was chosen for: min(startBudget, maxBranches). */
  readonly budget: number;
  /** Growth from the start state's escape graph: parameter values examined, stable states added, integrations, whether a cap stopped it. */
  readonly grown: { readonly values: number; readonly states: number; readonly integrations: number; readonly rounds: number; readonly stoppedBy: 'nothing-new' | 'start-budget' | 'integration-cap' | 'round-cap' | 'branch-cap' | 'not-bistable' | 'no-start-state' | 'cancelled' | 'failed' | 'off' };
  /** Starts not traced because the branch cap (maxBranches) stopped the trace. */
  readonly untraced: number;
  /** The plain statement, e.g. "branches through patterns with at most 2 nodes off base (…): 822 of 3^20 patterns; …". */
  readonly text: string;
}

export interface Diagram {
  readonly parameter: string;
  readonly variables: string[];
  readonly branches: Branch[];
  readonly bifurcations: SpecialPoint[];
  readonly diagnostics: Diagnostic[];
  readonly settings: Record<string, unknown>;
  readonly engineVersion: string;
  /** Set when the starting patterns were restricted (more than maxStartCombinations, or startSelection 'restricted'). */
  readonly coverage?: StartCoverage;
}
