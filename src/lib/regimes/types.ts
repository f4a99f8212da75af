/** Shapes of the coupling-regime analysis. */

export type Regime = 'weak' | 'intermediate' | 'strong';
export type NodeState = 'base' | 'tipped';
export type EdgeKind = 'contained' | 'cascading' | 'synchronous';

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
