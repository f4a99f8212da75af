import type { CompiledSystem } from './compiled-system';
import { checkExpression } from './check-expression';
import { compileFunction, emit } from './codegen';
import { differentiate } from './differentiate';
import { ModelError } from './errors';
import { foldConstants } from './fold';
import { num, renameSymbols, symbolsOf, type Expr } from './expr';
import type { OdeDocument } from './schema';

type VectorFn = (x: Float64Array, p: number, out: Float64Array) => Float64Array;

/** Parse, whitelist and rename a validated expression into internal names. */
export function internalTree(text: string, allowed: readonly string[], rename: (name: string) => string, path: string): Expr {
  const checked = checkExpression(text, allowed);
  if (!checked.ok) throw new ModelError(checked.messages.map((message) => ({ path, message })));
  return renameSymbols(checked.expr, rename);
}

/** Replace symbols by numbers where `value` gives one, then fold constant subtrees (IEEE-exact). */
export function substitute(e: Expr, value: (name: string) => number | undefined): Expr {
  const walk = (x: Expr): Expr => {
    switch (x.kind) {
      case 'num': return x;
      case 'sym': { const v = value(x.name); return v === undefined ? x : num(v); }
      case 'neg': return { kind: 'neg', arg: walk(x.arg) };
      case 'call': return { kind: 'call', fn: x.fn, arg: walk(x.arg) };
      case 'bin': return { kind: 'bin', op: x.op, left: walk(x.left), right: walk(x.right) };
    }
  };
  return foldConstants(walk(e));
}

/**
 * Compile an explicit ODE document: F_i = rates[variables[i]] with every parameter except the swept
 * one inlined as a constant. The Jacobian is symbolic: one mathjs `derivative` per (rate, variable)
 * pair where the variable occurs in the rate (other entries are exactly 0).
 */
export function compileOde(doc: OdeDocument, parameter: string, sweep: { from: number; to: number }): CompiledSystem {
  const n = doc.variables.length;
  const paramNames = Object.keys(doc.parameters);
  const allowed = [...doc.variables, ...paramNames];
  const varIndex = new Map(doc.variables.map((v, i) => [v, i]));
  const paramIndex = new Map(paramNames.map((k, i) => [k, i]));
  const rename = (name: string) => {
    const v = varIndex.get(name);
    if (v !== undefined) return `v${v}`;
    const k = paramIndex.get(name);
    if (k !== undefined) return `k${k}`;
    throw new Error(`internal: unmapped symbol ${name}`);
  };
  const sweptName = `k${paramIndex.get(parameter)}`;
  const fixedValue = (name: string): number | undefined => {
    if (!name.startsWith('k') || name === sweptName) return undefined;
    return doc.parameters[paramNames[Number(name.slice(1))]];
  };
  const code = (name: string): string => {
    if (name === sweptName) return 'p';
    if (name.startsWith('v')) return `x[${Number(name.slice(1))}]`;
    throw new Error(`internal: symbol ${name} left after substitution`);
  };

  const rateLines: string[] = [];
  const jacLines: string[] = [];
  const dpLines: string[] = [];
  let jacobianHasZeros = false;
  doc.variables.forEach((v, i) => {
    const path = `rates.${v}`;
    try {
      const tree = substitute(internalTree(doc.rates[v], allowed, rename, path), fixedValue);
      rateLines.push(`out[${i}] = ${emit(tree, code)};`);
      const used = symbolsOf(tree);
      for (let j = 0; j < n; j++) {
        const d = used.has(`v${j}`) ? differentiate(tree, `v${j}`) : num(0);
        if (d.kind === 'num' && d.value === 0) jacobianHasZeros = true;
        else jacLines.push(`out[${i * n + j}] = ${emit(d, code)};`);
      }
      const dp = used.has(sweptName) ? differentiate(tree, sweptName) : num(0);
      dpLines.push(`out[${i}] = ${emit(dp, code)};`);
    } catch (err) {
      if (err instanceof ModelError) throw err;
      throw new ModelError([{ path, message: `could not be compiled (${err instanceof Error ? err.message : String(err)})` }]);
    }
  });

  const rates = compileFunction<VectorFn>(['x', 'p', 'out'], `${rateLines.join('\n')}\nreturn out;`);
  const zeroFill = jacobianHasZeros ? `for (let k = 0; k < ${n * n}; k++) out[k] = 0;\n` : '';
  const jacobian = compileFunction<VectorFn>(['x', 'p', 'out'], `${zeroFill}${jacLines.join('\n')}\nreturn out;`);
  const parameterDerivative = compileFunction<VectorFn>(['x', 'p', 'out'], `${dpLines.join('\n')}\nreturn out;`);

  return {
    dimension: n,
    variables: [...doc.variables],
    parameter,
    sweep: { from: sweep.from, to: sweep.to },
    start: (doc.start ?? []).map((s) => Float64Array.from(s)),
    rates,
    jacobian,
    parameterDerivative,
  };
}
