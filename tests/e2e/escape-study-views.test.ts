/**
 * The views of an escape study, end to end in Chromium: as the demo modeler, open the finished
 * diagram run of the first demo model, start a small study through the "Study escapes" form (a
 * field error shown beside its field first), watch the run page's progress until it finishes, hover
 * a point of the escape-order chart and read its interval against the API, export that chart as SVG
 * (well-formed, one mark per Monte Carlo estimate), PNG and PDF, and look at both themes. A reviewer
 * sees no start button. Screenshots in screenshots/escape-study-views-*.png.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { EscapePoint } from '../../src/lib/server/escapes/rows';
import { sequenceSeries } from '../../src/lib/plot/escape-series';
import { formatValue } from '../../src/lib/plot/ticks';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, shootBothThemes, signIn } from './browser.ts';

let browser: Browser;
let context: BrowserContext;
let page: Page;
let traceRunId = 0;
let modelId = 0;
let studyRunId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1280, height: 900 }, colorScheme: 'light', acceptDownloads: true });
  page = await context.newPage();
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
  const models = (await (await page.request.get(`${BASE_URL}/api/models`)).json()) as { items: { id: number; name: string }[] };
  modelId = models.items.find((m) => m.name.includes('downstream flow only'))!.id;
  const runs = (await (await page.request.get(`${BASE_URL}/api/runs?kind=trace&modelId=${modelId}`)).json()) as { items: { id: number; status: string; sliceOf: number | null; settings: { override?: unknown } }[] };
  // A run of the version itself: slices of a map (another test file makes them) override a parameter
  // and offer no study or map forms.
  traceRunId = runs.items.find((r) => r.status === 'done' && r.sliceOf === null && !r.settings?.override)?.id ?? 0;
}, 60_000);
afterAll(async () => { await browser?.close(); });

async function download(p: Page, testId: string): Promise<Buffer> {
  const [dl] = await Promise.all([p.waitForEvent('download', { timeout: 60_000 }), p.getByTestId(testId).click()]);
  return readFileSync((await dl.path())!);
}

describe('escape study views', () => {
  it('starts a study from a finished diagram run through the form and follows it to the charts', async () => {
    expect(traceRunId, 'the seed has a finished diagram run of the first demo model').toBeGreaterThan(0);
    await page.goto(`${BASE_URL}/runs/${traceRunId}`);
    await hydrated(page);
    await page.getByTestId('study-escapes-open').click();
    const form = page.getByTestId('study-escapes-form');
    await form.getByTestId('es-noise').fill('loud');
    await expect.poll(() => form.getByTestId('es-noise-error').textContent()).toContain('is not a number');
    expect(await form.getByTestId('es-noise').getAttribute('aria-invalid')).toBe('true');
    await form.getByTestId('es-noise').fill('0.45');
    await form.getByTestId('es-mode-list').check();
    await form.getByTestId('es-values').fill('0.05, 0.1');
    await form.getByTestId('es-paths').fill('200');
    await form.getByTestId('es-seed').fill('5');
    await form.getByTestId('es-threads').fill('1');
    expect(await form.getByTestId('es-noise-error').count()).toBe(0);
    expect(await form.getByTestId('es-estimate').textContent()).toContain('200 paths (and 400 step-check paths) at each of 2 values');
    // A time estimate once the step and the cap are given: (200 + 400) · (100 / 0.01) · 3 nodes = 1.8e7 node-steps per value, 3.6e7 for both.
    await form.getByTestId('es-dt').fill('0.01');
    await form.getByTestId('es-tMax').fill('100');
    await expect.poll(() => form.getByTestId('es-estimate').textContent()).toContain('3.60e+7 node-steps');
    await form.getByTestId('es-dt').fill('');
    await form.getByTestId('es-tMax').fill('');
    await page.screenshot({ path: screenshotPath('escape-study-views-form'), fullPage: true });
    await Promise.all([
      page.waitForURL((u) => /^\/runs\/\d+$/.test(u.pathname) && u.pathname !== `/runs/${traceRunId}`, { timeout: 20_000 }),
      form.getByTestId('study-escapes-start').click(),
    ]);
    studyRunId = Number(new URL(page.url()).pathname.split('/').pop());
    const run = (await (await page.request.get(`${BASE_URL}/api/runs/${studyRunId}`)).json()) as { run: { kind: string; settings: { values: number[]; paths: number; seed: number; atlas: unknown } } };
    expect(run.run.kind).toBe('escapes');
    expect(run.run.settings).toMatchObject({ values: [0.05, 0.1], paths: 200, seed: 5 });
    // The progress bar while it runs (unless the worker was quicker than the page), then the reload into the charts.
    await hydrated(page);
    const views = page.getByTestId('escape-view');
    await expect.poll(async () => (await views.count()) > 0 && Number(await views.getAttribute('data-values')) === 2 && (await page.getByTestId('run-progress').count()) === 0,
      { timeout: 170_000, interval: 1000 }).toBe(true);
    await hydrated(page);
  }, 240_000);

  it('hovering an escape-order point reads out its interval, as the API stores it', async () => {
    expect(studyRunId).toBeGreaterThan(0);
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${studyRunId}/escapes`)).json()) as { points: EscapePoint[] };
    const top = sequenceSeries(api.points)[0];
    const mark = page.locator(`[data-testid=escape-chart-sequences] [data-testid=escape-mark][data-series="${top.label}"]`).first();
    await mark.hover();
    const readout = page.getByTestId('escape-chart-sequences').getByTestId('escape-readout');
    const e = top.estimates[0];
    await expect.poll(() => readout.textContent()).toContain(`95 % interval ${formatValue(e.low, 4)} to ${formatValue(e.high, 4)}`);
    expect(await readout.textContent()).toContain(`${e.count} of ${e.paths} paths`);
    // From the keyboard: the marks are in the tab order and a focused mark shows its own readout.
    await mark.focus();
    await page.mouse.move(0, 0);
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('escape-mark');
    const focused = await page.evaluate(() => document.activeElement?.getAttribute('aria-label') ?? '');
    await expect.poll(() => readout.textContent()).toContain(focused.split('; ')[0]);
    // A click opens the waiting times at that value.
    await mark.click();
    expect(Number(await page.getByTestId('escape-survival').getAttribute('data-at'))).toBe(e.p);
    await shootBothThemes(page, 'escape-study-views');
  }, 60_000);

  it('exports the sequence chart as SVG with one mark per estimate, and as PNG and PDF', async () => {
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${studyRunId}/escapes`)).json()) as { points: EscapePoint[] };
    const estimates = sequenceSeries(api.points).slice(0, 6).reduce((n, s) => n + s.estimates.length, 0);
    await page.getByTestId('export-toggle-sequences').click();
    const svg = (await download(page, 'export-svg-sequences')).toString('utf8');
    expect(XMLValidator.validate(svg)).toBe(true);
    const doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@', isArray: (n) => n === 'path' || n === 'text' }).parse(svg).svg;
    expect(doc.path.filter((x: Record<string, string>) => x['@data-mark'] === 'point').length).toBe(estimates);
    const texts = doc.text.map((t: string | Record<string, string>) => (typeof t === 'string' ? t : t['#text'])).join(' ');
    expect(texts).toContain(`run ${studyRunId}`);
    expect(texts).toContain('noise level 0.45');
    expect(texts).toContain('200 paths per value');
    expect(texts).toContain('seed 5');
    const png = await download(page, 'export-png-sequences');
    expect(png.subarray(1, 4).toString('latin1')).toBe('PNG');
    // IHDR width, big-endian at byte 16 (PNG spec, section 11.2.2): 2 × the 720 px figure.
    expect(png.readUInt32BE(16)).toBe(1440);
    writeFileSync(screenshotPath('escape-study-views-export'), png);
    const pdf = await download(page, 'export-pdf-sequences');
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
  }, 90_000);

  it('the charts follow the theme: the plot paper changes with it', async () => {
    const paper = () => page.locator('[data-testid=escape-chart-sequences] svg > rect').first().getAttribute('fill');
    await page.evaluate(() => { document.documentElement.dataset.theme = 'dark'; window.dispatchEvent(new CustomEvent('bm-theme-change', { detail: 'dark' })); });
    await expect.poll(paper).toBe('#11161c');
    await page.evaluate(() => { document.documentElement.dataset.theme = 'light'; window.dispatchEvent(new CustomEvent('bm-theme-change', { detail: 'light' })); });
    await expect.poll(paper).toBe('#fbfaf6');
  });

  it('the printable report of the diagram run shows the study of the same version as three charts', async () => {
    await page.goto(`${BASE_URL}/report?runs=${traceRunId}`);
    await hydrated(page);
    const section = page.getByTestId('report-escapes');
    expect(await section.count()).toBe(1);
    expect(await section.getByTestId('report-escape-figure').count()).toBe(3);
    expect(await section.textContent()).toContain('paths per value');
    await section.screenshot({ path: screenshotPath('escape-study-views-report') });
  });

  it('compares two studies on one axis, and leaves the studies out when they are ticked with a diagram run', async () => {
    const start = await page.request.post(`${BASE_URL}/api/runs`, { data: { modelId, kind: 'escapes', settings: { noise: 0.5, values: [0.05, 0.1], paths: 100, seed: 6 } } });
    expect(start.status(), await start.text()).toBe(201);
    const other = ((await start.json()) as { run: { id: number } }).run.id;
    await expect.poll(async () => ((await (await page.request.get(`${BASE_URL}/api/runs/${other}`)).json()) as { run: { status: string } }).run.status,
      { timeout: 150_000, interval: 1000 }).toBe('done');
    await page.goto(`${BASE_URL}/compare?runs=${studyRunId},${other}`);
    await hydrated(page);
    const cmp = page.getByTestId('escape-compare');
    await expect.poll(() => cmp.locator('[data-testid^=escape-chart-compare-]').count(), { timeout: 20_000 }).toBe(3);
    // Two studies × two values for every order drawn in both.
    const marks = await cmp.getByTestId('escape-chart-compare-sequences').getByTestId('escape-mark').count();
    expect(marks % 4).toBe(0);
    expect(marks).toBeGreaterThan(0);
    await page.screenshot({ path: screenshotPath('escape-study-views-compare'), fullPage: true });
    await page.goto(`${BASE_URL}/compare?runs=${studyRunId},${traceRunId}`);
    expect(await page.getByTestId('compare-problems').textContent()).toContain('Escape studies and diagrams cannot share one comparison');
    expect(await page.getByTestId('escape-compare').count()).toBe(0);
  }, 200_000);

  it('a reviewer sees no Study escapes button on the diagram run or the model page', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const rp = await ctx.newPage();
    await signIn(rp, demoAccount('reviewer').email, demoAccount('reviewer').password);
    for (const path of [`/runs/${traceRunId}`, `/models/${modelId}`]) {
      await rp.goto(`${BASE_URL}${path}`);
      await hydrated(rp);
      expect(await rp.getByTestId('study-escapes-open').count(), path).toBe(0);
    }
    await ctx.close();
  }, 60_000);
});
