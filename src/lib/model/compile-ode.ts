import type { CompiledSystem } from './compiled-system';
import { compileFunction, emit } from './codegen';
import { differentiate, symbolIndex } from './differentiate';
import { countNodes, num, symbolsOf, type Expr } from './expr';
import { ModelError } from './errors';
import { MODEL_LIMITS } from './limits';
import { atPath, internalTree, substitute } from './internal-tree';
import type { OdeDocument } from './schema';

type VectorFn = (x: Float64Array, p: number, out: Float64Array) => Float64Array;

/**
 * Compile an explicit ODE document: F_i = rates[variables[i]] with every parameter except the swept
 * one inlined as a constant. The Jacobian is symbolic: one mathjs `derivative` per (rate, variable)
 * pair where the variable occurs in the rate (other entries are exactly 0), so sparse systems of 64
 * variables compile in tens of milliseconds.
 */
export function compileOde(doc: OdeDocument, parameter: string, sweep: { from: number; to: number }): CompiledSystem {
  const n = doc.variables.length;
  const paramNames = Object.keys(doc.parameters);
  const allowed = [...doc.variables, ...paramNames];
  const varIndex = new Map(doc.variables.map((v, i) => [v, i]));
  const paramIndex = new Map(paramNames.map((k, i) => [k, i]));
  // Internal names: v<j> for variable j, k<i> for parameter i (no document name reaches codegen).
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
    if (name.startsWith('v')) return `x${Number(name.slice(1))}`;
    throw new Error(`internal: symbol ${name} left after substitution`);
  };

  const rateLines: string[] = [];
  const jacLines: string[] = [];
  const dpLines: string[] = [];
  const ratePowers = new Set<number>();
  const jacPowers = new Set<number>();
  const dpPowers = new Set<number>();
  let jacobianHasZeros = false;
  let generated = 0;
  doc.variables.forEach((v, i) => {
    atPath(`rates.${v}`, () => {
      const tree = substitute(internalTree(doc.rates[v], allowed, rename, `rates.${v}`), fixedValue);
      rateLines.push(`out[${i}] = ${emit(tree, code, ratePowers)};`);
      generated += countNodes(tree);
      const used = symbolsOf(tree);
      const index = symbolIndex(tree);
      const spend = (d: Expr) => {
        generated += countNodes(d);
        if (generated > MODEL_LIMITS.maxGeneratedTreeNodes) {
          throw new ModelError([{
            path: `rates.${v}`,
            message: `the symbolic Jacobian grows beyond ${MODEL_LIMITS.maxGeneratedTreeNodes} terms at this rate; shorten the rates or use fewer variables per rate`,
          }]);
        }
      };
      for (let j = 0; j < n; j++) {
        const d = used.has(`v${j}`) ? differentiate(tree, `v${j}`, index) : num(0);
        spend(d);
        if (d.kind === 'num' && d.value === 0) jacobianHasZeros = true;
        else jacLines.push(`out[${i * n + j}] = ${emit(d, code, jacPowers)};`);
      }
      const dp = used.has(sweptName) ? differentiate(tree, sweptName, index) : num(0);
      spend(dp);
      dpLines.push(`out[${i}] = ${emit(dp, code, dpPowers)};`);
    });
  });

  const locals = `const ${doc.variables.map((_, j) => `x${j} = x[${j}]`).join(', ')};`;
  const rates = compileFunction<VectorFn>(['x', 'p', 'out'], `${locals}\n${rateLines.join('\n')}\nreturn out;`, ratePowers);
  const zeroFill = jacobianHasZeros ? `for (let k = 0; k < ${n * n}; k++) out[k] = 0;\n` : '';
  const jacobian = compileFunction<VectorFn>(['x', 'p', 'out'], `${locals}\n${zeroFill}${jacLines.join('\n')}\nreturn out;`, jacPowers);
  const parameterDerivative = compileFunction<VectorFn>(['x', 'p', 'out'], `${locals}\n${dpLines.join('\n')}\nreturn out;`, dpPowers);

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
