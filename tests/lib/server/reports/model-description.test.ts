/**
 * describeModel(doc, range): the report's account of a model document (equations as TeX for KaTeX,
 * parameters, nodes and directed links). Invented documents.
 */
import { describe, expect, it } from 'vitest';
import katex from 'katex';
import { modelDocumentSchema } from '../../../../src/lib/model/schema';
import { describeModel } from '../../../../src/lib/server/reports/model-description';

const parse = (doc: unknown) => modelDocumentSchema.parse(doc);

describe('describeModel(doc, range)', () => {
  const network = parse({
    format: 'brinkmap/network-1',
    name: 'Invented ring',
    element: { variable: 'x', rate: 'rK - x^3 + x', parameters: { rK: 0.2 } },
    nodes: [{ id: 'north' }, { id: 'east', parameters: { rK: 0.3 } }, { id: 'south' }],
    links: [{ from: 'north', to: 'east', weight: 0.5, twoWay: true }, { from: 'east', to: 'south', weight: -0.25 }],
    coupling: { parameter: 'kappa', value: 0.1, term: 'source' },
    sweep: { parameter: 'rK', from: -1, to: 1 },
  });

  it('writes the network equation once, with f and g below it, every formula accepted by KaTeX in strict mode', () => {
    const m = describeModel(network);
    expect(m.equations.map((e) => e.label)).toEqual(['Each node i', 'Element rate', 'Coupling term']);
    expect(m.equations[0].tex).toBe('\\frac{\\mathrm{d}{x}_{i}}{\\mathrm{d}t} = f\\left({x}_{i}\\right) + \\kappa \\sum_{j \\to i} w_{ji}\\, g\\left({x}_{j}, {x}_{i}\\right)');
    // A multi-letter parameter is one italic word, not r times K.
    expect(m.equations[1].tex).toContain('\\mathit{rK}');
    expect(m.equations[1].tex).not.toContain('\\mathit{\\mathit');
    expect(m.equations[2].tex).toBe('g(\\mathit{source}, \\mathit{target}) = \\mathit{source}');
    for (const e of m.equations) expect(() => katex.renderToString(e.tex, { throwOnError: true, strict: 'error' })).not.toThrow();
    for (const p of m.parameters) expect(() => katex.renderToString(p.tex, { throwOnError: true, strict: 'error' })).not.toThrow();
    expect(() => katex.renderToString(m.legend.split('$').filter((_, k) => k % 2 === 1).join(' , '), { throwOnError: true })).not.toThrow();
  });

  it('lists the coupling parameter first, marks the swept one with its range and the per-node defaults', () => {
    const m = describeModel(network);
    expect(m.parameters.map((p) => [p.name, p.tex, p.value])).toEqual([['kappa', '\\kappa', '0.1'], ['rK', '\\mathit{rK}', 'swept -1 to 1']]);
    expect(m.parameters[1].meaning).toBe('element parameter; set per node at 1 of 3 nodes (below)');
    expect(m.nodes).toEqual([{ id: 'north', overrides: [] }, { id: 'east', overrides: [{ name: 'rK', value: 0.3 }] }, { id: 'south', overrides: [] }]);
  });

  it('counts a two-way link as two directed links and keeps signed weights', () => {
    const m = describeModel(network);
    expect(m.links).toEqual([{ from: 'north', to: 'east', weight: 0.5, twoWay: true }, { from: 'east', to: 'south', weight: -0.25, twoWay: false }]);
    expect(m.linkCount).toBe('3 directed links (1 two-way pair counted both ways)');
  });

  it('takes the run\'s range over the document\'s when given, and ignores non-numbers', () => {
    expect(describeModel(network, { from: 0, to: 0.5 }).parameters[1].value).toBe('swept 0 to 0.5');
    expect(describeModel(network, { from: '0', to: null }).sweep).toEqual({ parameter: 'rK', from: -1, to: 1 });
  });

  it('gives an ODE system one rate equation per variable and its parameter table, without a network', () => {
    const m = describeModel(parse({
      format: 'brinkmap/ode-1',
      name: 'Invented pair',
      variables: ['u', 'v'],
      parameters: { mu: 1, c: 0.3 },
      rates: { u: 'mu - u^2 + c * v', v: 'u - v' },
      sweep: { parameter: 'mu', from: -1, to: 2 },
    }));
    expect(m.kind).toBe('ode');
    expect(m.equations.map((e) => e.label)).toEqual(['u', 'v']);
    expect(m.equations[0].tex).toMatch(/^\\frac\{\\mathrm\{d\}u\}\{\\mathrm\{d\}t\} = /);
    expect(m.equations[0].tex).toContain('\\mu');
    expect(m.parameters.map((p) => [p.name, p.value])).toEqual([['mu', 'swept -1 to 2'], ['c', '0.3']]);
    expect(m.nodes).toEqual([]);
    expect(m.links).toEqual([]);
    expect(m.legend).toBe('State variables: $u$, $v$.');
  });
});
