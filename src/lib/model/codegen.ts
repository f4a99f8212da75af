import type { Expr, UnaryFunction } from './expr';

/**
 * JavaScript source for closed expression trees, compiled once with `new Function`.
 *
 * Why this is safe: the generated text is assembled only from (1) fixed operator tokens and fixed
 * `Math.*` names chosen by the node kind of Brinkmap's closed Expr union, (2) numeric literals printed
 * from finite numbers by `String` and checked against a numeric pattern, and (3) symbol references
 * that the compiler builds from array indices (`x[3]`, `q[1]`, `p`) and that are checked against a
 * fixed pattern here. No text from a document (names, expressions) is ever copied into the source;
 * documents reach this file only as trees that passed the whitelist in check-expression.ts.
 */
const CALL_CODE: Readonly<Record<UnaryFunction, (a: string) => string>> = {
  exp: (a) => `Math.exp(${a})`, log: (a) => `Math.log(${a})`, sqrt: (a) => `Math.sqrt(${a})`,
  sin: (a) => `Math.sin(${a})`, cos: (a) => `Math.cos(${a})`, tan: (a) => `Math.tan(${a})`,
  asin: (a) => `Math.asin(${a})`, acos: (a) => `Math.acos(${a})`, atan: (a) => `Math.atan(${a})`,
  sinh: (a) => `Math.sinh(${a})`, cosh: (a) => `Math.cosh(${a})`, tanh: (a) => `Math.tanh(${a})`,
  abs: (a) => `Math.abs(${a})`, sign: (a) => `Math.sign(${a})`,
  sec: (a) => `(1 / Math.cos(${a}))`, csc: (a) => `(1 / Math.sin(${a}))`, cot: (a) => `(1 / Math.tan(${a}))`,
  sech: (a) => `(1 / Math.cosh(${a}))`, csch: (a) => `(1 / Math.sinh(${a}))`, coth: (a) => `(1 / Math.tanh(${a}))`,
};

const NUMERIC = /^\d+(\.\d+)?(e[+-]\d+)?$/;
const SYMBOL_CODE = /^[a-z][a-z0-9]*(\[\d+\])?$/;

export function numberLiteral(v: number): string {
  if (!Number.isFinite(v)) throw new Error(`codegen: non-finite constant ${v}`);
  if (Object.is(v, -0)) return '(-0)';
  const text = String(Math.abs(v));
  if (!NUMERIC.test(text)) throw new Error(`codegen: unexpected number text ${text}`);
  return v < 0 ? `(-${text})` : text;
}

/** Source of one expression; `symbolCode` maps every symbol of the tree to a reference like `x[2]`. */
export function emit(e: Expr, symbolCode: (name: string) => string): string {
  switch (e.kind) {
    case 'num': return numberLiteral(e.value);
    case 'sym': {
      const code = symbolCode(e.name);
      if (!SYMBOL_CODE.test(code)) throw new Error(`codegen: bad symbol reference for ${e.name}`);
      return code;
    }
    case 'neg': return `(-(${emit(e.arg, symbolCode)}))`;
    case 'call': return CALL_CODE[e.fn](emit(e.arg, symbolCode));
    case 'bin': {
      const l = emit(e.left, symbolCode);
      if (e.op === '^') {
        if (e.right.kind === 'num' && e.right.value === 2 && (e.left.kind === 'sym' || e.left.kind === 'num')) return `(${l} * ${l})`;
        return `Math.pow(${l}, ${emit(e.right, symbolCode)})`;
      }
      return `(${l} ${e.op} ${emit(e.right, symbolCode)})`;
    }
  }
}

const ARG_NAME = /^[a-z][a-z0-9]*$/;

/** Compile a function body built from `emit` output; argument names must be plain lower-case names. */
export function compileFunction<F>(argNames: readonly string[], body: string): F {
  for (const a of argNames) if (!ARG_NAME.test(a)) throw new Error(`codegen: bad argument name ${a}`);
  // eslint-disable-next-line @typescript-eslint/no-implied-eval
  return new Function(...argNames, `'use strict';\n${body}`) as F;
}
