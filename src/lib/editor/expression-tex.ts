import { create, parseDependencies } from 'mathjs';

// Only the parser and its node classes: this runs in the browser, where all of mathjs would be ~1 MB.
const { parse } = create({ parseDependencies });

export type TexResult = { ok: true; tex: string } | { ok: false; message: string };

/**
 * A rate expression as TeX for the typeset preview (mathjs's own printer, redundant parentheses dropped).
 * Only for display: whether the expression is allowed is the server validator's decision.
 */
export function expressionToTex(expression: string): TexResult {
  if (expression.trim() === '') return { ok: false, message: 'empty expression' };
  try {
    // mathjs prints names it also knows as units ("b", "rK"…) upright as \mathrm{…}; every symbol
    // of a rate is a variable or a parameter, so all of them are set in italics.
    const tex = parse(expression).toTex({ parenthesis: 'auto', implicit: 'show' });
    return { ok: true, tex: tex.replace(/\\mathrm\{([A-Za-z][A-Za-z0-9]*)\}/g, '\\mathit{$1}') };
  } catch (err) {
    return { ok: false, message: err instanceof Error ? err.message : String(err) };
  }
}

/** The full rate equation "dP/dt = …" for the preview header. */
export function rateEquationTex(variable: string, expression: string): TexResult {
  const r = expressionToTex(expression);
  if (!r.ok) return r;
  const v = variable.trim() === '' ? 'x' : variable.trim();
  const name = expressionToTex(v);
  const vt = name.ok ? name.tex.trim() : v;
  return { ok: true, tex: `\\frac{\\mathrm{d}${vt}}{\\mathrm{d}t} = ${r.tex}` };
}
