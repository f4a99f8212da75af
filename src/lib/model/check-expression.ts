import { parse } from 'mathjs';
import { MODEL_LIMITS } from './limits';
import { DOCUMENT_FUNCTIONS, UNARY_FUNCTIONS, bin, call, neg, num, sym, type BinaryOp, type Expr, type UnaryFunction } from './expr';

/**
 * Parse one document expression with mathjs and convert it into Brinkmap's closed tree, allowing only
 * numbers, the given symbols, + - * / ^ (binary), unary minus/plus, brackets and the functions of
 * DOCUMENT_FUNCTIONS. `pi` and `e` are constants unless the document uses the name itself.
 * Everything else (assignments, function definitions, matrices, strings, property access, ranges,
 * conditionals, comparisons, implicit multiplication, unknown functions) is rejected with a message.
 * Never throws: mathjs parse errors and stack exhaustion come back as messages.
 */
export type CheckResult =
  | { readonly ok: true; readonly expr: Expr }
  | { readonly ok: false; readonly messages: readonly string[] };

const MAX_MESSAGES = 8;

const NODE_TYPE_MESSAGES: Record<string, string> = {
  AssignmentNode: "assignment ('=') is not allowed: an expression only computes a value",
  FunctionAssignmentNode: 'function definitions are not allowed',
  ArrayNode: 'matrices and lists are not allowed',
  AccessorNode: 'property and index access is not allowed',
  IndexNode: 'property and index access is not allowed',
  ObjectNode: 'objects are not allowed',
  RangeNode: "ranges (':') are not allowed",
  ConditionalNode: "conditional expressions ('? :') are not allowed",
  BlockNode: 'only one expression is allowed (no \';\' or line breaks between statements)',
  RelationalNode: 'comparisons are not allowed',
};

const ALLOWED_OPS = new Set(['add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus']);

const sortedFunctionList = Object.keys(DOCUMENT_FUNCTIONS).sort().join(', ');

export function checkExpression(text: unknown, allowedSymbols: readonly string[]): CheckResult {
  if (typeof text !== 'string') return { ok: false, messages: ['expected an expression (a string)'] };
  if (text.length > MODEL_LIMITS.maxExpressionLength) {
    return {
      ok: false,
      messages: [`expression is too long: at most ${MODEL_LIMITS.maxExpressionLength} characters are allowed, got ${text.length}`],
    };
  }
  if (text.trim() === '') return { ok: false, messages: ['expression is empty'] };
  // mathjs parses by recursive descent; bound the bracket depth before it can exhaust the stack.
  let depth = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '(' || c === '[' || c === '{') {
      depth++;
      if (depth > MODEL_LIMITS.maxExpressionDepth) {
        return { ok: false, messages: [`expression nests brackets deeper than ${MODEL_LIMITS.maxExpressionDepth} levels (character ${i + 1})`] };
      }
    } else if (c === ')' || c === ']' || c === '}') depth = Math.max(0, depth - 1);
  }
  let root: unknown;
  try {
    root = parse(text);
  } catch (err) {
    return { ok: false, messages: [describeParseError(err)] };
  }
  const allowed = new Set(allowedSymbols);
  const messages: string[] = [];
  const report = (m: string) => {
    if (messages.length < MAX_MESSAGES && !messages.includes(m)) messages.push(m);
  };
  let expr: Expr | null;
  try {
    expr = convert(root, 0, { allowed, allowedList: [...allowedSymbols].join(', '), report, internal: false });
  } catch (err) {
    if (err instanceof RangeError) return { ok: false, messages: ['expression is nested too deeply'] };
    throw err;
  }
  if (messages.length > 0 || expr === null) return { ok: false, messages: messages.length ? messages : ['expression is not allowed'] };
  return { ok: true, expr };
}

/**
 * Convert a tree produced by mathjs `derivative` from an already checked expression. Its symbols are
 * Brinkmap's internal names, and it may contain the extra functions of UNARY_FUNCTIONS.
 * Throws an Error naming the node when mathjs produced something outside the closed tree.
 */
export function convertDerivedTree(root: unknown): Expr {
  const messages: string[] = [];
  const expr = convert(root, 0, {
    allowed: null,
    allowedList: '',
    report: (m) => messages.push(m),
    internal: true,
  });
  if (messages.length > 0 || expr === null) throw new Error(`derivative produced an unsupported tree: ${messages.join('; ')}`);
  return expr;
}

interface ConvertContext {
  /** null: any symbol (internal trees). */
  readonly allowed: ReadonlySet<string> | null;
  readonly allowedList: string;
  readonly report: (message: string) => void;
  readonly internal: boolean;
}

// mathjs nodes are walked structurally (node.type, args, ...); their generic TS types add nothing here.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
type AnyNode = any;

function convert(node: AnyNode, depth: number, ctx: ConvertContext): Expr | null {
  if (depth > MODEL_LIMITS.maxTreeDepth) {
    ctx.report(`expression is nested more than ${MODEL_LIMITS.maxTreeDepth} operations deep (split long products or chains)`);
    return null;
  }
  const type: string = node?.type;
  switch (type) {
    case 'ConstantNode': {
      const v = node.value;
      if (typeof v === 'number') {
        if (!Number.isFinite(v)) {
          ctx.report(`the number '${String(v)}' is not finite`);
          return null;
        }
        return num(v);
      }
      if (typeof v === 'string') ctx.report(`text strings are not allowed (${JSON.stringify(v)})`);
      else ctx.report(`'${String(v)}' is not a number`);
      return null;
    }
    case 'SymbolNode': {
      const name: string = node.name;
      if (ctx.allowed === null || ctx.allowed.has(name)) return sym(name);
      if (name === 'pi') return num(Math.PI);
      if (name === 'e') return num(Math.E);
      if (Object.hasOwn(DOCUMENT_FUNCTIONS, name)) {
        ctx.report(`'${name}' is a function: call it as ${name}(...)`);
        return null;
      }
      ctx.report(`unknown symbol '${name}' (allowed: ${ctx.allowedList || 'none'})`);
      return null;
    }
    case 'ParenthesisNode':
      return convert(node.content, depth + 1, ctx);
    case 'OperatorNode': {
      const fn: string = node.fn;
      if (!ALLOWED_OPS.has(fn)) {
        ctx.report(`operator '${node.op}' is not allowed (allowed: + - * / ^)`);
        return null;
      }
      if (node.implicit && !ctx.internal) {
        ctx.report(`implicit multiplication is not allowed: write '*' (as in '2 * x'), found '${safeText(node)}'`);
        return null;
      }
      const args: AnyNode[] = node.args ?? [];
      const parts = args.map((a) => convert(a, depth + 1, ctx));
      if (parts.some((p) => p === null)) return null;
      const xs = parts as Expr[];
      if (fn === 'unaryMinus' && xs.length === 1) return neg(xs[0]);
      if (fn === 'unaryPlus' && xs.length === 1) return xs[0];
      if (xs.length < 2) {
        ctx.report(`operator '${node.op}' needs two operands`);
        return null;
      }
      const ops: Record<string, BinaryOp | undefined> = { add: '+', subtract: '-', multiply: '*', divide: '/', pow: '^' };
      const op = ops[fn];
      if (op === undefined || ((op === '-' || op === '/' || op === '^') && xs.length !== 2)) {
        ctx.report(`operator '${node.op}' is not allowed here`);
        return null;
      }
      // n-ary + and * (mathjs may build them) fold left.
      return xs.slice(1).reduce((acc, x) => bin(op, acc, x), xs[0]);
    }
    case 'FunctionNode': {
      const fnNode = node.fn;
      if (fnNode?.type !== 'SymbolNode') {
        ctx.report('only calls of the allowed functions by name are allowed');
        return null;
      }
      const name: string = fnNode.name;
      const args: AnyNode[] = node.args ?? [];
      let arity: number | undefined;
      if (ctx.internal) arity = UNARY_FUNCTIONS.has(name) ? 1 : undefined;
      else arity = Object.hasOwn(DOCUMENT_FUNCTIONS, name) ? DOCUMENT_FUNCTIONS[name as keyof typeof DOCUMENT_FUNCTIONS] : undefined;
      if (arity === undefined) {
        if (ctx.allowed?.has(name)) ctx.report(`'${name}' is not a function`);
        else ctx.report(`unknown function '${name}' (allowed functions: ${sortedFunctionList})`);
        return null;
      }
      if (args.length !== arity) {
        ctx.report(`function '${name}' takes ${arity} argument${arity === 1 ? '' : 's'}, got ${args.length}`);
        return null;
      }
      const parts = args.map((a) => convert(a, depth + 1, ctx));
      if (parts.some((p) => p === null)) return null;
      const xs = parts as Expr[];
      if (name === 'pow') return bin('^', xs[0], xs[1]);
      return call(name as UnaryFunction, xs[0]);
    }
    default: {
      const message = NODE_TYPE_MESSAGES[type];
      ctx.report(message ?? `'${type ?? typeof node}' is not allowed in an expression`);
      return null;
    }
  }
}

function safeText(node: AnyNode): string {
  try {
    const s = String(node.toString());
    return s.length > 60 ? `${s.slice(0, 57)}...` : s;
  } catch {
    return '?';
  }
}

function describeParseError(err: unknown): string {
  if (err instanceof RangeError) return 'expression is nested too deeply';
  const raw = err instanceof Error ? err.message : String(err);
  // mathjs reports `char` as a 1-based column.
  const ch = (err as { char?: unknown })?.char;
  const message = raw.replace(/\s*\(char \d+\)\s*$/, '');
  return typeof ch === 'number'
    ? `syntax error at character ${ch}: ${message}`
    : `syntax error: ${message}`;
}
