/**
 * Brinkmap's own closed expression tree. Every expression in a model document is parsed by mathjs and
 * then converted into this tree by the whitelisting checker (check-expression.ts); code generation
 * (codegen.ts) only ever sees these node kinds, which is what makes `new Function` safe here.
 */
export type BinaryOp = '+' | '-' | '*' | '/' | '^';

/** Functions a document may call, with their arity. `pow(a, b)` is the same as `a ^ b`. */
export const DOCUMENT_FUNCTIONS = {
  exp: 1, log: 1, sqrt: 1,
  sin: 1, cos: 1, tan: 1, asin: 1, acos: 1, atan: 1,
  sinh: 1, cosh: 1, tanh: 1,
  abs: 1, pow: 2,
} as const;

/**
 * One-argument functions the compiled tree may contain: the document functions plus those mathjs
 * `derivative` produces for them (sec for tan, sech for tanh) and sign for the derivative of abs.
 */
export type UnaryFunction =
  | 'exp' | 'log' | 'sqrt' | 'sin' | 'cos' | 'tan' | 'asin' | 'acos' | 'atan'
  | 'sinh' | 'cosh' | 'tanh' | 'abs'
  | 'sec' | 'csc' | 'cot' | 'sech' | 'csch' | 'coth' | 'sign';

export const UNARY_FUNCTIONS: ReadonlySet<string> = new Set<UnaryFunction>([
  'exp', 'log', 'sqrt', 'sin', 'cos', 'tan', 'asin', 'acos', 'atan', 'sinh', 'cosh', 'tanh', 'abs',
  'sec', 'csc', 'cot', 'sech', 'csch', 'coth', 'sign',
]);

export type Expr =
  | { readonly kind: 'num'; readonly value: number }
  | { readonly kind: 'sym'; readonly name: string }
  | { readonly kind: 'neg'; readonly arg: Expr }
  | { readonly kind: 'bin'; readonly op: BinaryOp; readonly left: Expr; readonly right: Expr }
  | { readonly kind: 'call'; readonly fn: UnaryFunction; readonly arg: Expr };

export const num = (value: number): Expr => ({ kind: 'num', value });
export const sym = (name: string): Expr => ({ kind: 'sym', name });
export const neg = (arg: Expr): Expr => ({ kind: 'neg', arg });
export const bin = (op: BinaryOp, left: Expr, right: Expr): Expr => ({ kind: 'bin', op, left, right });
export const call = (fn: UnaryFunction, arg: Expr): Expr => ({ kind: 'call', fn, arg });

/** Symbols used by an expression. */
export function symbolsOf(e: Expr, into: Set<string> = new Set()): Set<string> {
  switch (e.kind) {
    case 'num': break;
    case 'sym': into.add(e.name); break;
    case 'neg': case 'call': symbolsOf(e.arg, into); break;
    case 'bin': symbolsOf(e.left, into); symbolsOf(e.right, into); break;
  }
  return into;
}

/** Rename symbols (total map; a missing name is an internal error). */
export function renameSymbols(e: Expr, rename: (name: string) => string): Expr {
  switch (e.kind) {
    case 'num': return e;
    case 'sym': return sym(rename(e.name));
    case 'neg': return neg(renameSymbols(e.arg, rename));
    case 'call': return call(e.fn, renameSymbols(e.arg, rename));
    case 'bin': return bin(e.op, renameSymbols(e.left, rename), renameSymbols(e.right, rename));
  }
}

export function countNodes(e: Expr): number {
  switch (e.kind) {
    case 'num': case 'sym': return 1;
    case 'neg': case 'call': return 1 + countNodes(e.arg);
    case 'bin': return 1 + countNodes(e.left) + countNodes(e.right);
  }
}

export function sameExpr(a: Expr, b: Expr): boolean {
  if (a.kind !== b.kind) return false;
  switch (a.kind) {
    case 'num': return Object.is(a.value, (b as typeof a).value);
    case 'sym': return a.name === (b as typeof a).name;
    case 'neg': return sameExpr(a.arg, (b as typeof a).arg);
    case 'call': return a.fn === (b as typeof a).fn && sameExpr(a.arg, (b as typeof a).arg);
    case 'bin': {
      const o = b as typeof a;
      return a.op === o.op && sameExpr(a.left, o.left) && sameExpr(a.right, o.right);
    }
  }
}

/** Replace symbols by trees where `replace` returns one (others stay). */
export function replaceSymbols(e: Expr, replace: (name: string) => Expr | undefined): Expr {
  switch (e.kind) {
    case 'num': return e;
    case 'sym': return replace(e.name) ?? e;
    case 'neg': return neg(replaceSymbols(e.arg, replace));
    case 'call': return call(e.fn, replaceSymbols(e.arg, replace));
    case 'bin': return bin(e.op, replaceSymbols(e.left, replace), replaceSymbols(e.right, replace));
  }
}
