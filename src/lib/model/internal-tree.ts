import { checkExpression } from './check-expression';
import { ModelError } from './errors';
import { num, renameSymbols, replaceSymbols, type Expr } from './expr';
import { foldConstants } from './fold';

/** Parse and whitelist a (validated) expression, then rename its symbols to internal names. */
export function internalTree(text: string, allowed: readonly string[], rename: (name: string) => string, path: string): Expr {
  const checked = checkExpression(text, allowed);
  if (!checked.ok) throw new ModelError(checked.messages.map((message) => ({ path, message })));
  return renameSymbols(checked.expr, rename);
}

/** Replace symbols by numbers where `value` gives one, then fold constant subtrees (IEEE-exact). */
export function substitute(e: Expr, value: (name: string) => number | undefined): Expr {
  return foldConstants(replaceSymbols(e, (name) => {
    const v = value(name);
    return v === undefined ? undefined : num(v);
  }));
}

/** Run `work`; turn anything but a ModelError into one naming `path` (a compile bug, never silent). */
export function atPath<T>(path: string, work: () => T): T {
  try {
    return work();
  } catch (err) {
    if (err instanceof ModelError) throw err;
    throw new ModelError([{ path, message: `could not be compiled (${err instanceof Error ? err.message : String(err)})` }]);
  }
}
