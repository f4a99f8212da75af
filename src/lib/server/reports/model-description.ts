/**
 * What a report says about the model behind a run: its equations as TeX (typeset on the page with
 * KaTeX), its parameters and, for a network, its nodes and directed links. Pure: reads the stored
 * model document of the run's exact version, writes nothing.
 */
import { expressionToTex } from '../../editor/expression-tex.ts';
import { describeLinkCount } from '../../editor/directed-links.ts';
import type { ModelDocument } from '../../model/schema.ts';

export interface ReportEquation { label: string; tex: string }
export interface ReportParameter { name: string; tex: string; value: string; meaning: string }
export interface ReportNode { id: string; overrides: { name: string; value: number }[] }
export interface ReportLink { from: string; to: string; weight: number; twoWay: boolean }

export interface ModelDescription {
  kind: 'network' | 'ode';
  equations: ReportEquation[];
  /** One sentence under the equations saying what the symbols stand for; TeX between $ signs. */
  legend: string;
  parameters: ReportParameter[];
  nodes: ReportNode[];
  links: ReportLink[];
  /** "4 directed links (1 two-way pair counted both ways)"; empty for an ODE system. */
  linkCount: string;
  sweep: { parameter: string; from: number; to: number };
}

/**
 * An expression as TeX. Multi-letter names (source, target, rK) are set as one italic word, not as a
 * product of italic letters; commands (\frac, \beta) and names already in \mathit or \mathrm stay.
 */
const tex = (expression: string): string => {
  const r = expressionToTex(expression);
  if (!r.ok) return `\\text{${expression.replace(/[\\{}$&#^_%~]/g, ' ')}}`;
  return r.tex.trim().replace(/(?<![\\A-Za-z0-9]|\\math(?:it|rm)\{)([A-Za-z][A-Za-z0-9]+)/g, '\\mathit{$1}');
};
const value = (v: number) => (Number.isFinite(v) ? String(Number(v.toPrecision(6))) : String(v));

/**
 * The description of a validated model document. Network form: node i with state x_i obeys
 *   dx_i/dt = f(x_i) + beta * sum over links j -> i of w_ji g(x_j, x_i)
 * (the engine's equation, src/lib/model/compile-network.ts), written once with f and g given below it.
 * ODE form: one rate equation per variable.
 */
export function describeModel(doc: ModelDocument, range?: { from?: unknown; to?: unknown }): ModelDescription {
  // The run may sweep another range than the document's (run settings from/to).
  const sweep = {
    parameter: doc.sweep.parameter,
    from: typeof range?.from === 'number' ? range.from : doc.sweep.from,
    to: typeof range?.to === 'number' ? range.to : doc.sweep.to,
  };
  const swept = `swept ${value(sweep.from)} to ${value(sweep.to)}`;
  if (doc.format === 'brinkmap/network-1') {
    const v = tex(doc.element.variable);
    const beta = tex(doc.coupling.parameter);
    const sub = (s: string) => `{${v}}_{${s}}`;
    const equations: ReportEquation[] = [
      { label: 'Each node i', tex: `\\frac{\\mathrm{d}${sub('i')}}{\\mathrm{d}t} = f\\left(${sub('i')}\\right) + ${beta} \\sum_{j \\to i} w_{ji}\\, g\\left(${sub('j')}, ${sub('i')}\\right)` },
      { label: 'Element rate', tex: `f(${v}) = ${tex(doc.element.rate)}` },
      { label: 'Coupling term', tex: `g(\\mathit{source}, \\mathit{target}) = ${tex(doc.coupling.term)}` },
    ];
    const overridden = new Map<string, number>();
    for (const n of doc.nodes) for (const k of Object.keys(n.parameters ?? {})) overridden.set(k, (overridden.get(k) ?? 0) + 1);
    const parameters: ReportParameter[] = [
      {
        name: doc.coupling.parameter, tex: beta,
        value: sweep.parameter === doc.coupling.parameter ? swept : value(doc.coupling.value),
        meaning: 'coupling strength',
      },
      ...Object.entries(doc.element.parameters).map(([name, v]) => ({
        name, tex: tex(name),
        value: sweep.parameter === name ? swept : overridden.has(name) ? `${value(v)} (default)` : value(v),
        meaning: overridden.has(name) ? `element parameter; set per node at ${overridden.get(name)} of ${doc.nodes.length} nodes (below)` : 'element parameter, the same at every node',
      })),
    ];
    return {
      kind: 'network',
      equations,
      legend: `$${sub('i')}$ is the state of node $i$; the sum runs over the links $j \\to i$ into node $i$, $w_{ji}$ is the weight of the link from node $j$; in $g$, source is the state at the link's start and target the state of the receiving node.`,
      parameters,
      nodes: doc.nodes.map((n) => ({ id: n.id, overrides: Object.entries(n.parameters ?? {}).map(([name, v]) => ({ name, value: v })) })),
      links: doc.links.map((l) => ({ from: l.from, to: l.to, weight: l.weight, twoWay: l.twoWay })),
      linkCount: describeLinkCount(doc.links),
      sweep,
    };
  }
  const equations = doc.variables.map((name) => ({ label: name, tex: `\\frac{\\mathrm{d}${tex(name)}}{\\mathrm{d}t} = ${tex(doc.rates[name] ?? '')}` }));
  return {
    kind: 'ode',
    equations,
    legend: `State variables: ${doc.variables.map((x) => `$${tex(x)}$`).join(', ')}.`,
    parameters: Object.entries(doc.parameters).map(([name, v]) => ({
      name, tex: tex(name), value: sweep.parameter === name ? swept : value(v), meaning: '',
    })),
    nodes: [],
    links: [],
    linkCount: '',
    sweep,
  };
}
