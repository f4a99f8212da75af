/**
 * A model document compiled with two free parameters (docs/maps.md §1): the rates F(x, a, b), the
 * state Jacobian J_x, the parameter derivatives F_a, F_b, and the second derivatives the extended
 * systems of src/lib/maps need, all symbolic (src/lib/model/differentiate.ts) and compiled once
 * (src/lib/model/codegen.ts):
 *   secondState(x, a, b, v, out):   out[i n + j] = sum_k d J_ik / d x_j  v_k   (= d (J_x v)_i / d x_j)
 *   secondParameter(x, a, b, v, oa, ob): oa[i] = sum_k d J_ik / d a  v_k, ob likewise for b.
 * `a` is the swept (first) parameter, `b` the second one. Every other parameter is fixed at its
 * document value. The one-parameter compiler (src/lib/model/compile*.ts) is not changed: this file
 * only reuses its building blocks (expression whitelist, symbolic derivative, code generation), so
 * today's one-parameter systems and results are exactly what they were.
 *
 * Network documents are written out per node (every node and link unrolled), like the 'unrolled'
 * strategy of compile-network.ts; the generated trees are capped by MODEL_LIMITS.maxGeneratedTreeNodes.
 */
import { compileFunction, emit } from '../model/codegen.js';
import { compileModelJson } from '../model/compile.js';
import type { CompiledSystem, NetworkStructure } from '../model/compiled-system.js';
import { differentiate, symbolIndex } from '../model/differentiate.js';
import { ModelError, type ModelIssue } from '../model/errors.js';
import { bin, countNodes, num, replaceSymbols, sym, symbolsOf, type Expr } from '../model/expr.js';
import { fold } from '../model/fold.js';
import { atPath, internalTree, substitute } from '../model/internal-tree.js';
import { MODEL_LIMITS } from '../model/limits.js';
import { listNames } from '../model/names.js';
import type { ModelDocument, NetworkDocument, OdeDocument } from '../model/schema.js';
import { validateModelDocument } from '../model/validate.js';

type Fn3 = (x: Float64Array, a: number, b: number, out: Float64Array) => Float64Array;

export interface TwoParameterSystem {
  readonly dimension: number;
  readonly variables: readonly string[];
  /** [first (swept), second] parameter names. */
  readonly parameters: readonly [string, string];
  /** The second parameter's value in the document. */
  readonly secondValue: number;
  /** The first parameter's sweep range from the document (or the compile option). */
  readonly sweep: { readonly from: number; readonly to: number };
  rates(x: Float64Array, a: number, b: number, out: Float64Array): Float64Array;
  jacobian(x: Float64Array, a: number, b: number, out: Float64Array): Float64Array;
  /** outA[i] = dF_i/da, outB[i] = dF_i/db. */
  parameterDerivatives(x: Float64Array, a: number, b: number, outA: Float64Array, outB: Float64Array): void;
  /** out[i n + j] = sum_k d^2 F_i / dx_k dx_j v_k (n x n, row-major). */
  secondState(x: Float64Array, a: number, b: number, v: Float64Array, out: Float64Array): Float64Array;
  /** outA[i] = sum_k d^2 F_i / dx_k da v_k, outB likewise with b. */
  secondParameter(x: Float64Array, a: number, b: number, v: Float64Array, outA: Float64Array, outB: Float64Array): void;
  /** The ordinary one-parameter system (today's compiler) with the second parameter fixed at `b`. */
  atSecond(b: number, sweep?: { from: number; to: number }): CompiledSystem;
  /** The one-parameter system sweeping the second parameter over `sweep`, the first fixed at `a` (today's compiler, its sweepParameter option). */
  atFirst(a: number, sweep: { from: number; to: number }): CompiledSystem;
  /** Network structure of the one-parameter system (element roles, patterns), when a network. */
  readonly network?: NetworkStructure;
}

export interface TwoParameterOptions {
  /** The second free parameter (required). */
  readonly second: string;
  /** Sweep range of the first parameter (default: the document's sweep). */
  readonly sweep?: { readonly from: number; readonly to: number };
}

/**
 * Validate and compile a model document with its swept parameter and `options.second` free.
 * Problems throw a ModelError naming the field ('second' for the second parameter).
 */
export function compileTwoParameter(input: unknown, options: TwoParameterOptions): TwoParameterSystem {
  const checked = validateModelDocument(input);
  if (!checked.ok) throw new ModelError(checked.issues);
  const doc = checked.document;
  const first = doc.sweep.parameter;
  const second = options.second;
  const issues: ModelIssue[] = [];
  const names = doc.format === 'brinkmap/network-1' ? [doc.coupling.parameter, ...Object.keys(doc.element.parameters)] : Object.keys(doc.parameters);
  if (!names.includes(second)) issues.push({ path: 'second', message: `unknown parameter '${second}' (parameters: ${listNames(names)})` });
  else if (second === first) issues.push({ path: 'second', message: `'${second}' is already the swept parameter (sweep.parameter); name another one` });
  else if (doc.format === 'brinkmap/network-1' && second !== doc.coupling.parameter && doc.nodes.every((node) => node.parameters && Object.hasOwn(node.parameters, second))) {
    issues.push({ path: 'second', message: `every node overrides '${second}', so varying it changes nothing` });
  }
  const sweep = options.sweep ?? doc.sweep;
  if (!Number.isFinite(sweep.from) || !Number.isFinite(sweep.to) || sweep.from === sweep.to) {
    issues.push({ path: 'sweep', message: `expected two different finite numbers (got ${sweep.from}, ${sweep.to})` });
  }
  if (issues.length > 0) throw new ModelError(issues);

  const secondValue = doc.format === 'brinkmap/network-1'
    ? (second === doc.coupling.parameter ? doc.coupling.value : doc.element.parameters[second])
    : doc.parameters[second];
  const trees = atPath('(document)', () => (doc.format === 'brinkmap/network-1' ? networkTrees(doc, first, second) : odeTrees(doc, first, second)));
  const fns = atPath('(document)', () => generate(trees.trees, trees.n, trees.paths));
  const base = compileModelJson(doc, { sweep: { from: sweep.from, to: sweep.to } });
  return {
    dimension: trees.n,
    variables: [...base.variables],
    parameters: [first, second],
    secondValue,
    sweep: { from: sweep.from, to: sweep.to },
    ...fns,
    atSecond: (b: number, s = sweep) => compileModelJson(withSecond(doc, second, b), { sweep: { from: s.from, to: s.to } }),
    atFirst: (a: number, s: { from: number; to: number }) => compileModelJson(withSecond(doc, first, a), { sweepParameter: second, sweep: { from: s.from, to: s.to } }),
    ...(base.network ? { network: base.network } : {}),
  };
}

/** A copy of the document with parameter `second` set to b (nodes that override it keep their value). */
export function withSecond(doc: ModelDocument, second: string, b: number): ModelDocument {
  const copy = structuredClone(doc);
  if (copy.format === 'brinkmap/network-1') {
    if (second === copy.coupling.parameter) copy.coupling.value = b;
    else copy.element.parameters[second] = b;
  } else {
    copy.parameters[second] = b;
  }
  return copy;
}

// Internal symbols: v<j> state j, pa / pb the two free parameters.
const PA = 'pa';
const PB = 'pb';

function odeTrees(doc: OdeDocument, first: string, second: string): { trees: Expr[]; n: number; paths: string[] } {
  const paramNames = Object.keys(doc.parameters);
  const varIndex = new Map(doc.variables.map((v, i) => [v, i]));
  const rename = (name: string) => {
    const v = varIndex.get(name);
    if (v !== undefined) return `v${v}`;
    if (name === first) return PA;
    if (name === second) return PB;
    const k = paramNames.indexOf(name);
    if (k >= 0) return `k${k}`;
    throw new Error(`internal: unmapped symbol ${name}`);
  };
  const fixed = (name: string) => (name.startsWith('k') ? doc.parameters[paramNames[Number(name.slice(1))]] : undefined);
  const allowed = [...doc.variables, ...paramNames];
  const trees = doc.variables.map((v) => atPath(`rates.${v}`, () => fold(substitute(internalTree(doc.rates[v], allowed, rename, `rates.${v}`), fixed))));
  return { trees, n: doc.variables.length, paths: doc.variables.map((v) => `rates.${v}`) };
}

/**
 * Node i: f(x_i; q_i) + beta * sum_{links l to i} w_l g(x_from, x_i; q_i) (compile-network.ts), with the
 * two free parameters left as symbols where they apply (coupling, or element parameters on nodes that
 * do not override them) and every other parameter inlined.
 */
function networkTrees(doc: NetworkDocument, first: string, second: string): { trees: Expr[]; n: number; paths: string[] } {
  const n = doc.nodes.length;
  const paramNames = Object.keys(doc.element.parameters);
  const variable = doc.element.variable;
  const renameParam = (name: string) => `k${paramNames.indexOf(name)}`;
  const f = internalTree(doc.element.rate, [variable, ...paramNames], (s) => (s === variable ? 'u' : renameParam(s)), 'element.rate');
  const g = internalTree(doc.coupling.term, ['source', 'target', ...paramNames], (s) => (s === 'source' ? 's' : s === 'target' ? 't' : renameParam(s)), 'coupling.term');
  const coupling = doc.coupling.parameter;
  const beta = coupling === first ? sym(PA) : coupling === second ? sym(PB) : num(doc.coupling.value);
  const idIndex = new Map(doc.nodes.map((node, i) => [node.id, i]));
  const incoming: { from: number; weight: number }[][] = Array.from({ length: n }, () => []);
  for (const link of doc.links) {
    const from = idIndex.get(link.from)!;
    const to = idIndex.get(link.to)!;
    incoming[to].push({ from, weight: link.weight });
    if (link.twoWay && from !== to) incoming[from].push({ from: to, weight: link.weight });
  }
  const trees: Expr[] = [];
  for (let i = 0; i < n; i++) {
    const node = doc.nodes[i];
    const overrides = (k: string) => Boolean(node.parameters && Object.hasOwn(node.parameters, k));
    const param = (name: string): Expr | undefined => {
      if (!name.startsWith('k')) return undefined;
      const key = paramNames[Number(name.slice(1))];
      if (key === first && !overrides(key)) return sym(PA);
      if (key === second && !overrides(key)) return sym(PB);
      return num(overrides(key) ? node.parameters![key] : doc.element.parameters[key]);
    };
    let tree = replaceSymbols(f, (name) => (name === 'u' ? sym(`v${i}`) : param(name)));
    if (incoming[i].length > 0) {
      let sum: Expr | null = null;
      for (const l of incoming[i]) {
        const term = bin('*', num(l.weight), replaceSymbols(g, (name) => (name === 's' ? sym(`v${l.from}`) : name === 't' ? sym(`v${i}`) : param(name))));
        sum = sum === null ? term : bin('+', sum, term);
      }
      tree = bin('+', tree, bin('*', beta, sum!));
    }
    trees.push(fold(tree));
  }
  return { trees, n, paths: doc.nodes.map((_, i) => `nodes[${i}]`) };
}

interface Generated {
  rates: Fn3;
  jacobian: Fn3;
  parameterDerivatives: (x: Float64Array, a: number, b: number, outA: Float64Array, outB: Float64Array) => void;
  secondState: (x: Float64Array, a: number, b: number, v: Float64Array, out: Float64Array) => Float64Array;
  secondParameter: (x: Float64Array, a: number, b: number, v: Float64Array, outA: Float64Array, outB: Float64Array) => void;
}

function generate(trees: readonly Expr[], n: number, paths: readonly string[]): Generated {
  const code = (name: string): string => {
    if (name === PA) return 'a';
    if (name === PB) return 'b';
    if (/^v\d+$/.test(name)) return `x${name.slice(1)}`;
    throw new Error(`internal: symbol ${name} left after substitution`);
  };
  const isZero = (e: Expr) => e.kind === 'num' && e.value === 0;
  let generated = 0;
  const spend = (e: Expr, path: string) => {
    generated += countNodes(e);
    if (generated > MODEL_LIMITS.maxGeneratedTreeNodes) {
      throw new ModelError([{ path, message: `the second derivatives of the two-parameter system grow beyond ${MODEL_LIMITS.maxGeneratedTreeNodes} terms; shorten the rates or use fewer variables` }]);
    }
  };
  const powers = new Set<number>();
  const rate: string[] = [];
  const jac: string[] = [];
  const dpar: string[] = [];
  const second: string[] = [];
  const secondPar: string[] = [];
  for (let i = 0; i < n; i++) {
    const tree = trees[i];
    spend(tree, paths[i]);
    rate.push(`out[${i}] = ${emit(tree, code, powers)};`);
    const used = symbolsOf(tree);
    const index = symbolIndex(tree);
    const da = used.has(PA) ? differentiate(tree, PA, index) : num(0);
    const db = used.has(PB) ? differentiate(tree, PB, index) : num(0);
    spend(da, paths[i]);
    spend(db, paths[i]);
    dpar.push(`oa[${i}] = ${emit(da, code, powers)};`, `ob[${i}] = ${emit(db, code, powers)};`);
    const saTerms: string[] = [];
    const sbTerms: string[] = [];
    for (let k = 0; k < n; k++) {
      if (!used.has(`v${k}`)) continue;
      const jik = differentiate(tree, `v${k}`, index);
      spend(jik, paths[i]);
      if (isZero(jik)) continue;
      jac.push(`out[${i * n + k}] = ${emit(jik, code, powers)};`);
      const usedJ = symbolsOf(jik);
      const indexJ = symbolIndex(jik);
      for (let j = 0; j < n; j++) {
        if (!usedJ.has(`v${j}`)) continue;
        const h = differentiate(jik, `v${j}`, indexJ);
        spend(h, paths[i]);
        if (!isZero(h)) second.push(`out[${i * n + j}] += (${emit(h, code, powers)}) * v[${k}];`);
      }
      if (usedJ.has(PA)) {
        const h = differentiate(jik, PA, indexJ);
        spend(h, paths[i]);
        if (!isZero(h)) saTerms.push(`(${emit(h, code, powers)}) * v[${k}]`);
      }
      if (usedJ.has(PB)) {
        const h = differentiate(jik, PB, indexJ);
        spend(h, paths[i]);
        if (!isZero(h)) sbTerms.push(`(${emit(h, code, powers)}) * v[${k}]`);
      }
    }
    secondPar.push(`oa[${i}] = ${saTerms.length > 0 ? saTerms.join(' + ') : '0'};`, `ob[${i}] = ${sbTerms.length > 0 ? sbTerms.join(' + ') : '0'};`);
  }
  const locals = `const ${Array.from({ length: n }, (_, j) => `x${j} = x[${j}]`).join(', ')};`;
  const zero = (len: number) => `for (let k = 0; k < ${len}; k++) out[k] = 0;`;
  return {
    rates: compileFunction<Fn3>(['x', 'a', 'b', 'out'], `${locals}\n${rate.join('\n')}\nreturn out;`, powers),
    jacobian: compileFunction<Fn3>(['x', 'a', 'b', 'out'], `${locals}\n${zero(n * n)}\n${jac.join('\n')}\nreturn out;`, powers),
    parameterDerivatives: compileFunction(['x', 'a', 'b', 'oa', 'ob'], `${locals}\n${dpar.join('\n')}`, powers),
    secondState: compileFunction(['x', 'a', 'b', 'v', 'out'], `${locals}\n${zero(n * n)}\n${second.join('\n')}\nreturn out;`, powers),
    secondParameter: compileFunction(['x', 'a', 'b', 'v', 'oa', 'ob'], `${locals}\n${secondPar.join('\n')}`, powers),
  };
}
