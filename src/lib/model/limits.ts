/**
 * Caps on model documents. They keep compile time, Jacobian size and the starting-equilibrium
 * enumeration bounded; every one is enforced by validation with an error naming the field and the cap.
 */
export const MODEL_LIMITS = {
  /** State variables (ode-1) or nodes (network-1). The Jacobian is at most 64 x 64. */
  maxVariables: 64,
  /** Links as written (twoWay counts once here); 64 * 64 covers a complete directed graph. */
  maxLinks: 64 * 64,
  /** Parameters of the element (network-1) or of the system (ode-1); also per-node overrides. */
  maxParameters: 64,
  /** Characters in a parameter, variable or node name. */
  maxNameLength: 64,
  /** Characters in one expression. */
  maxExpressionLength: 2000,
  /** Bracket nesting in one expression's text (checked before parsing). */
  maxExpressionDepth: 200,
  /**
   * Depth of one parsed expression tree (operators and calls); a chain like `x*x*...*x` is as deep
   * as it is long, so this bounds chains to 400 operations.
   */
  maxTreeDepth: 400,
  /** Characters in the document's name. */
  maxDocumentNameLength: 200,
  /**
   * Tree nodes of all compiled rates and Jacobian entries together (explicit form). A symbolic
   * Jacobian repeats shared subexpressions in every entry, so dense nonlinear systems grow fast;
   * at this size compiling takes about a second here.
   */
  maxGeneratedTreeNodes: 500_000,
  /** Entries in the `start` list. */
  maxStartGuesses: 256,
} as const;
