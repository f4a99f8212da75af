import type { CompiledSystem, NetworkStructure } from './compiled-system';
import { compileFunction, emit } from './codegen';
import { differentiate } from './differentiate';
import { bin, countNodes, num, replaceSymbols, sym, symbolsOf, type Expr } from './expr';
import { fold, foldConstants } from './fold';
import { atPath, internalTree } from './internal-tree';
import type { NetworkDocument } from './schema';

type ElementFn = (x: number, q: Float64Array) => number;
type TermFn = (s: number, t: number, q: Float64Array) => number;
type VectorFn = (x: Float64Array, p: number, out: Float64Array) => Float64Array;

/**
 * How the network's rates are evaluated. 'unrolled' generates one straight-line function per output
 * (every node and link written out, parameters inlined); 'loop' evaluates the element and the term
 * through per-node parameter vectors in loops. Both come from the same symbolic derivatives; 'auto'
 * unrolls up to UNROLL_MAX_LINKS directed links and UNROLL_MAX_TREE_NODES generated tree nodes and
 * loops beyond, to bound the generated source and its compile time.
 */
export type NetworkStrategy = 'auto' | 'unrolled' | 'loop';
export const UNROLL_MAX_LINKS = 1024;
/** Upper bound on the tree nodes the unrolled form would generate (about 1 MB of source). */
export const UNROLL_MAX_TREE_NODES = 60_000;

/**
 * Compile a network document. Node i (state x_i, parameters q_i = element parameters overridden by
 * node i's) obeys
 *   dx_i/dt = f(x_i; q_i) + beta * sum_{links l with to = i} w_l * g(x_from(l), x_i; q_i),
 * with f the element rate and g the coupling term (its parameters are those of the receiving node).
 * Symbolic work is done once for the element (f, f_x, f_p) and once for the term (g, g_s, g_t, g_p),
 * not per node; the Jacobian is assembled from them:
 *   J_ii = f_x(x_i; q_i) + beta * sum_{l to i} w_l g_t,   J_i,from(l) += beta w_l g_s,
 *   F_p  = sum_{l to i} w_l g (p = beta), or f_p + beta * sum_{l to i} w_l g_p on nodes that do not
 *          override the swept element parameter p (0 on nodes that do).
 */
export function compileNetwork(
  doc: NetworkDocument,
  parameter: string,
  sweep: { from: number; to: number },
  strategy: NetworkStrategy = 'auto',
): CompiledSystem {
  const n = doc.nodes.length;
  const paramNames = Object.keys(doc.element.parameters);
  const paramIndex = new Map(paramNames.map((k, i) => [k, i]));
  const variable = doc.element.variable;
  const sweepIsCoupling = parameter === doc.coupling.parameter;
  const sweptIndex = sweepIsCoupling ? -1 : (paramIndex.get(parameter) ?? -1);
  if (!sweepIsCoupling && sweptIndex < 0) throw new Error(`internal: unknown swept parameter ${parameter}`);
  const sweptName = `k${sweptIndex}`;

  // Internal names: v (element state), s and t (term source/target), k<i> (element parameter i).
  const renameParam = (name: string): string => {
    const k = paramIndex.get(name);
    if (k === undefined) throw new Error(`internal: unmapped symbol ${name}`);
    return `k${k}`;
  };

  const element = atPath('element.rate', () => {
    const f = internalTree(doc.element.rate, [variable, ...paramNames], (s) => (s === variable ? 'v' : renameParam(s)), 'element.rate');
    return { f, fx: differentiate(f, 'v'), fp: sweepIsCoupling ? num(0) : differentiate(f, sweptName) };
  });
  const term = atPath('coupling.term', () => {
    const g = internalTree(
      doc.coupling.term,
      ['source', 'target', ...paramNames],
      (s) => (s === 'source' ? 's' : s === 'target' ? 't' : renameParam(s)),
      'coupling.term',
    );
    return {
      g,
      gs: differentiate(g, 's'),
      gt: differentiate(g, 't'),
      gp: sweepIsCoupling ? num(0) : differentiate(g, sweptName),
    };
  });
  const termUsesSwept = !sweepIsCoupling && symbolsOf(term.g).has(sweptName);

  const idIndex = new Map(doc.nodes.map((node, i) => [node.id, i]));
  const links: { from: number; to: number; weight: number }[] = [];
  for (const link of doc.links) {
    const from = idIndex.get(link.from)!;
    const to = idIndex.get(link.to)!;
    links.push({ from, to, weight: link.weight });
    if (link.twoWay && from !== to) links.push({ from: to, to: from, weight: link.weight });
  }

  const q: Float64Array[] = doc.nodes.map((node) =>
    // Own properties only: a parameter may be called 'constructor' or 'toString'.
    Float64Array.from(paramNames, (k) => (node.parameters && Object.hasOwn(node.parameters, k) ? node.parameters[k] : doc.element.parameters[k])),
  );
  // Nodes whose parameter vector carries the swept element parameter (those that do not override it).
  const free: boolean[] = doc.nodes.map((node) => !sweepIsCoupling && !(node.parameters && Object.hasOwn(node.parameters, parameter)));
  const couplingValue = doc.coupling.value;

  // Scalar closures of the element, for NetworkStructure (starting equilibria) and the loop strategy.
  const code = (name: string): string => {
    if (name === 'v') return 'x';
    if (name === 's' || name === 't') return name;
    if (name.startsWith('k')) return `q[${Number(name.slice(1))}]`;
    throw new Error(`internal: unmapped symbol ${name}`);
  };
  const elementFn = (e: Expr) => {
    const powers = new Set<number>();
    const body = `return ${emit(e, code, powers)};`;
    return compileFunction<ElementFn>(['x', 'q'], body, powers);
  };
  const termFn = (e: Expr) => {
    const powers = new Set<number>();
    const body = `return ${emit(e, code, powers)};`;
    return compileFunction<TermFn>(['s', 't', 'q'], body, powers);
  };
  const f = atPath('element.rate', () => elementFn(element.f));
  const fx = atPath('element.rate', () => elementFn(element.fx));

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

  const shared = { n, links, q, free, sweepIsCoupling, sweptIndex, sweptName, couplingValue, element, term, termUsesSwept };
  const unrolledSize =
    n * (countNodes(element.f) + countNodes(element.fx) + countNodes(element.fp))
    + links.length * (countNodes(term.g) + countNodes(term.gs) + countNodes(term.gt) + countNodes(term.gp));
  const useUnrolled = strategy === 'unrolled'
    || (strategy === 'auto' && links.length <= UNROLL_MAX_LINKS && unrolledSize <= UNROLL_MAX_TREE_NODES);
  const fns = useUnrolled
    ? atPath('links', () => unrolled(shared))
    : atPath('links', () => looped(shared, f, fx, elementFn, termFn));

  return {
    dimension: n,
    variables: doc.nodes.map((node) => node.id),
    parameter,
    sweep: { from: sweep.from, to: sweep.to },
    start: (doc.start ?? []).map((s) => Float64Array.from(s)),
    ...fns,
    network,
  };
}

interface Shared {
  readonly n: number;
  readonly links: readonly { from: number; to: number; weight: number }[];
  readonly q: Float64Array[];
  readonly free: readonly boolean[];
  readonly sweepIsCoupling: boolean;
  readonly sweptIndex: number;
  readonly sweptName: string;
  readonly couplingValue: number;
  readonly element: { f: Expr; fx: Expr; fp: Expr };
  readonly term: { g: Expr; gs: Expr; gt: Expr; gp: Expr };
  readonly termUsesSwept: boolean;
}

interface SystemFns {
  rates: VectorFn;
  jacobian: VectorFn;
  parameterDerivative: VectorFn;
}

/**
 * Straight-line code: per node the element tree with that node's parameters inlined (the swept one
 * as `p` where the node does not override it) and per link the term tree with source/target bound to
 * the two states. Rates fold only IEEE-exact constants; derivative trees use the full fold.
 */
function unrolled(sh: Shared): SystemFns {
  const { n, links, q, free, sweepIsCoupling, sweptName, couplingValue } = sh;
  const nodeTree = (e: Expr, i: number, bind: Record<string, Expr>): Expr =>
    replaceSymbols(e, (name) => {
      if (Object.hasOwn(bind, name)) return bind[name];
      if (name.startsWith('k')) {
        const k = Number(name.slice(1));
        if (name === sweptName && free[i]) return sym('p');
        return num(q[i][k]);
      }
      return undefined;
    });
  const state = (j: number) => sym(`x${j}`);
  const beta = sweepIsCoupling ? sym('p') : num(couplingValue);
  const code = (name: string): string => {
    if (name === 'p') return 'p';
    if (/^x\d+$/.test(name)) return name;
    throw new Error(`internal: unmapped symbol ${name}`);
  };
  const locals = `const ${Array.from({ length: n }, (_, j) => `x${j} = x[${j}]`).join(', ')};`;
  const incoming: { from: number; weight: number }[][] = Array.from({ length: n }, () => []);
  for (const l of links) incoming[l.to].push({ from: l.from, weight: l.weight });
  const bindST = (from: number, to: number) => ({ s: state(from), t: state(to) });

  // Rates: f_i + (beta * w) * g + ... in link order, exactly like sequential accumulation.
  const ratePowers = new Set<number>();
  const rateLines: string[] = [];
  for (let i = 0; i < n; i++) {
    let e = nodeTree(sh.element.f, i, { v: state(i) });
    for (const l of incoming[i]) e = bin('+', e, bin('*', bin('*', beta, num(l.weight)), nodeTree(sh.term.g, i, bindST(l.from, i))));
    rateLines.push(`out[${i}] = ${emit(foldConstants(e), code, ratePowers)};`);
  }

  // Jacobian entries as sums of derivative pieces.
  const entries = new Map<number, Expr[]>();
  const addEntry = (row: number, col: number, e: Expr) => {
    const key = row * n + col;
    const list = entries.get(key);
    if (list) list.push(e);
    else entries.set(key, [e]);
  };
  for (let i = 0; i < n; i++) {
    addEntry(i, i, nodeTree(sh.element.fx, i, { v: state(i) }));
    for (const l of incoming[i]) {
      const bw = bin('*', beta, num(l.weight));
      addEntry(i, i, bin('*', bw, nodeTree(sh.term.gt, i, bindST(l.from, i))));
      addEntry(i, l.from, bin('*', bw, nodeTree(sh.term.gs, i, bindST(l.from, i))));
    }
  }
  const jacPowers = new Set<number>();
  const jacLines: string[] = [];
  for (const [key, parts] of [...entries].sort((a, b) => a[0] - b[0])) {
    const e = fold(parts.reduce((acc, x) => bin('+', acc, x)));
    if (e.kind === 'num' && e.value === 0) continue;
    jacLines.push(`out[${key}] = ${emit(e, code, jacPowers)};`);
  }

  const dpPowers = new Set<number>();
  const dpLines: string[] = [];
  for (let i = 0; i < n; i++) {
    let e: Expr = num(0);
    if (sweepIsCoupling) {
      for (const l of incoming[i]) e = bin('+', e, bin('*', num(l.weight), nodeTree(sh.term.g, i, bindST(l.from, i))));
    } else if (free[i]) {
      e = nodeTree(sh.element.fp, i, { v: state(i) });
      if (sh.termUsesSwept) {
        for (const l of incoming[i]) e = bin('+', e, bin('*', bin('*', beta, num(l.weight)), nodeTree(sh.term.gp, i, bindST(l.from, i))));
      }
    }
    dpLines.push(`out[${i}] = ${emit(fold(e), code, dpPowers)};`);
  }

  const args = ['x', 'p', 'out'];
  return {
    rates: compileFunction<VectorFn>(args, `${locals}\n${rateLines.join('\n')}\nreturn out;`, ratePowers),
    jacobian: compileFunction<VectorFn>(args, `${locals}\nfor (let k = 0; k < ${n * n}; k++) out[k] = 0;\n${jacLines.join('\n')}\nreturn out;`, jacPowers),
    parameterDerivative: compileFunction<VectorFn>(args, `${locals}\n${dpLines.join('\n')}\nreturn out;`, dpPowers),
  };
}

/** Loops over nodes and links with per-node parameter vectors; for very large link counts. */
function looped(
  sh: Shared,
  f: ElementFn,
  fx: ElementFn,
  elementFn: (e: Expr) => ElementFn,
  termFn: (e: Expr) => TermFn,
): SystemFns {
  const { n, links, q, free, sweepIsCoupling, sweptIndex, couplingValue } = sh;
  const fp = sweepIsCoupling ? null : elementFn(sh.element.fp);
  const g = termFn(sh.term.g);
  const gs = termFn(sh.term.gs);
  const gt = termFn(sh.term.gt);
  const gp = sh.termUsesSwept ? termFn(sh.term.gp) : null;
  const m = links.length;
  const linkFrom = Int32Array.from(links, (l) => l.from);
  const linkTo = Int32Array.from(links, (l) => l.to);
  const linkWeight = Float64Array.from(links, (l) => l.weight);
  const freeNodes = Int32Array.from(free.flatMap((isFree, i) => (isFree ? [i] : [])));
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
      out[to * n + to] += bw * gt(x[from], x[to], q[to]);
      out[to * n + from] += bw * gs(x[from], x[to], q[to]);
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
    for (let i = 0; i < n; i++) out[i] = free[i] ? fp!(x[i], q[i]) : 0;
    if (gp) {
      for (let l = 0; l < m; l++) {
        const to = linkTo[l];
        if (free[to]) out[to] += couplingValue * linkWeight[l] * gp(x[linkFrom[l]], x[to], q[to]);
      }
    }
    return out;
  };

  return { rates, jacobian, parameterDerivative };
}
