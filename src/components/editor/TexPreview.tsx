import { useMemo } from 'react';
import katex from 'katex';
import 'katex/dist/katex.min.css';
import { rateEquationTex, expressionToTex } from '../../lib/editor';

/**
 * Typeset preview of an expression. Renders KaTeX's MathML+HTML so screen readers get MathML;
 * a parse error shows as plain text (the server validator gives the authoritative message).
 */
export function TexPreview({ expression, variable, label }: { expression: string; variable?: string; label: string }) {
  const html = useMemo(() => {
    const r = variable === undefined ? expressionToTex(expression) : rateEquationTex(variable, expression);
    if (!r.ok) return null;
    try {
      return katex.renderToString(r.tex, { throwOnError: false, displayMode: true, output: 'htmlAndMathml' });
    } catch {
      return null;
    }
  }, [expression, variable]);
  return (
    <figure className="ed-tex" aria-label={label}>
      {html ? (
        <div dangerouslySetInnerHTML={{ __html: html }} />
      ) : (
        <p className="ed-hint">{expression.trim() === '' ? 'The typeset formula appears here.' : 'Cannot typeset this yet — keep typing.'}</p>
      )}
    </figure>
  );
}

/**
 * The expression as typed, with every symbol named in an error message underlined (wavy), so the
 * modeler sees where the validator's complaint points.
 */
export function MarkedExpression({ expression, messages, id }: { expression: string; messages: readonly string[]; id: string }) {
  const names = new Set<string>();
  for (const m of messages) for (const q of m.matchAll(/["“'`]([A-Za-z_][A-Za-z0-9_]*)["”'`]/g)) names.add(q[1]);
  if (messages.length === 0 || expression.trim() === '') return null;
  const parts = expression.split(/([A-Za-z_][A-Za-z0-9_]*)/);
  const marked = parts.some((p) => names.has(p));
  return (
    <p id={id} className="ed-marked ed-mono" aria-hidden="true">
      {marked
        ? parts.map((p, k) => (names.has(p) ? <mark key={k} className="ed-squiggle">{p}</mark> : <span key={k}>{p}</span>))
        : <mark className="ed-squiggle">{expression || ' '}</mark>}
    </p>
  );
}
