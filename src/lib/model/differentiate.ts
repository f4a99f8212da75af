import { ConstantNode, FunctionNode, OperatorNode, SymbolNode, derivative } from 'mathjs';
import { convertDerivedTree } from './check-expression';
import { fold } from './fold';
import { num, symbolsOf, type Expr } from './expr';

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

/**
 * d e / d variable, symbolically: mathjs `derivative` (simplify: false) on the checked tree, converted
 * back into the closed tree and cleaned by `fold`. `variable` must be one of the tree's symbol names
 * (Brinkmap's internal names, so no user name can collide with a mathjs constant). Returns 0 without
 * calling mathjs when the variable does not occur.
 */
export function differentiate(e: Expr, variable: string): Expr {
  if (!symbolsOf(e).has(variable)) return num(0);
  const d = derivative(toMathNode(e) as any, variable, { simplify: false });
  return fold(convertDerivedTree(d));
}
