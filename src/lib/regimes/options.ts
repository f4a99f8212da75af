import type { StartState } from './types';

/** Per-node roles given by the model instead of being derived from the uncoupled element. */
export interface GivenRoles { readonly base: number; readonly threshold: number; readonly tipped: number }

/**
 * Settings of the regime analysis. Every tolerance is listed with its reason in docs/regimes.md.
 * State-space distances are scaled by (1 + |x|) unless said otherwise.
 */
export interface RegimeOptions {
  /** Analysed parameter range; defaults to the diagram's settings.from/to, else the model's sweep. */
  readonly from?: number;
  readonly to?: number;
  /** Start states whose ways out are labelled. 'all-base' (tipping) always comes first. */
  readonly starts: readonly StartState[];
  /** Roles per node, overriding the uncoupled-element analysis (for elements of other shapes). */
  readonly roles?: readonly GivenRoles[];
  /** Grid points used to bracket the roots of each uncoupled element. */
  readonly scanPoints: number;
  /** Newton's method at fixed p: iteration cap and residual tolerance (max norm of F). */
  readonly newtonMaxIterations: number;
  readonly newtonTolerance: number;
  /** Two equilibria closer than this (max norm, relative) are one. */
  readonly duplicateTolerance: number;
  /** Eigenvalues with |Re| below this count as zero: the equilibrium is not hyperbolic. */
  readonly hyperbolicTolerance: number;
  /** Initial offset along the unstable eigenvector, relative to 1 + |x_saddle|. */
  readonly manifoldOffset: number;
  /** ODE integration (Hairer's GBS extrapolation code, package odex). */
  readonly relativeTolerance: number;
  readonly absoluteTolerance: number;
  readonly timeCap: number;
  readonly maxSteps: number;
  /** A trajectory whose speed max|F| falls below this has settled on an equilibrium (checked away from the saddle). */
  readonly settledSpeed: number;
  /** A trajectory leaving the box |x_i| <= stateBound has escaped. */
  readonly stateBound: number;
  /** Arrival ball around a stable state: this fraction of its distance to the nearest other equilibrium ... */
  readonly arrivalFraction: number;
  /** ... but never more than this (relative). */
  readonly arrivalRadius: number;
  /** Progress (0 at base, 1 at threshold) from which a node counts as engaged at a saddle. */
  readonly engagedProgress: number;
  /** Synchronous edges: smallest allowed ratio of eigenvector components on tipping nodes. */
  readonly comparableRatio: number;
  /** Slow passage: speed below this fraction of the trajectory's peak speed counts as slow. */
  readonly slowSpeedFraction: number;
  /** Slow passage: the first and last parts of the trajectory, as fractions of the saddle–target distance, are left out. */
  readonly slowExclusion: number;
  /** Cut at every special point, also those where only equilibria with two or more unstable eigenvalues meet. */
  readonly allCuts: boolean;
  /** Cap on manifold-branch integrations in one labelRegimes call; intervals past it stay unlabelled. */
  readonly maxIntegrations: number;
  /** Intervals narrower than this (absolute in p) are not analysed. */
  readonly minimumInterval: number;
  /** Skip manifold branches that provably cannot reach the start state (cooperative systems; see startExits). */
  readonly monotoneSkip: boolean;
  /**
   * In the cooperative case, let the order of the equilibria decide where a manifold branch ends
   * (orderedLimit in start-exits.ts) at points whose equilibria were continued inside a span, instead
   * of integrating; points refined from the diagram integrate and check the order against it.
   */
  readonly orderedLimits: boolean;
  /** Sampling between cuts: the interval is first cut into this many equal pieces. */
  readonly initialSamples: number;
  /** Sampling: a piece is halved while an exit's progress moves more than this across it, or sits this close to engagedProgress ... */
  readonly progressStep: number;
  /** ... down to this fraction of the interval between cuts. */
  readonly finestFraction: number;
  /** Crossovers (changes of the label's reasons between samples) are bisected to this width in p (absolute). */
  readonly locateTolerance: number;
  /** Samples next to a cut sit this far inside (relative to 1 + |p|, at most 1% of the interval). */
  readonly cutOffset: number;
  /** Build the full escape graph (every saddle, both branches) at the middle of every piece of constant label reasons. */
  readonly escapeGraphs: boolean;
  /**
   * Sample across cuts that cannot change the start's label (saddle-nodes whose two equilibria are
   * neither the start state, an exit saddle nor an exit's destination; docs/regimes.md, "Cuts that
   * cannot change a label"). false: every cut starts a new sampled interval, as before engine 1.5.
   */
  readonly mergeCuts: boolean;
  /** Sampling across merged cuts: pieces of at most this fraction of the sweep range. */
  readonly maxSampleSpacing: number;
  /**
   * Continued index-1 saddles update their unstable eigenpair from the previous one instead of
   * computing the full spectrum, when the safeguards of saddle-update.ts prove the index unchanged
   * (docs/regimes.md, "Speed"). false: the full spectrum at every continued saddle.
   */
  readonly saddleUpdate: boolean;
  /**
   * Where no index-1 saddle leads out of the start state, track the edge of its basin (edge-tracking.ts;
   * docs/regimes.md, "Exits through a moving edge state"). false: such points stay unlabelled
   * (no-escape-route), as before engine 1.9.
   */
  readonly edgeTracking: boolean;
  /** Edge tracking: time the boundary trajectory is followed, the stretch between re-bisections, ... */
  readonly edgeTrackTime: number;
  readonly edgeTrackStep: number;
  /** ... the pair's distance after each bisection (max norm, relative), and the fate integrations one track may use. */
  readonly edgeBisectTolerance: number;
  readonly edgeTrackIntegrations: number;
}

export const defaultRegimeOptions: RegimeOptions = {
  starts: ['all-base'],
  scanPoints: 4001,
  newtonMaxIterations: 40,
  newtonTolerance: 1e-12,
  duplicateTolerance: 1e-7,
  hyperbolicTolerance: 1e-9,
  manifoldOffset: 1e-5,
  relativeTolerance: 1e-8,
  absoluteTolerance: 1e-10,
  timeCap: 1e6,
  maxSteps: 200_000,
  stateBound: 1e6,
  settledSpeed: 1e-10,
  arrivalFraction: 0.25,
  arrivalRadius: 1e-3,
  engagedProgress: 0.5,
  comparableRatio: 1 / 3,
  slowSpeedFraction: 0.1,
  slowExclusion: 0.1,
  allCuts: false,
  maxIntegrations: 40_000,
  minimumInterval: 1e-12,
  monotoneSkip: true,
  orderedLimits: true,
  initialSamples: 4,
  progressStep: 0.05,
  finestFraction: 1 / 200,
  locateTolerance: 1e-9,
  cutOffset: 1e-7,
  escapeGraphs: true,
  mergeCuts: true,
  maxSampleSpacing: 1 / 32,
  saddleUpdate: true,
  edgeTracking: true,
  edgeTrackTime: 400,
  edgeTrackStep: 5,
  edgeBisectTolerance: 1e-7,
  edgeTrackIntegrations: 4000,
};

export function resolveOptions(options: Partial<RegimeOptions> | undefined): RegimeOptions {
  return { ...defaultRegimeOptions, ...(options ?? {}) };
}
