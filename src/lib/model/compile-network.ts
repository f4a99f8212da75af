import type { CompiledSystem, NetworkStructure } from './compiled-system';
import { compileFunction, emit } from './codegen';
import { internalTree } from './compile-ode';
import { differentiate } from './differentiate';
import { ModelError } from './errors';
import { symbolsOf, type Expr } from './expr';
import type { NetworkDocument } from './schema';

type ElementFn = (x: number, q: Float64Array) => number;
type TermFn = (s: number, t: number, q: Float64Array) => number;

/**
 * Compile a network document. Node i (state x_i, parameter vector q_i = element parameters
 * overridden by node i's) obeys
 *   dx_i/dt = f(x_i; q_i) + beta * sum_{links l with to = i} w_l * g(x_from(l), x_i; q_i),
 * with f the element rate and g the coupling term (its parameters are those of the receiving node).
 * Symbolic work is done once for the element and once for the term, not per node:
 *   J_ii = f_x(x_i; q_i) + beta * sum_{l to i} w_l * g_t,   J_i,from(l) += beta * w_l * g_s,
 *   F_p  = sum_{l to i} w_l g (p = beta), or f_p + beta * sum w_l g_p on nodes that do not override
 *          the swept element parameter p (0 on nodes that do).
 */
export function compileNetwork(doc: NetworkDocument, parameter: string, sweep: { from: number; to: number }): CompiledSystem {
  const n = doc.nodes.length;
  const paramNames = Object.keys(doc.element.parameters);
  const paramIndex = new Map(paramNames.map((k, i) => [k, i]));
  const variable = doc.element.variable;
  const sweepIsCoupling = parameter === doc.coupling.parameter;
  const sweptIndex = sweepIsCoupling ? -1 : (paramIndex.get(parameter) ?? -1);
  if (!sweepIsCoupling && sweptIndex < 0) throw new Error(`internal: unknown swept parameter ${parameter}`);
  const sweptName = `k${sweptIndex}`;

  const renameParam = (name: string): string => {
    const k = paramIndex.get(name);
    if (k === undefined) throw new Error(`internal: unmapped symbol ${name}`);
    return `k${k}`;
  };
  const code = (name: string): string => {
    if (name === 'v') return 'x';
    if (name === 's' || name === 't') return name;
    if (name.startsWith('k')) return `q[${Number(name.slice(1))}]`;
    throw new Error(`internal: unmapped symbol ${name}`);
  };

  const build = (path: string, work: () => void) => {
    try {
      work();
    } catch (err) {
      if (err instanceof ModelError) throw err;
      throw new ModelError([{ path, message: `could not be compiled (${err instanceof Error ? err.message : String(err)})` }]);
    }
  };

  let f!: ElementFn, fx!: ElementFn, fp: ElementFn | null = null;
  build('element.rate', () => {
    const rate = internalTree(doc.element.rate, [variable, ...paramNames], (s) => (s === variable ? 'v' : renameParam(s)), 'element.rate');
    f = compileFunction<ElementFn>(['x', 'q'], `return ${emit(rate, code)};`);
    fx = compileFunction<ElementFn>(['x', 'q'], `return ${emit(differentiate(rate, 'v'), code)};`);
    if (!sweepIsCoupling) fp = compileFunction<ElementFn>(['x', 'q'], `return ${emit(differentiate(rate, sweptName), code)};`);
  });

  let g!: TermFn, gs!: TermFn, gt!: TermFn, gp: TermFn | null = null;
  build('coupling.term', () => {
    const term = internalTree(
      doc.coupling.term,
      ['source', 'target', ...paramNames],
      (s) => (s === 'source' ? 's' : s === 'target' ? 't' : renameParam(s)),
      'coupling.term',
    );
    const termFn = (e: Expr) => compileFunction<TermFn>(['s', 't', 'q'], `return ${emit(e, code)};`);
    g = termFn(term);
    gs = termFn(differentiate(term, 's'));
    gt = termFn(differentiate(term, 't'));
    if (!sweepIsCoupling && symbolsOf(term).has(sweptName)) gp = termFn(differentiate(term, sweptName));
  });

  const idIndex = new Map(doc.nodes.map((node, i) => [node.id, i]));
  const links: { from: number; to: number; weight: number }[] = [];
  for (const link of doc.links) {
    const from = idIndex.get(link.from)!;
    const to = idIndex.get(link.to)!;
    links.push({ from, to, weight: link.weight });
    if (link.twoWay && from !== to) links.push({ from: to, to: from, weight: link.weight });
  }
  const m = links.length;
  const linkFrom = Int32Array.from(links, (l) => l.from);
  const linkTo = Int32Array.from(links, (l) => l.to);
  const linkWeight = Float64Array.from(links, (l) => l.weight);

  const q: Float64Array[] = doc.nodes.map((node) =>
    Float64Array.from(paramNames, (k) => node.parameters?.[k] ?? doc.element.parameters[k]),
  );
  // Nodes whose own q carries the swept element parameter (those that do not override it).
  const free: boolean[] = doc.nodes.map((node) => !sweepIsCoupling && !(node.parameters && Object.hasOwn(node.parameters, parameter)));
  const freeNodes = Int32Array.from(free.flatMap((isFree, i) => (isFree ? [i] : [])));
  const couplingValue = doc.coupling.value;

  const setP = (p: number) => {
    for (let k = 0; k < freeNodes.length; k++) q[freeNodes[k]][sweptIndex] = p;
  };

  const rates = (x: Float64Array, p: number, out: Float64Array): Float64Array => {
    setP(p);
    const beta = sweepIsCoupling ? p : couplingValue;
    for (let i = 0; i < n; i++) out[i] = f(x[i], q[i]);
    for (let l = 0; l < m; l++) {
      const to = linkTo[l];
      out[to] += beta * linkWeight[l] * g(x[linkFrom[l]], x[to], q[to]);
    }
    return out;
  };

  const jacobian = (x: Float64Array, p: number, out: Float64Array): Float64Array => {
    setP(p);
    const beta = sweepIsCoupling ? p : couplingValue;
    out.fill(0, 0, n * n);
    for (let i = 0; i < n; i++) out[i * n + i] = fx(x[i], q[i]);
    for (let l = 0; l < m; l++) {
      const to = linkTo[l];
      const from = linkFrom[l];
      const bw = beta * linkWeight[l];
      const s = x[from];
      const t = x[to];
      out[to * n + to] += bw * gt(s, t, q[to]);
      out[to * n + from] += bw * gs(s, t, q[to]);
    }
    return out;
  };

  const parameterDerivative = (x: Float64Array, p: number, out: Float64Array): Float64Array => {
    setP(p);
    if (sweepIsCoupling) {
      out.fill(0, 0, n);
      for (let l = 0; l < m; l++) {
        const to = linkTo[l];
        out[to] += linkWeight[l] * g(x[linkFrom[l]], x[to], q[to]);
      }
      return out;
    }
    const beta = couplingValue;
    for (let i = 0; i < n; i++) out[i] = free[i] ? fp!(x[i], q[i]) : 0;
    if (gp) {
      for (let l = 0; l < m; l++) {
        const to = linkTo[l];
        if (free[to]) out[to] += beta * linkWeight[l] * gp(x[linkFrom[l]], x[to], q[to]);
      }
    }
    return out;
  };

  const network: NetworkStructure = {
    nodeIds: doc.nodes.map((node) => node.id),
    links: links.map((l) => ({ ...l })),
    sweepIsCoupling,
    couplingValue,
    elementRate(i: number, xi: number, p: number): number {
      if (free[i]) q[i][sweptIndex] = p;
      return f(xi, q[i]);
    },
    elementDerivative(i: number, xi: number, p: number): number {
      if (free[i]) q[i][sweptIndex] = p;
      return fx(xi, q[i]);
    },
  };

  return {
    dimension: n,
    variables: doc.nodes.map((node) => node.id),
    parameter,
    sweep: { from: sweep.from, to: sweep.to },
    start: (doc.start ?? []).map((s) => Float64Array.from(s)),
    rates,
    jacobian,
    parameterDerivative,
    network,
  };
}
