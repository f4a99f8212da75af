/** Shapes and settings of a two-parameter map (docs/maps.md). Plain arrays, so a map serializes to JSON as it is. */
import type { Diagnostic } from '../atlas/types.js';
import type { Regime } from '../regimes/types.js';
import type { CurveEnd } from '../numerics/continue-curve.js';

/** How a direction of a map curve ended: the driver's ends, or stopped at a Bogdanov-Takens point (a Hopf curve, where it turns into neutral saddles). */
export type MapCurveEnd = CurveEnd | 'bogdanov-takens';

export interface MapSettings {
  /** Range of the swept (first) parameter; default the system's sweep. */
  from?: number;
  to?: number;
  /** Range of the second parameter (required). */
  secondFrom: number;
  secondTo: number;
  /** One-parameter diagrams are traced at this many evenly spaced values of the second parameter (ends included) to seed curves (default 5). */
  seeds: number;
  /** One-parameter diagrams in the second parameter at this many evenly spaced values of the first (ends included) also seed curves, e.g. folds that do not depend on the first parameter (default 3; 0: none). */
  crossSeeds: number;
  /** Regime sampling grid: columns in the first parameter x rows in the second (default 9 x 5); 0 x 0 skips the regions. */
  regionColumns: number;
  regionRows: number;
  /** Point cap per curve, both directions together (default 4000). */
  maxPointsPerCurve: number;
  /** Cap on curves (default 64). */
  maxCurves: number;
  /** Arclength steps as fractions of max(width a, width b, 1 + max|x|) (defaults as the one-parameter trace: 2e-3, 1e-9, 2e-2). */
  initialStep: number;
  minStep: number;
  maxStep: number;
  /** Largest change of either parameter per step, as a fraction of its range (default 1/400). */
  maxParameterStep: number;
  maxTurn: number;
  residualTolerance: number;
  stepTolerance: number;
  maxCorrectorIterations: number;
  stateBound: number;
}

export const defaultMapSettings = Object.freeze({
  seeds: 5,
  crossSeeds: 3,
  regionColumns: 9,
  regionRows: 5,
  maxPointsPerCurve: 4000,
  maxCurves: 64,
  initialStep: 2e-3,
  minStep: 1e-9,
  maxStep: 2e-2,
  maxParameterStep: 1 / 400,
  maxTurn: 0.15,
  residualTolerance: 1e-10,
  stepTolerance: 1e-10,
  maxCorrectorIterations: 8,
  stateBound: 1e6,
});

export type MapCurveType = 'saddle-node' | 'pitchfork' | 'hopf';

export interface MapCurvePoint {
  /** [first, second] parameter values. */
  readonly p: [number, number];
  readonly x: number[];
  /** Hopf curves: the imaginary part ω of the critical pair ±iω. */
  readonly frequency?: number;
}

export interface MapCurve {
  readonly id: string;
  readonly type: MapCurveType;
  readonly points: MapCurvePoint[];
  readonly ends: [MapCurveEnd, MapCurveEnd];
  /** The one-parameter special point it was continued from (at first = p, second = second), and which parameter that diagram swept. */
  readonly seed: { readonly second: number; readonly p: number; readonly x: number[]; readonly swept?: 'first' | 'second' };
}

export type MapPointType = 'cusp' | 'bogdanov-takens' | 'saddle-node-meets-pitchfork' | 'degenerate-pitchfork';

export interface MapPoint {
  readonly id: string;
  readonly type: MapPointType;
  readonly p: [number, number];
  readonly x: number[];
  /** The curves it was found on (a Bogdanov-Takens point lies on a saddle-node and a Hopf curve). */
  readonly curves: string[];
  readonly evidence: { readonly reason: string; readonly [key: string]: unknown };
  /** Set for doubtful or degenerate cases. */
  note?: string;
}

export interface MapRegion {
  readonly id: string;
  /** The coupling regime of the samples in the region (null: no label there, see reason). */
  readonly regime: Regime | null;
  readonly reason: string;
  /** Grid samples [first, second] in the region. */
  readonly samples: [number, number][];
  /** Curves crossed between a sample of this region and a neighbouring sample of another region. */
  readonly boundedBy: string[];
  /** Neighbouring pairs with different labels and no located curve between them (e.g. a saddle connection or crossover, not continued here). */
  readonly unlocatedEdges: number;
}

export interface TwoParameterMap {
  readonly parameters: [string, string];
  readonly ranges: { readonly first: [number, number]; readonly second: [number, number] };
  readonly curves: MapCurve[];
  readonly points: MapPoint[];
  readonly regions: MapRegion[];
  readonly diagnostics: Diagnostic[];
  readonly settings: Record<string, unknown>;
}

export interface MapHooks {
  onProgress?: (fraction: number, phrase: string) => void;
  isCancelled?: () => boolean;
}
