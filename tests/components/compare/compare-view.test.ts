/**
 * CompareView rendered to static markup (react-dom/server; effects do not run, so the width is the
 * default 960 px) and CompareLoader's fetch: short column headers with the full name on hover, the
 * run page's default vertical axis, panel sizes, overlay colours that are not the branch colours,
 * rows in the order of the matching, and the loading and failure states of the fetch.
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CompareView, type CompareItem } from '../../../src/components/compare/CompareView';
import CompareLoader, { loadCompareItems } from '../../../src/components/compare/CompareLoader';
import { alignSpecialPoints } from '../../../src/lib/plot/compare';
import type { Diagram } from '../../../src/lib/atlas/types';
import type { RegimeBand } from '../../../src/lib/regimes/types';
import { makeTwoLakeDiagram } from '../../fixtures/two-lake';

const three = JSON.parse(readFileSync('tests/fixtures/engine-three-lakes.json', 'utf8')) as { diagram: Diagram; regimes: RegimeBand[] };
const twoLakeItems: CompareItem[] = [
  { label: 'Two invented lakes v1 (run 11)', shortLabel: 'run 11', diagram: makeTwoLakeDiagram({ coupling: 0.1, pointsPerBranch: 200 }) },
  { label: 'Two invented lakes v2 (run 12)', shortLabel: 'run 12', diagram: makeTwoLakeDiagram({ coupling: 0.16, pointsPerBranch: 200 }) },
];
const render = (items: CompareItem[], initialMode?: 'side' | 'overlay') => renderToStaticMarkup(createElement(CompareView, { items, initialMode }));

describe('CompareView', () => {
  it('heads the columns with the short names and gives the full name on hover', () => {
    const html = render(twoLakeItems);
    expect(html).toContain('<abbr title="Two invented lakes v1 (run 11)">run 11</abbr>');
    expect(html).toContain('<abbr title="Two invented lakes v2 (run 12)">run 12</abbr>');
    expect(html).toContain('<abbr title="Two invented lakes v2 (run 12) minus Two invented lakes v1 (run 11)">Δ run 12 − run 11</abbr>');
    // The long names are not column headers.
    expect(html).not.toMatch(/<th scope="col">Two invented lakes/);
  });

  it('opens on the run page\'s vertical axis: the first node for two nodes, the mean state for three', () => {
    expect(render(twoLakeItems)).toContain('data-projection="node:0"');
    const threeItems: CompareItem[] = [
      { label: 'Three lakes A', shortLabel: 'run 1', diagram: three.diagram, regimes: three.regimes },
      { label: 'Three lakes B', shortLabel: 'run 2', diagram: three.diagram, regimes: three.regimes },
    ];
    const html = render(threeItems);
    expect(html).toContain('data-projection="mean"');
    expect(html).toMatch(/<option value="mean" selected="">mean state<\/option>/);
  });

  it('draws each diagram full width and as tall as the run page (420 px for two), the overlay taller (540 px)', () => {
    const side = render(twoLakeItems);
    const panels = [...side.matchAll(/<svg width="(\d+)" height="(\d+)" class="dg-compare-panel"/g)];
    expect(panels).toHaveLength(2);
    for (const m of panels) { expect(Number(m[1])).toBe(960); expect(Number(m[2])).toBe(420); }
    const overlay = render(twoLakeItems, 'overlay');
    const one = [...overlay.matchAll(/<svg width="(\d+)" height="(\d+)" class="dg-compare-panel"/g)];
    expect(one.map((m) => [Number(m[1]), Number(m[2])])).toEqual([[960, 540]]);
    const four = render([...twoLakeItems, ...twoLakeItems.map((i) => ({ ...i, shortLabel: i.shortLabel + 'b' }))]);
    expect([...four.matchAll(/class="dg-compare-panel"/g)]).toHaveLength(4);
    expect(four).toContain('height="340" class="dg-compare-panel"');
  });

  it('gives every stacked panel the same vertical range, so one state sits at one height in each', () => {
    const threeA = { ...three.diagram, branches: three.diagram.branches.map((b) => ({ ...b, points: b.points.map((pt) => ({ ...pt, x: pt.x.map((v) => v * 2) })) })) };
    const html = render([
      { label: 'A', shortLabel: 'a', diagram: three.diagram },
      { label: 'B', shortLabel: 'b', diagram: threeA },
    ]);
    const panels = html.split('class="dg-compare-panel"').slice(1);
    expect(panels).toHaveLength(2);
    // The y axis is the second axis group; its tick labels.
    const yTicks = (svg: string) => [...svg.split('class="dg-axis"')[2].matchAll(/<text[^>]*text-anchor="end">([^<]+)<\/text>/g)].map((m) => m[1]);
    expect(yTicks(panels[0]).length).toBeGreaterThan(2);
    expect(yTicks(panels[0])).toEqual(yTicks(panels[1]));
  });

  it('strokes overlaid branches in the overlay identities, never in the stable or unstable colour', () => {
    const html = render(twoLakeItems, 'overlay');
    const strokes = [...html.matchAll(/<path d="[^"]*" fill="none" data-diagram="(\d)"[^>]*stroke="([^"]+)"/g)];
    expect(strokes.length).toBeGreaterThan(2);
    for (const [, i, stroke] of strokes) expect(stroke).toBe(`var(--cmp-line-${Number(i) + 1})`);
    expect(html).not.toMatch(/stroke="var\(--dg-(un)?stable\)"/);
    // One panel each: branches keep the stable and unstable colours.
    expect(render(twoLakeItems)).toMatch(/stroke="var\(--dg-stable\)"/);
  });

  it('lists the special-point rows as alignSpecialPoints matches them, with their ids', () => {
    const html = render(twoLakeItems);
    const rows = alignSpecialPoints(twoLakeItems.map((i) => i.diagram));
    const shown = [...html.matchAll(/<tr class="[^"]*" data-ids="([^"]*)"><th scope="row"[^>]*>([^<]+)<\/th>/g)].map((m) => [m[1], m[2]]);
    expect(shown.slice(0, rows.length)).toEqual(rows.map((r) => [r.ids!.map((x) => x ?? '').join(','), r.label]));
  });
});

describe('CompareView, how far apart matched points are', () => {
  it('shows each special-point row\'s largest scaled distance in an "Apart" column, a dash for a lone point, none for band edges', () => {
    const html = render(twoLakeItems);
    const rows = alignSpecialPoints(twoLakeItems.map((i) => i.diagram));
    const cells = [...html.matchAll(/<td class="num" data-apart="">([^<]+)<\/td>/g)].map((m) => m[1]);
    expect(cells).toEqual(rows.map((r) => {
      const d = r.distances!.filter((v): v is number => v != null);
      return d.length < 2 ? '—' : Math.max(...d).toFixed(2);
    }));
    expect(html).toContain('<abbr title="How far apart the matched points sit');
    const withBands = render(twoLakeItems.map((it, k) => ({ ...it, regimes: [
      { from: 0, to: 0.1 + k * 0.01, regime: 'weak', bounds: [], reason: '' },
      { from: 0.1 + k * 0.01, to: 1, regime: 'strong', bounds: [], reason: '' },
    ] as RegimeBand[] })));
    const at = withBands.indexOf('data-testid="compare-band-table"');
    expect(at).toBeGreaterThan(0);
    expect(withBands.slice(at)).toContain('weak → strong');
    expect(withBands.slice(at)).not.toContain('data-apart');
  });
});

describe('CompareLoader', () => {
  const ok = (body: unknown) => new Response(JSON.stringify(body), { status: 200, headers: { 'Content-Type': 'application/json' } });

  it('first shows a loading state naming the runs, in the place of the comparison', () => {
    const html = renderToStaticMarkup(createElement(CompareLoader, { runIds: [3, 5], workspaceId: 'w1' }));
    expect(html).toContain('data-state="loading"');
    expect(html).toContain('aria-busy="true"');
    expect(html).toContain('Loading the diagrams of run 3 and run 5…');
    expect(html).not.toContain('compare-view');
  });

  it('asks /api/compare for the runs in order, in the page\'s workspace, and hands CompareView its items', async () => {
    const asked: { url: string; headers: Record<string, string> }[] = [];
    const fetcher = (async (url: string, init?: RequestInit) => {
      asked.push({ url, headers: init?.headers as Record<string, string> });
      return ok({ items: [{ runId: 5, label: 'L5', shortLabel: 'run 5', diagram: twoLakeItems[0].diagram, regimes: [], provenance: { modelName: 'm', versionHash: 'h', runId: '5', engineVersion: 'e', date: 'd' } }] });
    }) as typeof fetch;
    const items = await loadCompareItems({ runIds: [5, 3], workspaceId: 'w1', points: 4000 }, fetcher);
    expect(asked).toEqual([{ url: '/api/compare?runs=5%2C3&points=4000', headers: { Accept: 'application/json', 'X-Workspace': 'w1' } }]);
    expect(items.map((i) => [i.label, i.shortLabel, i.provenance?.runId])).toEqual([['L5', 'run 5', '5']]);
  });

  it('a refused fetch says what failed with the server\'s message, or the status line without one', async () => {
    const refused = (async () => new Response(JSON.stringify({ error: { code: 'not_found', message: 'run 9 not found' } }), { status: 404, statusText: 'Not Found', headers: { 'Content-Type': 'application/json' } })) as unknown as typeof fetch;
    await expect(loadCompareItems({ runIds: [1, 9], workspaceId: 'w' }, refused)).rejects.toThrow('The diagrams could not be loaded: run 9 not found');
    const bare = (async () => new Response('<html>oops</html>', { status: 502, statusText: 'Bad Gateway' })) as unknown as typeof fetch;
    await expect(loadCompareItems({ runIds: [1, 2], workspaceId: 'w' }, bare)).rejects.toThrow('the server answered 502 Bad Gateway');
    const down = (async () => { throw new TypeError('Failed to fetch'); }) as unknown as typeof fetch;
    await expect(loadCompareItems({ runIds: [1, 2], workspaceId: 'w' }, down)).rejects.toThrow('no answer from the server (Failed to fetch)');
  });
});
