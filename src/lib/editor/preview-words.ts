/**
 * Engine diagnostics in the editor's live preview, in the modeler's words. The engine's messages name
 * its settings for people who can set them (the CLI, `maxBranches`, `maxPointsPerBranch = 800`); the
 * preview traces with a small budget of its own that the modeler does not set, so those names become
 * "the preview's limit", and the matrix symbols become words.
 */
const REPLACEMENTS: readonly [RegExp, string][] = [
  [/,?\s*maxPointsPerBranch = \d+/g, ''],
  [/\s*\((?:maxBranches|maxStartingPoints|maxStartCombinations|maxPointsPerBranch)\)/g, ' (a limit of the quick preview; a full run goes further)'],
  // The bracketed pair before its parts.
  [/\[J_x \| F_p\]/g, 'the Jacobian extended by the parameter derivative'],
  [/\bJ_x\b/g, 'the Jacobian'],
  [/\bF_p\b/g, 'the parameter derivative'],
];

export function engineWords(message: string): string {
  return REPLACEMENTS.reduce((out, [pattern, words]) => out.replace(pattern, words), message);
}
