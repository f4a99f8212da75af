import { DOCUMENT_FUNCTIONS } from './expr';
import { MODEL_LIMITS } from './limits';

/** Names usable in expressions: ASCII letters, digits and underscores, not starting with a digit. */
export const NAME_PATTERN = /^[A-Za-z_][A-Za-z0-9_]*$/;

/**
 * Words the expression parser (mathjs) reads as operators, keywords or literals, and the function
 * names; a parameter or variable called like this could not be written in an expression.
 */
export const RESERVED_NAMES: ReadonlySet<string> = new Set([
  'and', 'or', 'not', 'xor', 'mod', 'to', 'in', 'end',
  'true', 'false', 'null', 'undefined', 'NaN', 'Infinity',
  // JavaScript objects treat this key specially; JSON parsers and zod would drop or misread it.
  '__proto__',
  ...Object.keys(DOCUMENT_FUNCTIONS),
]);

/** Why `name` cannot be a parameter or variable name, or null when it can. */
export function nameProblem(name: string): string | null {
  if (name.length === 0) return 'name must not be empty';
  if (name.length > MODEL_LIMITS.maxNameLength) {
    return `name is too long: at most ${MODEL_LIMITS.maxNameLength} characters are allowed, got ${name.length}`;
  }
  if (!NAME_PATTERN.test(name)) {
    return `'${name}' is not a valid name (letters, digits and '_', not starting with a digit)`;
  }
  if (RESERVED_NAMES.has(name)) return `'${name}' is reserved (an operator, keyword or function name)`;
  return null;
}

/** Short list for messages: "a, b, c" or "(none)". */
export function listNames(names: Iterable<string>): string {
  const all = [...names];
  if (all.length === 0) return '(none)';
  return all.length > 20 ? `${all.slice(0, 20).join(', ')}, ...` : all.join(', ');
}
