import { bin, call, neg, num, sameExpr, type Expr, type UnaryFunction } from './expr';

/** Real-valued implementations of the tree's functions, shared by folding and by codegen's semantics. */
export const UNARY_IMPL: Readonly<Record<UnaryFunction, (x: number) => number>> = {
  exp: Math.exp, log: Math.log, sqrt: Math.sqrt,
  sin: Math.sin, cos: Math.cos, tan: Math.tan, asin: Math.asin, acos: Math.acos, atan: Math.atan,
  sinh: Math.sinh, cosh: Math.cosh, tanh: Math.tanh, abs: Math.abs, sign: Math.sign,
  sec: (x) => 1 / Math.cos(x), csc: (x) => 1 / Math.sin(x), cot: (x) => 1 / Math.tan(x),
  sech: (x) => 1 / Math.cosh(x), csch: (x) => 1 / Math.sinh(x), coth: (x) => 1 / Math.tanh(x),
};

const isNum = (e: Expr, v?: number): e is Extract<Expr, { kind: 'num' }> =>
  e.kind === 'num' && (v === undefined || e.value === v);

/**
 * Light algebraic clean-up of trees from mathjs `derivative` (run with simplify: false, whose output
 * carries many `* 1`, `0 +`, `(8 - 1)`): folds constant subtrees whose value is finite and drops
 * neutral elements. The rules `0 * u -> 0`, `0 + u -> u` and `0 - u -> -u` differ from evaluating
 * the literal expansion only in the sign of a zero result or where u is infinite or NaN, i.e. at
 * points where the expression is singular anyway; an exact-zero term of a derivative stays zero. `c * abs(u) / u -> c * sign(u)`, the derivative of |u| away from u = 0,
 * taken as 0 at u = 0 (a subgradient) instead of mathjs's 0/0.
 * mathjs `simplify` is not used: it is slow on these trees and may rewrite symbols it knows as
 * constants (e, pi); this fold never touches symbols.
 */
export function fold(e: Expr): Expr {
  return foldWith(e, false);
}

/**
 * IEEE-exact folding for rate expressions: only subtrees made of numbers are evaluated (to the same
 * double the generated code would compute); no neutral-element rules, so NaN, infinities and signed
 * zeros propagate exactly as written.
 */
export function foldConstants(e: Expr): Expr {
  return foldWith(e, true);
}

// Plain recursion without per-call closures: this runs over every node of every derivative.
function foldWith(e: Expr, exact: boolean): Expr {
  switch (e.kind) {
    case 'num': case 'sym': return e;
    case 'neg': {
      const a = foldWith(e.arg, exact);
      if (isNum(a)) return num(-a.value);
      if (a.kind === 'neg') return a.arg;
      return neg(a);
    }
    case 'call': {
      const a = foldWith(e.arg, exact);
      if (isNum(a)) {
        const v = UNARY_IMPL[e.fn](a.value);
        if (Number.isFinite(v)) return num(v);
      }
      return call(e.fn, a);
    }
    case 'bin': {
      const l = foldWith(e.left, exact);
      const r = foldWith(e.right, exact);
      if (isNum(l) && isNum(r)) {
        const v = applyBinary(e.op, l.value, r.value);
        if (Number.isFinite(v)) return num(v);
      }
      if (exact) return bin(e.op, l, r);
      switch (e.op) {
        case '+':
          if (isNum(l, 0)) return r;
          if (isNum(r, 0)) return l;
          if (r.kind === 'neg') return bin('-', l, r.arg);
          return bin('+', l, r);
        case '-':
          if (isNum(r, 0)) return l;
          if (isNum(l, 0)) return foldWith(neg(r), exact);
          if (r.kind === 'neg') return bin('+', l, r.arg);
          return bin('-', l, r);
        case '*':
          if (isNum(l, 0) || isNum(r, 0)) return num(0);
          if (isNum(l, 1)) return r;
          if (isNum(r, 1)) return l;
          if (isNum(l, -1)) return foldWith(neg(r), exact);
          if (isNum(r, -1)) return foldWith(neg(l), exact);
          return bin('*', l, r);
        case '/': {
          if (isNum(r, 1)) return l;
          const s = absOverSelf(l, r);
          if (s) return s;
          return bin('/', l, r);
        }
        case '^':
          if (isNum(r, 1)) return l;
          if (isNum(r, 0)) return num(1);
          return bin('^', l, r);
      }
    }
  }
}

function applyBinary(op: '+' | '-' | '*' | '/' | '^', a: number, b: number): number {
  switch (op) {
    case '+': return a + b;
    case '-': return a - b;
    case '*': return a * b;
    case '/': return a / b;
    case '^': return Math.pow(a, b);
  }
}

/** abs(u) / u -> sign(u) and (c * abs(u)) / u -> c * sign(u). */
function absOverSelf(l: Expr, r: Expr): Expr | null {
  if (l.kind === 'call' && l.fn === 'abs' && sameExpr(l.arg, r)) return call('sign', r);
  if (l.kind === 'bin' && l.op === '*' && l.right.kind === 'call' && l.right.fn === 'abs' && sameExpr(l.right.arg, r)) {
    return foldWith(bin('*', l.left, call('sign', r)), false);
  }
  return null;
}
