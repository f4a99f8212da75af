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
  /** Types of the special points at the two edges (or 'sweep-bound'). */
  readonly bounds: string[];
  readonly reason: string;
  /** Which start state the label is about; absent means all-base (tipping). */
  readonly start?: StartState;
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
