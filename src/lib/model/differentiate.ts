import { ConstantNode, FunctionNode, OperatorNode, SymbolNode, derivative } from 'mathjs';
import { convertDerivedTree } from './check-expression';
import { fold } from './fold';
import { bin, call, neg, num, replaceSymbols, sym, symbolsOf, type Expr } from './expr';

// The mathjs node constructors are typed with deep generics; these trees are built from our own Expr.
/* eslint-disable @typescript-eslint/no-explicit-any */
const Op = OperatorNode as any;
const Fn = FunctionNode as any;
const Const = ConstantNode as any;
const Sym = SymbolNode as any;

const OP_FN = { '+': 'add', '-': 'subtract', '*': 'multiply', '/': 'divide', '^': 'pow' } as const;

function toMathNode(e: Expr): unknown {
  switch (e.kind) {
    case 'num': return e.value < 0 || Object.is(e.value, -0) ? new Op('-', 'unaryMinus', [new Const(-e.value)]) : new Const(e.value);
    case 'sym': return new Sym(e.name);
    case 'neg': return new Op('-', 'unaryMinus', [toMathNode(e.arg)]);
    case 'bin': return new Op(e.op, OP_FN[e.op], [toMathNode(e.left), toMathNode(e.right)]);
    case 'call': return new Fn(new Sym(e.fn), [toMathNode(e.arg)]);
  }
}

/** The symbols under every node of a tree, computed once and shared by all variables' derivatives. */
export type SymbolIndex = WeakMap<Expr, ReadonlySet<string>>;

export function symbolIndex(e: Expr): SymbolIndex {
  const index: SymbolIndex = new WeakMap();
  const empty: ReadonlySet<string> = new Set();
  const walk = (x: Expr): ReadonlySet<string> => {
    let set: ReadonlySet<string>;
    switch (x.kind) {
      case 'num': set = empty; break;
      case 'sym': set = new Set([x.name]); break;
      case 'neg': case 'call': set = walk(x.arg); break;
      case 'bin': {
        const l = walk(x.left);
        const r = walk(x.right);
        set = l.size === 0 ? r : r.size === 0 ? l : new Set([...l, ...r]);
        break;
      }
    }
    index.set(x, set);
    return set;
  };
  walk(e);
  return index;
}

// Placeholder operands for local partial derivatives (internal names are lower-case, so no clash).
const A = 'Aa';
const B = 'Bb';
const localPartials = new Map<string, Expr>();

/**
 * Partial derivative of one operation with respect to one operand, e.g. d(A^B)/dA = B * A^(B - 1)
 * or d tanh(A)/dA = sech(A)^2, from mathjs `derivative` (simplify: false) on the operation applied to
 * placeholder symbols, converted into the closed tree and folded. There are only a few dozen such
 * templates; each is computed once per process.
 */
function localPartial(template: Expr, key: string, operand: typeof A | typeof B): Expr {
  const cacheKey = `${key}/${operand}`;
  let partial = localPartials.get(cacheKey);
  if (partial === undefined) {
    partial = fold(convertDerivedTree(derivative(toMathNode(template) as any, operand, { simplify: false })));
    localPartials.set(cacheKey, partial);
  }
  return partial;
}

/**
 * d e / d variable, symbolically, by the chain rule over the closed tree:
 *   d op(a, b) = (d op/dA)(a, b) * a' + (d op/dB)(a, b) * b',
 * where the local partials d op/dA come from mathjs `derivative` (localPartial) and operands that do
 * not contain the variable are skipped. Sums, differences and negation are linear and handled
 * directly. The result is cleaned by `fold`. Differentiating operation by operation keeps the work
 * linear in the tree size (mathjs on a whole product of k factors builds O(k^2) nodes, once per
 * variable), which matters for 64-variable systems. `variable` is an internal symbol name.
 */
export function differentiate(e: Expr, variable: string, index: SymbolIndex = symbolIndex(e)): Expr {
  const has = (x: Expr): boolean => (index.get(x) ?? symbolsOf(x)).has(variable);
  const d = (x: Expr): Expr => {
    if (!has(x)) return num(0);
    switch (x.kind) {
      case 'num': return num(0);
      case 'sym': return num(1);
      case 'neg': return neg(d(x.arg));
      case 'call': {
        const partial = localPartial(call(x.fn, sym(A)), `call:${x.fn}`, A);
        return bin('*', bind(partial, x.arg, x.arg), d(x.arg));
      }
      case 'bin': {
        if (x.op === '+' || x.op === '-') return bin(x.op, d(x.left), d(x.right));
        if (x.op === '/' && has(x.left) && has(x.right)) {
          // Quotient rule in its usual combined form (a'b - ab') / b^2: for u / u-like quotients the
          // numerator cancels exactly, where the sum of the two partial terms would leave rounding.
          return bin('/', bin('-', bin('*', d(x.left), x.right), bin('*', x.left, d(x.right))), bin('^', x.right, num(2)));
        }
        const template = bin(x.op, sym(A), sym(B));
        let out: Expr | null = null;
        if (has(x.left)) out = bin('*', bind(localPartial(template, `bin:${x.op}`, A), x.left, x.right), d(x.left));
        if (has(x.right)) {
          const term = bin('*', bind(localPartial(template, `bin:${x.op}`, B), x.left, x.right), d(x.right));
          out = out === null ? term : bin('+', out, term);
        }
        return out ?? num(0);
      }
    }
  };
  return fold(d(e));
}

function bind(partial: Expr, a: Expr, b: Expr): Expr {
  return replaceSymbols(partial, (name) => (name === A ? a : name === B ? b : undefined));
}
