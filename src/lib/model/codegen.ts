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

/** Largest |k| of an integer power b^k compiled to multiplications instead of Math.pow. */
export const MAX_MULTIPLIED_POWER = 32;

/**
 * Source of one expression; `symbolCode` maps every symbol of the tree to a reference like `x[2]`.
 * Integer powers 2 <= |k| <= 32 become calls of `ipowK` helpers (square-and-multiply, a few ulp from
 * Math.pow and several times faster); pass the same `powers` set to `compileFunction` so it defines them.
 */
export function emit(e: Expr, symbolCode: (name: string) => string, powers?: Set<number>): string {
  return emitTree(e, symbolCode, powers ?? new Set());
}

function emitTree(e: Expr, symbolCode: (name: string) => string, powers: Set<number>): string {
  switch (e.kind) {
    case 'num': return numberLiteral(e.value);
    case 'sym': {
      const code = symbolCode(e.name);
      if (!SYMBOL_CODE.test(code)) throw new Error(`codegen: bad symbol reference for ${e.name}`);
      return code;
    }
    case 'neg': return `(-(${emitTree(e.arg, symbolCode, powers)}))`;
    case 'call': return CALL_CODE[e.fn](emitTree(e.arg, symbolCode, powers));
    case 'bin': {
      const l = emitTree(e.left, symbolCode, powers);
      if (e.op === '^') {
        const k = e.right.kind === 'num' ? e.right.value : NaN;
        if (Number.isInteger(k) && Math.abs(k) >= 2 && Math.abs(k) <= MAX_MULTIPLIED_POWER) {
          const m = Math.abs(k);
          const base = m === 2 && e.left.kind === 'sym' ? `(${l} * ${l})` : (powers.add(m), `ipow${m}(${l})`);
          return k > 0 ? base : `(1 / ${base})`;
        }
        return `Math.pow(${l}, ${emitTree(e.right, symbolCode, powers)})`;
      }
      return `(${l} ${e.op} ${emitTree(e.right, symbolCode, powers)})`;
    }
  }
}

const ARG_NAME = /^[a-z][a-z0-9]*$/;

/** b^m by square-and-multiply, as the body of a one-argument helper. */
function powerHelper(m: number): string {
  const lines: string[] = [];
  let acc = '';
  let square = 'b';
  let bits = m;
  let i = 0;
  while (bits > 0) {
    if (bits & 1) acc = acc === '' ? square : `${acc} * ${square}`;
    bits >>= 1;
    if (bits > 0) {
      const next = `s${++i}`;
      lines.push(`const ${next} = ${square} * ${square};`);
      square = next;
    }
  }
  return `function ipow${m}(b) { ${lines.join(' ')} return ${acc}; }`;
}

/**
 * Compile a function body built from `emit` output; argument names must be plain lower-case names.
 * The integer-power helpers in `powers` are defined once in an enclosing scope (not per call).
 */
export function compileFunction<F>(argNames: readonly string[], body: string, powers: ReadonlySet<number> = new Set()): F {
  for (const a of argNames) if (!ARG_NAME.test(a)) throw new Error(`codegen: bad argument name ${a}`);
  for (const m of powers) if (!Number.isInteger(m) || m < 2 || m > MAX_MULTIPLIED_POWER) throw new Error(`codegen: bad power ${m}`);
  const helpers = [...powers].sort((a, b) => a - b).map(powerHelper).join('\n');
  const source = `'use strict';\n${helpers}\nreturn function (${argNames.join(', ')}) {\n${body}\n};`;
  // eslint-disable-next-line @typescript-eslint/no-implied-eval
  return (new Function(source) as () => F)();
}
