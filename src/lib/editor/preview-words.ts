/**
 * Engine diagnostics in the editor's live preview, in the modeler's words. The engine's messages name
 * its settings for people who can set them (the CLI, `maxBranches`, `maxPointsPerBranch = 800`); the
 * preview traces with a small budget of its own that the modeler does not set, so those names become
 * "the preview's limit", and the matrix symbols become words.
 */
const SETTING_NAMES: readonly [RegExp, string][] = [
  [/,?\s*maxPointsPerBranch = \d+/g, ''],
  [/\s*\((?:maxBranches|maxStartingPoints|maxStartCombinations|maxPointsPerBranch)\)/g, ' (a limit of the quick preview; a full run goes further)'],
  [/\bJ_x\b/g, 'the Jacobian'],
  [/\bF_p\b/g, 'the parameter derivative'],
];

export function engineWords(message: string): string {
  let out = message;
  // The bracketed pair first, before its parts are replaced one by one.
  out = out.replace(/\[J_x \| F_p\]/g, 'the Jacobian extended by the parameter derivative');
  for (const [pattern, words] of SETTING_NAMES) out = out.replace(pattern, words);
  return out;
}
