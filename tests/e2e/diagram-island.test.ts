/**
 * The diagram island in Chromium on the development preview page (/dev/diagram-preview, invented
 * analytic fixture): 50,000 points drawn thinned, zoom responds, keyboard opens a special point, and
 * the SVG, CSV, PNG and PDF downloads are what they claim. The page exists only under `astro dev` or
 * with DEV_PAGES=1; where it is not served the tests skip and say so.
 * Base URL: DIAGRAM_PREVIEW_BASE_URL, else TEST_BASE_URL.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import Papa from 'papaparse';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { alignSpecialPoints } from '../../src/lib/plot/compare';
import { splitAllRuns } from '../../src/lib/plot/runs';
import { formatValue } from '../../src/lib/plot/ticks';
import { makeTwoLakeDiagram } from '../fixtures/two-lake';
import { BASE_URL, launchBrowser, screenshotPath, specialMarkCount } from './browser.ts';

const base = (process.env.DIAGRAM_PREVIEW_BASE_URL ?? BASE_URL).replace(/\/$/, '');
const demo = JSON.parse(readFileSync('seeds/demo-accounts.json', 'utf8')) as { users: { email: string; password: string; role: string }[] };
const modeler = demo.users.find((u) => u.role === 'modeler')!;
// The page builds the fixture with pointsPerBranch = round(50000 / 3), exactly as here.
const fixture = makeTwoLakeDiagram({ coupling: 0.1, pointsPerBranch: Math.round(50_000 / 3) });
const totalPoints = fixture.branches.reduce((s, b) => s + b.points.length, 0);

let browser: Browser | undefined;
let context: BrowserContext | undefined;
let page: Page | undefined;
let skipReason: string | null = null;

beforeAll(async () => {
  try {
    const res = await fetch(`${base}/api/health`).catch(() => null);
    if (!res) { skipReason = `no app answers on ${base}`; return; }
    browser = await launchBrowser();
    context = await browser.newContext({ viewport: { width: 1360, height: 1000 }, acceptDownloads: true });
    page = await context.newPage();
    await page.goto(`${base}/sign-in`);
    await page.getByLabel('E-mail address').fill(modeler.email);
    await page.getByLabel('Password').fill(modeler.password);
    await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in'), { timeout: 20_000 }), page.getByRole('button', { name: 'Sign in' }).click()]);
    const resp = await page.goto(`${base}/dev/diagram-preview?points=50000`, { waitUntil: 'networkidle', timeout: 120_000 });
    if (!resp || resp.status() === 404) { skipReason = `the development page /dev/diagram-preview is not served by ${base} (it needs astro dev or DEV_PAGES=1)`; return; }
    await page.waitForSelector('[data-testid=diagram-view][data-drawn-points]:not([data-drawn-points="0"])', { timeout: 60_000 });
  } catch (e) {
    skipReason = `could not open the preview page: ${e instanceof Error ? e.message.split('\n')[0] : String(e)}`;
  }
}, 180_000);

afterAll(async () => { await context?.close(); await browser?.close(); });

function ready(ctx: { skip: (note?: string) => void }): Page {
  if (skipReason || !page) { console.warn(`diagram-island e2e skipped: ${skipReason}`); ctx.skip(); }
  return page!;
}

async function downloadText(p: Page, testId: string): Promise<Buffer> {
  const [dl] = await Promise.all([p.waitForEvent('download', { timeout: 60_000 }), p.getByTestId(testId).click()]);
  return readFileSync((await dl.path())!);
}

describe('diagram island on the preview page', () => {
  it('draws 50,000 points thinned to the visible pixels, with one glyph per special point', async (ctx) => {
    const p = ready(ctx);
    const view = p.getByTestId('diagram-view').first();
    expect(Number(await view.getAttribute('data-total-points'))).toBe(totalPoints);
    const drawn = Number(await view.getAttribute('data-drawn-points'));
    expect(drawn).toBeGreaterThan(500);
    expect(drawn).toBeLessThan(totalPoints / 5);
    expect(await specialMarkCount(p)).toBe(fixture.bifurcations.length);
    await p.screenshot({ path: screenshotPath('diagram-island-50k') });
  });

  it('glyphs drawn over each other fold into one mark with a count; a click fans them out and each opens its panel', async (ctx) => {
    const p = ready(ctx);
    const view = p.getByTestId('diagram-view').first();
    // Mean state: the fixture's mirror-image folds (same beta, same mean) land on one spot.
    await view.getByTestId('projection-select').selectOption('mean');
    const groups = view.getByTestId('glyph-group');
    await expect.poll(() => groups.count()).toBeGreaterThan(0);
    expect(await specialMarkCount(p)).toBe(fixture.bifurcations.length);
    const ids = (await groups.first().getAttribute('data-group-ids'))!.split(' ');
    expect(ids.length).toBeGreaterThan(1);
    expect(await groups.first().locator('text').textContent()).toBe(String(ids.length));
    await view.screenshot({ path: screenshotPath('diagram-glyph-group-folded') });
    await groups.first().click();
    const open = view.getByTestId('glyph-group-open');
    await expect.poll(() => open.count()).toBe(1);
    expect(await open.locator('[data-special-id]').evaluateAll((gs) => gs.map((g) => g.getAttribute('data-special-id')))).toEqual(ids);
    await view.screenshot({ path: screenshotPath('diagram-glyph-group-open') });
    await open.locator(`[data-special-id="${ids[1]}"]`).click();
    const sp = fixture.bifurcations.find((b) => b.id === ids[1])!;
    expect(await p.getByTestId('special-p').first().textContent()).toBe(formatValue(sp.p, 10));
    await p.keyboard.press('Escape');
    await view.getByTestId('projection-select').selectOption('node:0');
  });

  it('the legend lists the glyphs of exactly the special-point types the diagram has', async (ctx) => {
    const p = ready(ctx);
    const inLegend = await p.locator('[data-testid=diagram-view] [data-legend-glyph]').evaluateAll((els) => els.map((e) => e.getAttribute('data-legend-glyph')));
    const inDiagram = [...new Set(fixture.bifurcations.map((b) => b.type))];
    expect(inDiagram.length).toBeLessThan(5); // the fixture lacks some types, so the check can fail
    expect([...inLegend].sort()).toEqual([...inDiagram].sort());
  });

  it('zooms the parameter axis on the wheel and the axes follow', async (ctx) => {
    const p = ready(ctx);
    const view = p.getByTestId('diagram-view').first();
    const before = (await view.getAttribute('data-p-domain'))!.split(',').map(Number);
    const box = (await p.getByTestId('diagram-canvas').boundingBox())!;
    await p.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    for (let i = 0; i < 4; i++) await p.mouse.wheel(0, -300);
    await p.waitForFunction((w) => {
      const d = document.querySelector('[data-testid=diagram-view]')!.getAttribute('data-p-domain')!.split(',').map(Number);
      return d[1] - d[0] < w * 0.8;
    }, before[1] - before[0], { timeout: 10_000 });
    const after = (await view.getAttribute('data-p-domain'))!.split(',').map(Number);
    expect(after[1] - after[0]).toBeLessThan(before[1] - before[0]);
    await p.screenshot({ path: screenshotPath('diagram-island-zoomed') });
    await p.getByTestId('reset-view').click();
  });

  it('tab to a special point and Enter opens its panel with the parameter value and reason', async (ctx) => {
    const p = ready(ctx);
    const sp = fixture.bifurcations.find((b) => b.id.startsWith('sn-asym'))!;
    await p.locator(`[data-special-id="${sp.id}"]`).focus();
    await p.keyboard.press('Enter');
    await expect(p.getByTestId('special-p').textContent()).resolves.toBe(formatValue(sp.p, 10));
    await expect(p.getByTestId('special-reason').textContent()).resolves.toBe(sp.evidence.reason);
  });

  it('the keyboard zooms the focused plot (+) and resets it (0)', async (ctx) => {
    const p = ready(ctx);
    const view = p.getByTestId('diagram-view').first();
    const width = () => view.getAttribute('data-p-domain').then((d) => { const [a, b] = d!.split(',').map(Number); return b - a; });
    const before = await width();
    await p.locator('.dg-overlay').first().focus();
    await p.keyboard.press('+');
    await expect.poll(width).toBeLessThan(before * 0.8);
    await p.keyboard.press('0');
    await expect.poll(width).toBeCloseTo(before, 6);
  });

  it('the hover readout follows a zoom under a pointer that does not move', async (ctx) => {
    const p = ready(ctx);
    const box = (await p.getByTestId('diagram-canvas').boundingBox())!;
    const x = box.x + box.width * 0.15;
    let found = false;
    for (let f = 0.05; f < 0.95 && !found; f += 0.005) {
      await p.mouse.move(x, box.y + box.height * f);
      found = (await p.locator('.dg-tooltip').count()) > 0;
    }
    expect(found).toBe(true);
    const head = () => p.locator('.dg-tooltip-head').count().then((c) => (c ? p.locator('.dg-tooltip-head').textContent() : 'none'));
    const before = await head();
    // Zoom about the centre by the keyboard: the data under the pointer moves, the pointer does not.
    await p.locator('.dg-overlay').first().focus();
    await p.keyboard.press('+');
    await expect.poll(head).not.toBe(before);
    await p.keyboard.press('0');
    await p.mouse.move(0, 0);
  });

  it('clicking on a branch opens the point panel with its state and eigenvalues', async (ctx) => {
    const p = ready(ctx);
    const box = (await p.getByTestId('diagram-canvas').boundingBox())!;
    const x = box.x + box.width * 0.15;
    let y = -1;
    for (let f = 0.05; f < 0.95; f += 0.005) {
      await p.mouse.move(x, box.y + box.height * f);
      if ((await p.locator('.dg-tooltip').count()) > 0) { y = box.y + box.height * f; break; }
    }
    expect(y).toBeGreaterThan(0);
    await p.mouse.click(x, y);
    const panel = p.getByTestId('side-panel');
    await expect(panel.locator('.dg-panel-title').textContent()).resolves.toMatch(/^Branch b\d+, point \d+$/);
    await expect(panel.getByText('Eigenvalues of the Jacobian', { exact: false }).count()).resolves.toBe(1);
    await expect(panel.locator('.dg-kv').first().locator('tr').count()).resolves.toBe(fixture.variables.length + 1);
  });

  it('a band opens its reason and escape graph; a tag added there appears in the tag layer and the toggle hides the layer', async (ctx) => {
    const p = ready(ctx);
    await p.getByTestId('band-ribbon').nth(2).click();
    await expect(p.getByTestId('band-reason').textContent()).resolves.toMatch(/strong band/);
    await expect(p.getByTestId('escape-graph').count()).resolves.toBe(1);
    const before = await p.getByTestId('tag-layer-item').count();
    const form = p.getByTestId('tag-form');
    await form.getByLabel('Name').fill('Checked by e2e');
    await form.getByRole('button', { name: 'Add tag' }).click();
    await expect.poll(() => p.getByTestId('tag-layer-item').count()).toBe(before + 1);
    await p.getByTestId('toggle-tags').uncheck();
    await expect.poll(() => p.getByTestId('tag-layer-item').count()).toBe(0);
    await p.getByTestId('toggle-tags').check();
  });

  it('exports an SVG that parses and has one path per branch run, and a CSV with one row per point', async (ctx) => {
    const p = ready(ctx);
    await p.getByTestId('export-toggle').click();
    const svg = (await downloadText(p, 'export-svg')).toString('utf8');
    expect(XMLValidator.validate(svg)).toBe(true);
    const doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@', isArray: (n) => n === 'path' }).parse(svg).svg;
    const runs = doc.path.filter((x: Record<string, string>) => x['@data-run'] !== undefined);
    expect(runs.length).toBe(splitAllRuns(fixture.branches).length);
    expect(svg).toContain("font-family:'Inter'");
    const csv = Papa.parse<string[]>((await downloadText(p, 'export-csv')).toString('utf8').trim(), { comments: '#' });
    expect(csv.data.length).toBe(totalPoints + 1);
    expect(Number(csv.data[1][2])).toBe(fixture.branches[0].points[0].p);
  });

  it('exports a PNG at twice the figure size and a PDF', async (ctx) => {
    const p = ready(ctx);
    if (!(await p.getByTestId('export-png-2').isVisible())) await p.getByTestId('export-toggle').click();
    const png = await downloadText(p, 'export-png-2');
    expect(png.subarray(1, 4).toString('latin1')).toBe('PNG');
    // IHDR width, big-endian at byte 16 (PNG spec, section 11.2.2): 2 × the 720 px figure.
    expect(png.readUInt32BE(16)).toBe(1440);
    const pdf = await downloadText(p, 'export-pdf');
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(10_000);
  });

  it('exports a one-column figure for a paper: PDF at 85 mm with a Greek axis title pdf.js reads back, PNG at 600 dpi with pHYs', async (ctx) => {
    const p = ready(ctx);
    if (!(await p.getByTestId('export-size').isVisible())) await p.getByTestId('export-toggle').click();
    await p.getByTestId('export-size').selectOption('one-column');
    expect(await p.getByTestId('export-width').inputValue()).toBe('85');
    await p.getByTestId('export-x-label').fill('coupling β (1/yr)');
    await p.locator('.dg-export-panel').screenshot({ path: screenshotPath('diagram-export-paper') });
    const pdf = await downloadText(p, 'export-pdf');
    const media = /\/MediaBox \[0 0 ([\d.]+) ([\d.]+)\]/.exec(pdf.toString('latin1'))!;
    // 85 mm = 85 / 25.4 in = 240.94 pt (1 in = 72 pt, PDF 1.7 §8.3.2.3).
    expect(Number(media[1])).toBeCloseTo((85 / 25.4) * 72, 1);
    const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
    const doc = await pdfjs.getDocument({ data: new Uint8Array(pdf), isEvalSupported: false }).promise;
    const text = (await (await doc.getPage(1)).getTextContent()).items.map((it) => ('str' in it ? it.str : '')).join('');
    expect(text).toContain('coupling β (1/yr)');
    const png = await downloadText(p, 'export-png-paper');
    writeFileSync(screenshotPath('diagram-export-paper-600dpi'), png);
    // IHDR width at byte 16 (PNG 1.2 §11.2.2): 85 mm at 600 dpi = 85 / 25.4 × 600 = 2008 px.
    expect(Math.abs(png.readUInt32BE(16) - Math.round((85 / 25.4) * 600))).toBeLessThanOrEqual(1);
    const phys = png.indexOf('pHYs', 0, 'latin1');
    expect(phys).toBeGreaterThan(0);
    // Pixels per metre, unit 1 = metre: 600 / 0.0254 = 23622 (PNG 1.2 §4.2.4.2).
    expect(png.readUInt32BE(phys + 4)).toBe(23622);
    expect(png[phys + 12]).toBe(1);
    // A size the layout cannot hold is refused in words, and the buttons wait.
    await p.getByTestId('export-width').fill('5');
    expect(await p.getByTestId('export-size-problem').textContent()).toMatch(/^width: must be between 20 and 600 mm/);
    expect(await p.getByTestId('export-pdf').isDisabled()).toBe(true);
    await p.getByTestId('export-size').selectOption('screen');
  });

  it('a stretch with no band is hatched in the ribbon, says why, and has a legend entry', async (ctx) => {
    const p = ready(ctx);
    // ?unlabelled=1 leaves out the fixture's middle band, with the bounds labelRegimes writes for it.
    await p.goto(`${base}/dev/diagram-preview?unlabelled=1`, { waitUntil: 'load' });
    await p.waitForSelector('[data-testid=diagram-view][data-drawn-points]:not([data-drawn-points="0"])', { timeout: 60_000 });
    const stretch = p.getByTestId('unlabelled-stretch');
    await expect.poll(() => stretch.count()).toBe(1);
    expect(await stretch.locator('title').textContent()).toContain('no way out of all-base found');
    expect(await p.locator('.dg-legend').textContent()).toContain('not labelled');
    expect(await p.getByTestId('unlabelled-row').textContent()).toContain('no way out of all-base found');
    await p.screenshot({ path: screenshotPath('diagram-unlabelled-stretch') });
    // Clicking its ribbon (or Enter on it) opens its reason in the side panel.
    const ribbon = p.getByTestId('unlabelled-ribbon');
    expect(await ribbon.count()).toBe(1);
    await ribbon.click();
    const panel = p.getByTestId('side-panel');
    expect(await panel.locator('.dg-panel-title').textContent()).toBe('Not labelled');
    expect(await panel.getByTestId('unlabelled-reason').textContent()).toContain('no way out of all-base found');
    await panel.getByRole('button', { name: 'Close details' }).click();
    await ribbon.focus();
    await p.keyboard.press('Enter');
    expect(await panel.getByTestId('unlabelled-reason').textContent()).toContain('no way out of all-base found');
    await panel.screenshot({ path: screenshotPath('diagram-unlabelled-panel') });
    // The full fixture has no gap: nothing hatched.
    await p.goto(`${base}/dev/diagram-preview`, { waitUntil: 'load' });
    await p.waitForSelector('[data-testid=diagram-view][data-drawn-points]:not([data-drawn-points="0"])', { timeout: 60_000 });
    expect(await p.getByTestId('unlabelled-stretch').count()).toBe(0);
  });

  it('compare: zooming one panel moves the shared axis of the other, and the table aligns every special point', async (ctx) => {
    const p = ready(ctx);
    await p.goto(`${base}/dev/diagram-preview?compare=1`, { waitUntil: 'load' });
    await p.waitForSelector('[data-testid=compare-view] .dg-compare-panel', { timeout: 60_000 });
    const panels = p.locator('.dg-compare-panel');
    const ticks = () => panels.nth(1).locator('.dg-axis').first().locator('text').allTextContents();
    const before = await ticks();
    await panels.nth(0).scrollIntoViewIfNeeded();
    const b = (await panels.nth(0).boundingBox())!;
    await p.mouse.move(b.x + b.width / 2, b.y + b.height / 2);
    for (let i = 0; i < 3; i++) await p.mouse.wheel(0, -300);
    await expect.poll(ticks).not.toEqual(before);
    // The page compares the two-lake fixture at coupling 0.1 and 0.16, 400 points per branch.
    const rows = alignSpecialPoints([makeTwoLakeDiagram({ coupling: 0.1, pointsPerBranch: 400 }), makeTwoLakeDiagram({ coupling: 0.16, pointsPerBranch: 400 })]);
    await expect(p.getByTestId('compare-special-table').locator('tbody tr').count()).resolves.toBe(rows.length);
    await p.getByTestId('compare-view').screenshot({ path: screenshotPath('diagram-compare-zoomed') });
  });
});
