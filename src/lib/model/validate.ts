import { z } from 'zod';
import { formatPath, type ModelIssue } from './errors';
import { MODEL_LIMITS } from './limits';
import { KNOWN_FIELDS, modelDocumentSchema, type ModelDocument } from './schema';

export type ValidationResult =
  | { readonly ok: true; readonly document: ModelDocument }
  | { readonly ok: false; readonly issues: ModelIssue[] };

const NOUNS: Record<string, string> = {
  nodes: 'nodes', links: 'links', variables: 'variables', start: 'start guesses',
};

/** Plain-words messages for zod's structural issues; `ctx.data` gives the size actually sent. */
const errorMap: z.ZodErrorMap = (issue, ctx) => {
  switch (issue.code) {
    case z.ZodIssueCode.invalid_type:
      if (issue.received === 'undefined') return { message: 'is required' };
      return { message: `expected ${article(issue.expected)}, got ${article(issue.received)}` };
    case z.ZodIssueCode.invalid_literal:
      return { message: `expected ${JSON.stringify(issue.expected)}` };
    case z.ZodIssueCode.invalid_union_discriminator:
      return { message: `expected one of ${issue.options.map((o) => JSON.stringify(o)).join(', ')}` };
    case z.ZodIssueCode.not_finite:
      return { message: 'expected a finite number' };
    case z.ZodIssueCode.too_small:
      if (issue.type === 'string') return { message: 'must not be empty' };
      if (issue.type === 'array') return { message: `needs at least ${issue.minimum} entr${issue.minimum === 1 ? 'y' : 'ies'}` };
      break;
    case z.ZodIssueCode.too_big: {
      const got = Array.isArray(ctx.data) || typeof ctx.data === 'string' ? `, got ${ctx.data.length}` : '';
      const last = issue.path[issue.path.length - 1];
      if (issue.type === 'array') {
        const noun = (typeof last === 'string' && NOUNS[last]) || 'entries';
        return { message: `at most ${issue.maximum} ${noun} are allowed${got}` };
      }
      if (issue.type === 'string') return { message: `at most ${issue.maximum} characters are allowed${got}` };
      break;
    }
    default:
      break;
  }
  return { message: ctx.defaultError };
};

function article(t: string): string {
  if (t === 'undefined' || t === 'null') return t;
  return /^[aeiou]/.test(t) ? `an ${t}` : `a ${t}`;
}

/** The object role at a path, to name the allowed fields of an object with unknown keys. */
function roleOf(path: readonly (string | number)[], input: unknown): string | undefined {
  if (path.length === 0) {
    const format = (input as { format?: unknown } | null)?.format;
    return format === 'brinkmap/ode-1' ? 'ode' : 'network';
  }
  const last = path[path.length - 1];
  if (typeof last === 'number') return typeof path[path.length - 2] === 'string' ? (path[path.length - 2] as string) : undefined;
  return last;
}

/**
 * Validate a model document: the zod schema plus cross-field and expression checks.
 * Every issue names the offending field's path ("element.rate", "nodes[1].parameters.a",
 * "links[0].to"); unknown fields give one issue per field. Never throws.
 */
export function validateModelDocument(input: unknown): ValidationResult {
  const oversized = sizeIssues(input);
  if (oversized.length > 0) return { ok: false, issues: oversized };
  let result: z.SafeParseReturnType<unknown, ModelDocument>;
  try {
    result = modelDocumentSchema.safeParse(input, { errorMap });
  } catch (err) {
    // Only reachable through exotic inputs (getters that throw, cyclic proxies).
    return { ok: false, issues: [{ path: '(document)', message: `could not be read: ${err instanceof Error ? err.message : String(err)}` }] };
  }
  if (result.success) return { ok: true, document: result.data };
  const issues: ModelIssue[] = [];
  for (const issue of result.error.issues) {
    if (issue.code === z.ZodIssueCode.unrecognized_keys) {
      const known = KNOWN_FIELDS[roleOf(issue.path, input) ?? ''];
      for (const key of issue.keys) {
        issues.push({
          path: formatPath([...issue.path, key]),
          message: known ? `unknown field (allowed: ${known.join(', ')})` : 'unknown field',
        });
      }
    } else {
      issues.push({ path: formatPath(issue.path), message: issue.message });
    }
  }
  if (issues.length > MAX_ISSUES) {
    const rest = issues.length - MAX_ISSUES;
    issues.length = MAX_ISSUES;
    issues.push({ path: '(document)', message: `and ${rest} more problem${rest === 1 ? '' : 's'}` });
  }
  return { ok: false, issues };
}

/** Issues listed at most; the rest are counted in a last issue. */
export const MAX_ISSUES = 50;

/**
 * Cheap size checks on the raw input, before zod walks every entry: an oversized list or map is
 * refused at once (naming the cap), so a huge document costs microseconds, not seconds.
 */
function sizeIssues(input: unknown): ModelIssue[] {
  if (!isRecord(input)) return [];
  const out: ModelIssue[] = [];
  const list = (value: unknown, path: string, max: number, noun: string) => {
    if (Array.isArray(value) && value.length > max) out.push({ path, message: `at most ${max} ${noun} are allowed, got ${value.length}` });
  };
  const map = (value: unknown, path: string, max: number, noun: string) => {
    if (isRecord(value) && !Array.isArray(value)) {
      let count = 0;
      for (const key in value) if (Object.hasOwn(value, key)) count++;
      if (count > max) out.push({ path, message: `at most ${max} ${noun} are allowed, got ${count}` });
    }
  };
  list(input.nodes, 'nodes', MODEL_LIMITS.maxVariables, 'nodes');
  list(input.variables, 'variables', MODEL_LIMITS.maxVariables, 'variables');
  list(input.links, 'links', MODEL_LIMITS.maxLinks, 'links');
  list(input.start, 'start', MODEL_LIMITS.maxStartGuesses, 'start guesses');
  map(input.parameters, 'parameters', MODEL_LIMITS.maxParameters, 'parameters');
  map(input.rates, 'rates', MODEL_LIMITS.maxVariables, 'rates');
  if (isRecord(input.element)) map(input.element.parameters, 'element.parameters', MODEL_LIMITS.maxParameters, 'parameters');
  if (Array.isArray(input.nodes) && input.nodes.length <= MODEL_LIMITS.maxVariables) {
    input.nodes.forEach((node, i) => {
      if (isRecord(node)) map(node.parameters, `nodes[${i}].parameters`, MODEL_LIMITS.maxParameters, 'parameters');
    });
  }
  return out;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null;
}
