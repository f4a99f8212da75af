/** Shapes of the coupling-regime analysis. */

export type Regime = 'weak' | 'intermediate' | 'strong';
export type NodeState = 'base' | 'tipped';
export type EdgeKind = 'contained' | 'cascading' | 'synchronous';
/** The stable state whose ways out are classified: tipping from all-base, or recovery from all-tipped. */
export type StartState = 'all-base' | 'all-tipped';

export interface StableState { readonly x: number[]; readonly pattern: NodeState[] }

export interface SaddleEdge {
  readonly x: number[];
  readonly pattern: NodeState[];
  /** Indices into EscapeGraph.states reached by the two branches of the unstable manifold. */
  readonly from: number;
  readonly to: number;
  /** Set for edges out of the all-base state. */
  readonly kind?: EdgeKind;
  /** Cascading edges: time the manifold spends near a vanished state (slow passage). */
  readonly slowPassage?: number;
  /** The unstable eigenvalue of the saddle. */
  readonly eigenvalue?: number;
  /** The unit unstable eigenvector, sign chosen so that its largest component is positive. */
  readonly direction?: number[];
  /** Integration time each manifold branch took to reach its stable state ([to from, to to]). */
  readonly travelTimes?: [number, number];
  /** Set when the edge leaves a start state other than all-base (e.g. recovery from all-tipped). */
  readonly kinds?: Partial<Record<StartState, EdgeKind>>;
}

export interface EscapeGraph {
  readonly p: number;
  readonly states: StableState[];
  readonly saddles: SaddleEdge[];
}

export interface RegimeBand {
  readonly from: number;
  readonly to: number;
  readonly regime: Regime;
  /**
   * What ends the band at its lower and upper edge: the types of a special point ('saddle-node',
   * 'pitchfork + saddle-node'), 'sweep-bound', or a located crossover in words
   * ('saddle connection: ...', 'engagement crossover: ...'; see RegimeResult.crossovers).
   */
  readonly bounds: string[];
  readonly reason: string;
  /** Which start state the label is about; absent means all-base (tipping). */
  readonly start?: StartState;
  /**
   * The exits behind `reason` (the band's first stretch of unchanged reasons), taken at `exitsAt`:
   * one row each for the band's exit table. Absent in results stored before engine 1.3.
   */
  readonly exits?: BandExit[];
  readonly exitsAt?: number;
}

/** One exit of the start state (regimes/start-exits.ts), in node indices of the model and the start's frame. */
export interface BandExit {
  /** The index-1 saddle. */
  readonly saddle: number[];
  /** Nodes with progress >= engagedProgress at the saddle. */
  readonly engaged: number[];
  /** Nodes that leave the start's level at the destination (tip, or recover for all-tipped). */
  readonly tipping: number[];
  /** Pattern of the stable state the exit leads to. */
  readonly destination: NodeState[];
  /** contained (only the engaged nodes change), synchronous (one unit, every node) or cascading. */
  readonly kind: EdgeKind;
  /** 'moving-edge': a moving state on the basin boundary, not a saddle (`saddle` is its snapshot with the most nodes engaged; Exit.via). */
  readonly via?: 'moving-edge';
}

/** What kind of event a located band edge is. Special points and sweep ends are named by their types in `bounds`. */
export type CrossoverKind = 'saddle-connection' | 'engagement-crossover' | 'label-undefined';

/**
 * A change of the label's reasons between two special points, located by bisection: a saddle
 * connection (an exit's destination changes, or a saddle starts or stops being an exit, without a
 * local bifurcation) or an engagement crossover (a node's progress at an exit saddle crosses the
 * engagement threshold). `label-undefined`: one side has no label (the reason says why).
 */
export interface LocatedCrossover {
  readonly p: number;
  readonly kind: CrossoverKind;
  readonly start: StartState;
  /** In words, as in the band's bounds: "saddle connection: the exit over n2 now ends in all tipped". */
  readonly description: string;
  /** Labels just below and just above p (null: no label). */
  readonly below: Regime | null;
  readonly above: Regime | null;
  /** Width of the final bisection bracket around p. */
  readonly bracket: number;
}

/** A modeler's own tag on a band or any parameter range, stored beside the automatic labels. */
export interface BandTag {
  readonly from: number;
  readonly to: number;
  readonly name: string;
  /** CSS colour, #rrggbb. */
  readonly colour: string;
  readonly note: string;
}
