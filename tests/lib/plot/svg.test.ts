import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { buildFigure } from '../../../src/lib/plot/figure';
import { splitAllRuns } from '../../../src/lib/plot/runs';
import { figureToSvg, xmlEscape } from '../../../src/lib/plot/svg';
import { makeTwoLakeBands, makeTwoLakeDiagram, TWO_LAKE_PROVENANCE, TWO_LAKE_TAGS } from '../../fixtures/two-lake';

const diagram = makeTwoLakeDiagram({ pointsPerBranch: 300 });
const regimes = makeTwoLakeBands(diagram);

function parse(svg: string) {
  const parser = new XMLParser({ ignoreAttributes: false, parseTagValue: false, attributeNamePrefix: '@', isArray: (name) => ['path', 'rect', 'text'].includes(name) });
  return parser.parse(svg).svg;
}

describe('figureToSvg', () => {
  const fig = buildFigure({ diagram, projection: { kind: 'node', index: 0 }, regimes, tags: TWO_LAKE_TAGS, showTags: true, caption: 'Two lakes & a <test> caption', provenance: TWO_LAKE_PROVENANCE });
  const svg = figureToSvg(fig, { fontFaceCss: "@font-face{font-family:Inter;src:url(data:font/woff2;base64,AAAA) format('woff2')}" });

  it('is well-formed XML (fast-xml-parser validator)', () => {
    expect(XMLValidator.validate(svg)).toBe(true);
  });
  it('has one path per branch run, tagged with branch and run', () => {
    const paths = parse(svg).path.filter((p: Record<string, string>) => p['@data-run'] !== undefined);
    expect(paths.length).toBe(splitAllRuns(diagram.branches).length);
    const unstable = paths.filter((p: Record<string, string>) => p['@data-stability'] !== 'stable');
    for (const p of unstable) expect(p['@stroke-dasharray']).toBeTruthy();
    const stable = paths.filter((p: Record<string, string>) => p['@data-stability'] === 'stable');
    expect(stable.length).toBeGreaterThan(0);
    for (const p of stable) expect(p['@stroke-dasharray']).toBeUndefined();
    expect(Number(stable[0]['@stroke-width'])).toBeGreaterThan(Number(unstable[0]['@stroke-width']));
  });
  it('has one marker per special point inside the view, and one band rectangle per band', () => {
    const doc = parse(svg);
    expect(doc.path.filter((p: Record<string, string>) => p['@data-special']).length).toBe(diagram.bifurcations.length);
    expect(doc.rect.filter((r: Record<string, string>) => r['@data-layer'] === 'band').length).toBe(regimes.length);
    expect(doc.rect.filter((r: Record<string, string>) => r['@data-layer'] === 'tag').length).toBe(1);
  });
  it('keeps text as text: the escaped caption, the provenance and the axis title', () => {
    const texts = parse(svg).text.map((t: unknown) => (typeof t === 'string' ? t : (t as { '#text': string })['#text']));
    expect(texts).toContain('Two lakes & a <test> caption');
    expect(texts.some((t: string) => t.includes('run fixture-run') && t.includes('engine fixture-analytic-1'))).toBe(true);
    expect(texts).toContain('parameter c');
    expect(svg).toContain('@font-face');
  });
  it('without tags shown, no tag layer is drawn', () => {
    const plain = figureToSvg(buildFigure({ diagram, projection: { kind: 'mean' }, regimes, tags: TWO_LAKE_TAGS, showTags: false }));
    expect(parse(plain).rect.filter((r: Record<string, string>) => r['@data-layer'] === 'tag').length).toBe(0);
  });
  it('thins a 50,000-point branch to the budget but keeps one path per run', () => {
    const big = makeTwoLakeDiagram({ pointsPerBranch: 17_000 });
    const fig2 = buildFigure({ diagram: big, projection: { kind: 'norm' }, pointBudget: 500 });
    const paths = fig2.items.filter((p) => p.t === 'path' && p.data?.run !== undefined);
    expect(paths.length).toBe(splitAllRuns(big.branches).length);
    const vertices = paths.reduce((s, p) => s + (p.t === 'path' ? (p.d.match(/[ML]/g)?.length ?? 0) : 0), 0);
    expect(vertices).toBeLessThan(big.branches.length * 17_000 / 4);
  });
});

describe('xmlEscape', () => {
  it('escapes the five XML special characters', () => {
    expect(xmlEscape(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&apos;&amp;&apos;&lt;/a&gt;');
  });
});
