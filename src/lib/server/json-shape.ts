/**
 * Shape checks on parsed JSON that zod cannot make safely: nesting depth and lone UTF-16 surrogates.
 *
 * V8's JSON.parse is iterative, so a 1 MB body of `[[[[...]]]]` parses into a 500 000-level value;
 * everything after it that recurses (JSON.stringify, zod, the model validator, the hash) then
 * overflows the stack. A JSON string may also carry an escaped lone surrogate (`"\ud800"`), which is
 * not Unicode text: MariaDB's JSON columns refuse it and UTF-8 encoders silently turn it into
 * U+FFFD. The walk below is iterative (an explicit stack), so it is safe on any parsed value.
 */

export interface JsonShapeProblem {
  /** Where the problem is: object keys and array indexes from the top. */
  readonly path: readonly (string | number)[];
  readonly message: string;
}

export interface JsonShapeOptions {
  /** Deepest allowed nesting of arrays and objects; the top-level value is depth 1 (default 32). */
  maxDepth?: number;
}

/** Model documents nest at most five levels (document → start → guess → value); 32 leaves room. */
export const DEFAULT_MAX_JSON_DEPTH = 32;

const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

function surrogateMessage(text: string, inKey: boolean): string {
  const at = LONE_SURROGATE.exec(text)!;
  const code = at[0].charCodeAt(0).toString(16).toUpperCase();
  return `${inKey ? 'the field name' : 'the text'} contains a lone UTF-16 surrogate (U+${code}) at character ${at.index + 1}; send well-formed Unicode`;
}

/** The first problem found (depth first, in key order), or null when the value is well-shaped. */
export function jsonShapeProblem(value: unknown, options: JsonShapeOptions = {}): JsonShapeProblem | null {
  const maxDepth = options.maxDepth ?? DEFAULT_MAX_JSON_DEPTH;
  const stack: { value: unknown; path: (string | number)[] }[] = [{ value, path: [] }];
  while (stack.length) {
    const { value: v, path } = stack.pop()!;
    if (typeof v === 'string') {
      if (LONE_SURROGATE.test(v)) return { path, message: surrogateMessage(v, false) };
      continue;
    }
    if (v === null || typeof v !== 'object') continue;
    if (path.length + 1 > maxDepth) return { path, message: `nested more than ${maxDepth} levels deep` };
    const children: { value: unknown; path: (string | number)[] }[] = [];
    if (Array.isArray(v)) {
      v.forEach((item, i) => children.push({ value: item, path: [...path, i] }));
    } else {
      for (const [k, item] of Object.entries(v)) {
        if (LONE_SURROGATE.test(k)) return { path: [...path, k], message: surrogateMessage(k, true) };
        children.push({ value: item, path: [...path, k] });
      }
    }
    for (let i = children.length - 1; i >= 0; i--) stack.push(children[i]);
  }
  return null;
}

/**
 * The field to name for a problem at `path`: the keys down to the first array index (indexes below
 * a named field are noise in a 500-level path), at most `maxSegments` of them; '(body)' at the top.
 */
export function problemField(path: readonly (string | number)[], maxSegments = 4): string {
  if (path.length <= maxSegments) return path.length ? path.join('.') : '(body)';
  const out: string[] = [];
  for (const seg of path) {
    if (typeof seg === 'number' || out.length >= maxSegments) break;
    out.push(seg);
  }
  return out.length ? out.join('.') : '(body)';
}
