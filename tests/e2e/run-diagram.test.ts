/**
 * The real run page (/runs/<id>) of a seeded demo lake variant in Chromium, checked against the API:
 * as the demo modeler, zoom (button and wheel) moves the axis; a special-point glyph opens its panel
 * (type in words, parameter, state, eigenvalues, reason); a band tag added through the diagram's tag
 * form appears in the tag layer, after a reload and in GET /api/runs/:id/tags; the SVG and CSV
 * exports parse and match the stored result. As the demo reviewer: no tag or run controls, the API
 * refuses a tag (403), a comment is added, and the printable report holds the band table and prints
 * to PDF. Screenshots in both themes go to the git-ignored screenshots/ folder.
 */
import { readFileSync } from 'node:fs';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import Papa from 'papaparse';
import { strFromU8, unzipSync } from 'fflate';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Diagram, SpecialPoint } from '../../src/lib/atlas/types';
import { SPECIAL_LABEL } from '../../src/lib/plot/markers';
import { splitAllRuns } from '../../src/lib/plot/runs';
import { formatValue } from '../../src/lib/plot/ticks';
import type { RegimeBand } from '../../src/lib/regimes/types';
import { bandExitSummary } from '../../src/lib/regimes/band-exits';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, shootBothThemes, signIn, specialMarkCount } from './browser.ts';


interface ApiResult { result: { diagram: Diagram; regimes: RegimeBand[] | { regimes?: RegimeBand[] } } }
interface ApiTag { id: number; from: number; to: number; name: string; colour: string; note: string }

let browser: Browser;
let runId = 0;
let diagram: Diagram;
let regimes: RegimeBand[] = [];
const tagName = `E2E checked band ${Date.now().toString(36)}`;

beforeAll(async () => { browser = await launchBrowser(); }, 60_000);
afterAll(async () => { await browser?.close(); });

async function signedIn(role: string): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1360, height: 1000 }, colorScheme: 'light', acceptDownloads: true });
  const page = await context.newPage();
  page.on('pageerror', (e) => console.error(`[${role} page error]`, e.message));
  await signIn(page, demoAccount(role).email, demoAccount(role).password);
  return { context, page };
}

async function openRun(page: Page) {
  await page.goto(`${BASE_URL}/runs/${runId}`);
  await hydrated(page);
  await page.waitForSelector('[data-testid=diagram-view]:not([data-drawn-points="0"])', { timeout: 30_000 });
}

async function download(page: Page, testId: string): Promise<string> {
  const [dl] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.getByTestId(testId).click()]);
  return readFileSync((await dl.path())!, 'utf8');
}

async function downloadBytes(page: Page, testId: string): Promise<Buffer> {
  const [dl] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.getByTestId(testId).click()]);
  return readFileSync((await dl.path())!);
}

const pDomain = async (page: Page) => (await page.getByTestId('diagram-view').getAttribute('data-p-domain'))!.split(',').map(Number);
/** Tick labels of the parameter axis (the first axis group of the front layer), without its title. */
const xTicks = (page: Page) => page.locator('.dg-overlay .dg-axis').first().locator('g > text').allTextContents();

/** A special point whose glyph no other glyph covers (several folds of the demo lie on one parameter value). */
async function isolatedSpecial(page: Page): Promise<SpecialPoint> {
  const boxes = await page.locator('[data-testid=diagram-view] [data-special-id]').evaluateAll((els) => els.map((el) => {
    const r = el.getBoundingClientRect();
    return { id: el.getAttribute('data-special-id')!, x: r.x + r.width / 2, y: r.y + r.height / 2 };
  }));
  const free = boxes.find((b) => boxes.every((o) => o === b || Math.hypot(o.x - b.x, o.y - b.y) > 24));
  expect(free, 'one special-point glyph stands apart from the others').toBeTruthy();
  return diagram.bifurcations.find((s) => s.id === free!.id)!;
}

describe('a seeded demo run page, as the demo modeler', () => {
  let context: BrowserContext;
  let page: Page;
  beforeAll(async () => {
    ({ context, page } = await signedIn('modeler'));
    const runs = await page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace`);
    expect(runs.status()).toBe(200);
    const items = ((await runs.json()) as { items: { id: number; modelName: string }[] }).items;
    // The seed's variants are named "Fenn lakes: ..." (invented demo data); take the one with the most special points.
    let best = -1;
    for (const r of items.filter((x) => x.modelName.startsWith('Fenn lakes'))) {
      const res = (await (await page.request.get(`${BASE_URL}/api/runs/${r.id}/result`)).json()) as ApiResult;
      const bands = Array.isArray(res.result.regimes) ? res.result.regimes : res.result.regimes?.regimes ?? [];
      const score = bands.length > 0 ? res.result.diagram.bifurcations.length : -1;
      if (score > best) { best = score; runId = r.id; diagram = res.result.diagram; regimes = bands; }
    }
    expect(runId, 'a finished demo run with bands').toBeGreaterThan(0);
    expect(diagram.bifurcations.length).toBeGreaterThan(0);
  }, 60_000);
  afterAll(async () => { await context?.close(); });

  it('draws every stored point (no thinning at this size) and one glyph per special point', async () => {
    await openRun(page);
    const total = diagram.branches.reduce((s, b) => s + b.points.length, 0);
    expect(Number(await page.getByTestId('diagram-view').getAttribute('data-total-points'))).toBe(total);
    expect(await specialMarkCount(page)).toBe(diagram.bifurcations.length);
    expect(Number(await page.getByTestId('run-diagram').getAttribute('data-branches'))).toBe(diagram.branches.length);
  }, 60_000);

  it('ships the diagram as a separate JSON fetch: the page HTML holds no branch data', async () => {
    const html = await (await page.request.get(`${BASE_URL}/runs/${runId}`)).text();
    expect(html).not.toContain('&quot;branches&quot;');
    expect(html).not.toContain('"branches"');
    expect(html.length).toBeLessThan(200_000);
    // ... while the drawn diagram is the full result's (the test above counts every stored point).
    expect(await page.locator('[data-testid=diagram-view]').count()).toBe(1);
  }, 60_000);

  it('Zoom in and the wheel narrow the parameter axis, its tick labels follow, Reset view restores them', async () => {
    const before = await pDomain(page);
    const ticksBefore = await xTicks(page);
    expect(ticksBefore.length).toBeGreaterThan(2);
    await page.getByRole('button', { name: 'Zoom in' }).click();
    await expect.poll(async () => { const d = await pDomain(page); return d[1] - d[0]; }).toBeLessThan((before[1] - before[0]) / 1.4);
    await expect.poll(() => xTicks(page)).not.toEqual(ticksBefore);
    const afterButton = await pDomain(page);
    // Every tick label lies inside the new domain.
    for (const t of await xTicks(page)) {
      const v = Number(t.replace('−', '-'));
      expect(v).toBeGreaterThanOrEqual(afterButton[0] - 1e-12);
      expect(v).toBeLessThanOrEqual(afterButton[1] + 1e-12);
    }
    const box = (await page.getByTestId('diagram-canvas').boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    for (let i = 0; i < 3; i++) await page.mouse.wheel(0, -300);
    await expect.poll(async () => { const d = await pDomain(page); return d[1] - d[0]; }).toBeLessThan((afterButton[1] - afterButton[0]) * 0.9);
    // The status line under the plot states the visible range.
    const d = await pDomain(page);
    expect(await page.locator('.dg-status').textContent()).toContain(`from ${formatValue(d[0], 4)} to ${formatValue(d[1], 4)}`);
    await page.getByTestId('reset-view').click();
    await expect.poll(() => pDomain(page)).toEqual(before);
    await expect.poll(() => xTicks(page)).toEqual(ticksBefore);
  }, 60_000);

  it('clicking a special-point glyph opens its panel: type in full words, parameter, state, eigenvalues and reason', async () => {
    const sp = await isolatedSpecial(page);
    await page.locator(`[data-special-id="${sp.id}"]`).click();
    // Over the glyph no branch tooltip covers it (the glyph carries its own title).
    expect(await page.locator('.dg-tooltip').count()).toBe(0);
    const panel = page.getByTestId('side-panel');
    expect(await panel.locator('.dg-panel-title').textContent()).toBe(SPECIAL_LABEL[sp.type]);
    expect(SPECIAL_LABEL[sp.type]).toMatch(/^(Saddle-node|Pitchfork|Transcritical|Hopf|Degenerate)$/);
    expect(await panel.getByTestId('special-p').textContent()).toBe(formatValue(sp.p, 10));
    expect(await panel.getByTestId('special-reason').textContent()).toBe(sp.evidence.reason);
    // State: one row per variable with the stored value, as the panel formats it (10 significant digits).
    const state = panel.locator('table.dg-kv', { has: page.locator('caption', { hasText: /^State$/ }) });
    for (const [i, name] of diagram.variables.entries()) {
      expect(await state.locator('tr', { has: page.locator(`th:text-is("${name}")`) }).locator('td').textContent()).toBe(formatValue(sp.x[i], 10));
    }
    // Eigenvalues at the point, as stored in the classification evidence.
    const eig = (sp.evidence as { eigenvalues?: { re: number; im: number }[] }).eigenvalues ?? [];
    expect(eig.length).toBe(diagram.variables.length);
    const eigTable = panel.getByTestId('special-eigenvalues');
    expect(await eigTable.locator('tbody tr').count()).toBe(eig.length);
    const shownRe = (await eigTable.locator('tbody tr td:first-child').allTextContents()).sort();
    expect(shownRe).toEqual(eig.map((e) => formatValue(e.re, 8)).sort());
    await page.getByTestId('run-diagram').scrollIntoViewIfNeeded();
    await shootBothThemes(page, 'run-diagram-special-panel');
    // The panel scrolls on its own: its lower part with the eigenvalues, for a look at the table.
    await panel.evaluate((el) => { el.scrollTop = el.scrollHeight; });
    await panel.screenshot({ path: screenshotPath('run-diagram-special-panel-eigenvalues-light') });
    expect(await panel.locator('.dg-panel-title').textContent()).toBe(SPECIAL_LABEL[sp.type]);
  }, 60_000);

  it('a band opens its reason and escape graph; a tag added through its form shows in the tag layer, after a reload and in the API', async () => {
    const tagsBefore = ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}/tags`)).json()) as { tags: ApiTag[] }).tags;
    const layerBefore = await page.getByTestId('tag-layer-item').count();
    expect(layerBefore).toBe(tagsBefore.length);
    await page.getByTestId('band-ribbon').first().click();
    const panel = page.getByTestId('side-panel');
    expect(await panel.getByTestId('band-reason').textContent()).toBe(regimes[0].reason);
    // The reason as a table: one row per exit the band's reason rests on, with a summary on top.
    expect(regimes[0].exits?.length ?? 0).toBeGreaterThan(0);
    expect(await panel.getByTestId('band-exits').locator('tbody tr').count()).toBe(regimes[0].exits!.length);
    expect(await panel.getByTestId('band-summary').textContent()).toBe(bandExitSummary(regimes[0]));
    await panel.screenshot({ path: screenshotPath('run-diagram-band-panel-light') });
    expect(await panel.getByTestId('escape-graph').count()).toBe(1);
    const form = panel.getByTestId('tag-form');
    await form.getByLabel('Name').fill(tagName);
    await form.getByLabel('Note').fill('Added by the run-diagram browser test.');
    await form.getByRole('button', { name: 'Add tag' }).click();
    await expect.poll(() => form.getByRole('status').textContent().catch(() => '')).toBe('Tag added.');
    await expect.poll(() => page.getByTestId('tag-layer-item').count()).toBe(layerBefore + 1);
    expect(await page.getByTestId('tag-label').allTextContents()).toContain(tagName);
    // The new tag shares its start with a seeded tag: the two names must not be printed over each other.
    const labels = await page.getByTestId('tag-label').evaluateAll((els) => els.map((el) => {
      const r = el.getBoundingClientRect();
      return { x0: r.left, x1: r.right, y0: r.top, y1: r.bottom };
    }));
    for (const [i, a] of labels.entries()) {
      for (const b of labels.slice(i + 1)) expect(a.x1 <= b.x0 || b.x1 <= a.x0 || a.y1 <= b.y0 || b.y1 <= a.y0).toBe(true);
    }
    // No branch under a tag name: the canvas the branches are drawn on is transparent under every
    // name's box (read back from the canvas pixels, independent of the placement code).
    const inked = await page.evaluate(() => {
      const canvas = document.querySelector('[data-testid=diagram-canvas]') as HTMLCanvasElement;
      const c = canvas.getBoundingClientRect();
      const ratio = canvas.width / c.width;
      const ctx = canvas.getContext('2d')!;
      return [...document.querySelectorAll('[data-testid=tag-label]')].map((el) => {
        const r = el.getBoundingClientRect();
        const x = Math.max(0, Math.floor((r.left - c.left) * ratio)), y = Math.max(0, Math.floor((r.top - c.top) * ratio));
        const w = Math.max(1, Math.floor(r.width * ratio)), h = Math.max(1, Math.floor(r.height * ratio));
        const data = ctx.getImageData(x, y, w, h).data;
        let count = 0;
        for (let k = 3; k < data.length; k += 4) if (data[k] > 0) count++;
        return { name: el.textContent, inked: count };
      });
    });
    expect(inked.length).toBeGreaterThan(0);
    expect(inked).toEqual(inked.map((l) => ({ name: l.name, inked: 0 })));
    // Every name lies inside the plot, also a tag near the end of the sweep.
    const outside = await page.evaluate(() => {
      const c = document.querySelector('[data-testid=diagram-canvas]')!.getBoundingClientRect();
      return [...document.querySelectorAll('[data-testid=tag-label]')].filter((el) => {
        const r = el.getBoundingClientRect();
        return r.left < c.left - 0.5 || r.right > c.right + 0.5;
      }).map((el) => el.textContent);
    });
    expect(outside).toEqual([]);
    await page.getByTestId('run-diagram').scrollIntoViewIfNeeded();
    // The panel scrolls on its own; show its head (band, reason, escape graph) in the screenshot.
    await page.getByTestId('side-panel').evaluate((el) => { el.scrollTop = 0; });
    await shootBothThemes(page, 'run-diagram-band-panel');

    const tags = ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}/tags`)).json()) as { tags: ApiTag[] }).tags;
    const mine = tags.filter((t) => t.name === tagName);
    expect(mine.length).toBe(1);
    // The form starts with the band's bounds as printed by String(number), which round-trips exactly.
    expect(mine[0].from).toBe(regimes[0].from);
    expect(mine[0].to).toBe(regimes[0].to);
    expect(mine[0].note).toBe('Added by the run-diagram browser test.');

    await openRun(page);
    expect(await page.getByTestId('tag-layer-item').count()).toBe(layerBefore + 1);
    expect(await page.getByTestId('tag-label').allTextContents()).toContain(tagName);
  }, 60_000);

  it('the escape graph opens full size: every state and saddle drawn, clickable with their values, Escape closes it', async () => {
    const graphs = ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}/result`)).json()) as { result: { regimes: { escapeGraphs?: { p: number; states: { x: number[] }[]; saddles: { x: number[] }[] }[] } } }).result.regimes.escapeGraphs ?? [];
    await openRun(page);
    await page.getByTestId('band-ribbon').first().click();
    const panel = page.getByTestId('side-panel');
    const graph = graphs.find((g) => g.p >= regimes[0].from && g.p <= regimes[0].to)!;
    expect(graph, 'an escape graph stored for the first band').toBeTruthy();
    await panel.getByTestId('escape-graph-open').click();
    const dialog = page.getByTestId('escape-graph-dialog');
    await expect.poll(() => dialog.isVisible()).toBe(true);
    const full = dialog.getByTestId('escape-graph-full');
    expect(await full.locator('[data-state]').count()).toBe(graph.states.length);
    expect(await full.locator('[data-saddle]').count()).toBe(graph.saddles.length);
    // Patterns readable: the state boxes are at least 15 px glyphs, wider than the thumbnail's circles.
    const box = await full.locator('[data-state] rect').first().boundingBox();
    expect(box!.width).toBeGreaterThan(60);
    // A state by click: its values per node, as stored.
    await full.locator('[data-state="0"]').click();
    const detail = dialog.getByTestId('escape-graph-detail');
    expect(await detail.locator('h4').textContent()).toMatch(/^Stable state: /);
    const cells = await detail.locator('td.num').allTextContents();
    expect(cells.map(Number)).toEqual(graph.states[0].x.map((v) => Number(formatValue(v, 10))));
    // A saddle by keyboard: Tab to it and Enter.
    await full.locator('[data-saddle="0"]').focus();
    await page.keyboard.press('Enter');
    expect(await detail.locator('h4').textContent()).toMatch(/^Saddle: between /);
    expect((await detail.locator('td.num').allTextContents()).map(Number)).toEqual(graph.saddles[0].x.map((v) => Number(formatValue(v, 10))));
    await shootBothThemes(page, 'run-diagram-escape-graph-full');
    await page.keyboard.press('Escape');
    await expect.poll(() => dialog.count()).toBe(0);
    // The panel stays open with its thumbnail.
    expect(await panel.getByTestId('escape-graph').count()).toBe(1);
  }, 60_000);

  it('lists the critical coupling per node, sortable, and colours the network by it', async () => {
    const stored = ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}/result`)).json()) as { result: { regimes: { onset?: { nodes: { id: string; status: string; critical: number | null; next: string[] | null }[] } } } }).result.regimes.onset;
    expect(stored, 'the stored result holds the critical coupling per node').toBeTruthy();
    await openRun(page);
    const panel = page.getByTestId('onset-panel');
    await panel.scrollIntoViewIfNeeded();
    await hydrated(page);
    const table = panel.getByTestId('onset-table');
    const ids = () => table.locator('tbody tr').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.node));
    const withFold = stored!.nodes.filter((n) => n.status === 'fold').sort((a, b) => a.critical! - b.critical!);
    expect(withFold.length).toBeGreaterThan(0);
    // Default order: smallest critical coupling first, as stored, printed to 8 significant digits.
    expect((await ids()).slice(0, withFold.length)).toEqual(withFold.map((n) => n.id));
    for (const n of withFold) {
      expect(await table.locator(`tr[data-node="${n.id}"] td.num`).textContent()).toBe(formatValue(n.critical!, 8));
      const next = await table.locator(`tr[data-node="${n.id}"] td`).nth(1).textContent();
      expect(next).toBe(n.next === null ? 'not resolved' : n.next.length === 0 ? 'none: it falls back or stays alone' : n.next.join(', '));
    }
    await panel.getByTestId('onset-sort-critical').click();
    expect((await ids()).slice(0, withFold.length)).toEqual([...withFold].reverse().map((n) => n.id));
    await panel.getByTestId('onset-sort-node').click();
    expect(await ids()).toEqual(stored!.nodes.map((n) => n.id));
    // The drawing: one node per network node, the lowest critical coupling the darkest fill.
    const fills = await panel.getByTestId('onset-network').locator('g[data-node] circle').evaluateAll((cs) => cs.map((c) => c.getAttribute('fill')));
    expect(fills.length).toBe(stored!.nodes.length);
    const lum = (hex: string) => { const v = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16)); return 0.2126 * v[0] + 0.7152 * v[1] + 0.0722 * v[2]; };
    if (withFold.length > 1) {
      const fillOf = (id: string) => fills[stored!.nodes.findIndex((n) => n.id === id)]!;
      expect(lum(fillOf(withFold[0].id))).toBeLessThan(lum(fillOf(withFold[withFold.length - 1].id)));
    }
    await panel.screenshot({ path: screenshotPath('run-onset-panel-light') });
    await shootBothThemes(page, 'run-onset');
  }, 60_000);

  it('the SVG export parses and holds one path per stable or unstable run of every branch; the CSV export matches result.csv row by row', async () => {
    await page.getByTestId('export-toggle').click();
    const svg = await download(page, 'export-svg');
    expect(XMLValidator.validate(svg)).toBe(true);
    const doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@', isArray: (n) => n === 'path' || n === 'text' }).parse(svg).svg;
    const runPaths = (doc.path as Record<string, string>[]).filter((x) => x['@data-run'] !== undefined);
    const runs = splitAllRuns(diagram.branches);
    expect(runPaths.length).toBe(runs.length);
    expect(new Set(runPaths.map((x) => x['@data-branch']))).toEqual(new Set(diagram.branches.map((b) => b.id)));
    for (const [k, run] of runs.entries()) {
      expect(runPaths[k]['@data-branch']).toBe(run.branchId);
      expect(runPaths[k]['@data-stability']).toBe(run.stable ? 'stable' : `unstable-${run.unstable}`);
      expect(runPaths[k]['@d']).toMatch(/^M[\d.-]+,[\d.-]+/);
    }
    // Unstable runs are dashed, stable ones solid (readable without colour).
    expect(runPaths.filter((x) => x['@data-stability'] !== 'stable').every((x) => x['@stroke-dasharray'])).toBe(true);
    expect(runPaths.filter((x) => x['@data-stability'] === 'stable').every((x) => !x['@stroke-dasharray'])).toBe(true);
    const glyphs = (doc.path as Record<string, string>[]).filter((x) => x['@data-special'] !== undefined);
    expect(glyphs.map((x) => x['@data-special']).sort()).toEqual(diagram.bifurcations.map((s) => s.id).sort());
    // The tag added above is in the figure's tag layer (the export shows the current view with tags).
    expect(JSON.stringify(doc.text)).toContain(tagName);

    // The export menu and the page's data link write one CSV layout: the same file, byte for byte,
    // provenance block included (lib/plot/data-export.ts).
    const menuText = await download(page, 'export-csv');
    const apiText = await (await page.request.get(`${BASE_URL}/api/runs/${runId}/result.csv`)).text();
    expect(menuText).toBe(apiText);
    expect(menuText.split('\n')).toContain(`# run: ${runId}`);
    const csv = Papa.parse<string[]>(menuText.trim(), { comments: '#' }).data;
    const nVar = diagram.variables.length;
    expect(csv[0]).toEqual(['branch', 'point', diagram.parameter, ...diagram.variables, 'unstable', 'stability']);
    // The figure bundle: figure in three formats, the same CSV, the model document of exactly this
    // version (byte for byte what the version export serves) and a README.
    const zip = unzipSync(new Uint8Array(await downloadBytes(page, 'export-bundle')));
    expect(Object.keys(zip).sort()).toEqual(['README.txt', 'data.csv', 'figure.pdf', 'figure.png', 'figure.svg', 'model.json']);
    expect(strFromU8(zip['data.csv'])).toBe(apiText);
    const runInfo = (await (await page.request.get(`${BASE_URL}/api/runs/${runId}`)).json()) as { run: { modelId: number; versionNumber: number } };
    const docText = await (await page.request.get(`${BASE_URL}/api/models/${runInfo.run.modelId}/versions/${runInfo.run.versionNumber}/export`)).text();
    expect(strFromU8(zip['model.json'])).toBe(docText);
    expect(strFromU8(zip['figure.pdf'].subarray(0, 5))).toBe('%PDF-');
    expect(Buffer.from(zip['figure.png']).indexOf('pHYs', 0, 'latin1')).toBeGreaterThan(0);
    expect(strFromU8(zip['README.txt'])).toContain(`run ${runId}`);
    expect(strFromU8(zip['README.txt'])).toMatch(/indicative/);
    // And against the JSON result: row k of branch b is point k of that branch.
    let r = 1;
    for (const b of diagram.branches) {
      for (const [k, pt] of b.points.entries()) {
        if (k === 0 || k === b.points.length - 1) {
          expect(csv[r][0]).toBe(b.id);
          expect(Number(csv[r][1])).toBe(k);
          expect(Number(csv[r][2])).toBe(pt.p);
          expect(csv[r].slice(3, 3 + nVar).map(Number)).toEqual(pt.x);
          expect(csv[r][3 + nVar + 1]).toBe(pt.unstable === 0 ? 'stable' : 'unstable');
        }
        r++;
      }
    }
  }, 90_000);
});

describe('the same run page, as the demo reviewer', () => {
  let context: BrowserContext;
  let page: Page;
  const comment = `Reviewer check ${Date.now().toString(36)}: please give the source of the first band's edge.`;
  beforeAll(async () => { ({ context, page } = await signedIn('reviewer')); }, 60_000);
  afterAll(async () => { await context?.close(); });

  it('shows no tag, run or edit controls, and the API refuses a tag with 403 for the role', async () => {
    expect(runId).toBeGreaterThan(0);
    await openRun(page);
    expect(await page.getByTestId('tag-range').count()).toBe(0);
    expect(await page.getByTestId('start-run').count()).toBe(0);
    expect(await page.getByTestId('edit-model').count()).toBe(0);
    expect(await page.getByRole('button', { name: /cancel/i }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /resolved/i }).count()).toBe(0);
    await page.getByTestId('band-ribbon').first().click();
    expect(await page.getByTestId('band-reason').count()).toBe(1);
    expect(await page.getByTestId('tag-form').count()).toBe(0);

    const before = ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}/tags`)).json()) as { tags: ApiTag[] }).tags.length;
    const refused = await page.request.post(`${BASE_URL}/api/runs/${runId}/tags`, {
      headers: { origin: BASE_URL },
      data: { from: regimes[0].from, to: regimes[0].to, name: 'reviewer tries', colour: '#336699', note: '' },
    });
    expect(refused.status()).toBe(403);
    // Refused for the role, not for the request's form.
    expect(((await refused.json()) as { error: { message: string } }).error.message).toContain('you are reviewer');
    const after = ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}/tags`)).json()) as { tags: ApiTag[] }).tags.length;
    expect(after).toBe(before);
  }, 60_000);

  it('comments on a band of the run; the comment shows on the page and in the API', async () => {
    await page.getByLabel('About').selectOption('band:0');
    await page.getByRole('textbox', { name: 'Comment' }).fill(comment);
    await Promise.all([page.waitForEvent('load', { timeout: 15_000 }), page.getByTestId('add-comment').click()]);
    await hydrated(page);
    await expect.poll(() => page.getByTestId('comments').textContent(), { timeout: 10_000 }).toContain(comment);
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${runId}/comments`)).json()) as { comments: { body: string; target: { kind: string; ref?: string } }[] };
    const mine = api.comments.find((c) => c.body === comment);
    expect(mine?.target).toEqual({ kind: 'band', ref: '0' });
    await shootBothThemes(page, 'run-diagram-reviewer');
  }, 60_000);

  it('opens the printable report from the run page; it holds the figure and the band table, and prints to PDF', async () => {
    await openRun(page);
    await Promise.all([page.waitForURL(/\/report\?/), page.getByRole('link', { name: 'Printable report' }).click()]);
    await hydrated(page);
    expect(await page.getByTestId('report-section').count()).toBe(1);
    const svgRuns = await page.locator('[data-testid=report-section] svg path[data-run]').count();
    expect(svgRuns).toBe(splitAllRuns(diagram.branches).length);
    const rows = page.getByTestId('report-band-table').locator('tbody tr');
    expect(await rows.count()).toBe(regimes.length);
    for (const [k, b] of regimes.entries()) {
      const cells = await rows.nth(k).locator('td').allTextContents();
      expect(cells.slice(0, 3)).toEqual([b.from.toPrecision(6), b.to.toPrecision(6), b.regime]);
      expect(cells[4]).toBe(b.reason);
    }
    await shootBothThemes(page, 'report-from-run');
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('header').first().isVisible()).toBe(false);
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(20_000);
    await page.emulateMedia({ media: 'screen' });
  }, 90_000);
});
