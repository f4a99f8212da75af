/** Problems found in a model document, each tied to the path of the offending field. */
export interface ModelIssue {
  /** Field path such as "element.rate", "nodes[1].parameters.a" or "links[0].to"; "(document)" for the whole input. */
  readonly path: string;
  readonly message: string;
}

/**
 * Thrown when a model document breaks its contract (invalid fields, unknown symbols, caps exceeded).
 * `message` is one line naming the first offending field; `issues` lists every problem found.
 */
export class ModelError extends Error {
  readonly issues: readonly ModelIssue[];

  constructor(issues: readonly ModelIssue[]) {
    const list = issues.length > 0 ? issues : [{ path: '(document)', message: 'invalid model document' }];
    const first = formatIssue(list[0]);
    super(list.length > 1 ? `${first} (and ${list.length - 1} more problem${list.length > 2 ? 's' : ''})` : first);
    this.name = 'ModelError';
    this.issues = list;
  }
}

/** "path: message" on one line: control characters (from ids or expressions) are escaped. */
export function formatIssue(issue: ModelIssue): string {
  return `${issue.path}: ${issue.message}`.replace(/[\u0000-\u001f\u007f\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

const IDENTIFIER = /^[A-Za-z_$][A-Za-z0-9_$]*$/;

/** ['nodes', 1, 'parameters', 'a'] -> "nodes[1].parameters.a"; odd keys are quoted: parameters["my key"]. */
export function formatPath(path: readonly (string | number)[]): string {
  let out = '';
  for (const part of path) {
    if (typeof part === 'number') out += `[${part}]`;
    else if (IDENTIFIER.test(part)) out += out === '' ? part : `.${part}`;
    else out += `[${JSON.stringify(part)}]`;
  }
  return out === '' ? '(document)' : out;
}
