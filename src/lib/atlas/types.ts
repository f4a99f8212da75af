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

export interface Diagram {
  readonly parameter: string;
  readonly variables: string[];
  readonly branches: Branch[];
  readonly bifurcations: SpecialPoint[];
  readonly diagnostics: Diagnostic[];
  readonly settings: Record<string, unknown>;
  readonly engineVersion: string;
}
