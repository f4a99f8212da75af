/**
 * A model document compiled into fast closures: the rates F(x, p), the state Jacobian J_x and the
 * parameter derivative F_p, all with respect to the one swept parameter p. Every other parameter is
 * fixed at compile time. Nothing here parses: expressions are compiled once by `compileModel`.
 */
export interface CompiledSystem {
  /** Number of state variables n. */
  readonly dimension: number;
  /** State variable names, length n (network form: one per node, named after the node id). */
  readonly variables: readonly string[];
  /** Name of the swept parameter. */
  readonly parameter: string;
  /** Sweep range from the document (may be overridden by run settings). */
  readonly sweep: { readonly from: number; readonly to: number };
  /** Starting guesses from the document's `start` list (may be empty). */
  readonly start: readonly Float64Array[];
  /** out[i] = F_i(x, p). Returns out. */
  rates(x: Float64Array, p: number, out: Float64Array): Float64Array;
  /** out[i * n + j] = dF_i/dx_j at (x, p), row-major n x n. Returns out. */
  jacobian(x: Float64Array, p: number, out: Float64Array): Float64Array;
  /** out[i] = dF_i/dp at (x, p). Returns out. */
  parameterDerivative(x: Float64Array, p: number, out: Float64Array): Float64Array;
  /** Present for network documents: what regimes and starting equilibria need to know. */
  readonly network?: NetworkStructure;
}

/** The network form's structure, kept for starting equilibria and regime patterns. */
export interface NetworkStructure {
  readonly nodeIds: readonly string[];
  /** Directed links after expanding `twoWay` (from/to are node indices). */
  readonly links: readonly { readonly from: number; readonly to: number; readonly weight: number }[];
  /** True when the swept parameter is the coupling parameter. */
  readonly sweepIsCoupling: boolean;
  /** The coupling parameter's value when it is not swept. */
  readonly couplingValue: number;
  /**
   * The uncoupled element of node i: f_i(x; p) and df_i/dx (p is the swept parameter's value;
   * it only matters when the sweep is over an element parameter that node i does not override).
   */
  elementRate(i: number, x: number, p: number): number;
  elementDerivative(i: number, x: number, p: number): number;
}
