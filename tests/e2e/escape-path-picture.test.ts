/**
 * The path picture of an escape study in Chromium: as the demo modeler, open a finished demo escape
 * study of a 3-lake model (GET /api/runs?kind=escapes), find the "Path picture" section, focus a
 * saddle by keyboard and check its readout against GET /api/runs/:id/escapes/paths, switch the
 * projection axes, export the picture as SVG, and look at both themes.
 * Screenshots in screenshots/escape-path-picture-*.png.
 */
import { readFileSync } from 'node:fs';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PathPicture } from '../../src/lib/noise/path-picture';
import { formatValue } from '../../src/lib/plot/ticks';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, signIn } from './browser.ts';

let browser: Browser;
let context: BrowserContext;
let page: Page;
beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1280, height: 900 }, colorScheme: 'light', acceptDownloads: true });
  page = await context.newPage();
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
}, 60_000);
afterAll(async () => { await browser?.close(); });

describe('the path picture of an escape study', () => {
  it('draws states, saddles and paths of a demo study; a saddle readout matches the API; exports; both themes', async () => {
    const runs = (await (await page.request.get(`${BASE_URL}/api/runs?kind=escapes`)).json()) as { items: { id: number; status: string }[] };
    const done = runs.items.filter((r) => r.status === 'done');
    expect(done.length, 'the demo seed has finished escape studies').toBeGreaterThan(0);
    // The first finished study whose picture the API can draw (a 2- or 3-variable model).
    let runId = 0;
    let p = 0;
    let pic: PathPicture | null = null;
    for (const r of done) {
      const study = (await (await page.request.get(`${BASE_URL}/api/runs/${r.id}/escapes`)).json()) as { points: { p: number; status: string }[] };
      const first = study.points.find((q) => q.status === 'done');
      if (!first) continue;
      const api = await page.request.get(`${BASE_URL}/api/runs/${r.id}/escapes/paths?p=${first.p}&paths=3`);
      if (api.status() !== 200) continue;
      runId = r.id; p = first.p; pic = ((await api.json()) as { picture: PathPicture }).picture;
      break;
    }
    expect(pic, 'a demo escape study of a 3-lake model').not.toBeNull();
    if (!pic) return;
    expect(pic.names.length).toBe(3);
    expect(pic.saddles.length).toBeGreaterThan(0);

    await page.goto(`${BASE_URL}/runs/${runId}`);
    await hydrated(page);
    const section = page.getByTestId('escape-path-picture');
    await section.scrollIntoViewIfNeeded();
    const marks = section.getByTestId('escape-mark');
    await expect.poll(() => marks.count(), { timeout: 60_000 }).toBe(pic.states.length + pic.saddles.length + pic.minimumActionPaths.length + pic.samples.length);
    expect(await section.locator('[data-layer="minimum-action"]').count()).toBe(pic.minimumActionPaths.length);
    expect(await section.locator('[data-layer="sample"]').count()).toBe(pic.samples.length);

    // Keyboard: Tab from the value picker onto the marks until the first saddle's mark has focus.
    const saddle = pic.saddles[0];
    const label = `Saddle ${saddle.label}`;
    await section.getByTestId('path-value').focus();
    let found = false;
    for (let k = 0; k < 60 && !found; k++) {
      await page.keyboard.press('Tab');
      found = await page.evaluate((l) => (document.activeElement?.getAttribute('aria-label') ?? '').startsWith(l), label);
    }
    expect(found, 'a saddle mark is reachable by Tab').toBe(true);
    const readout = (await section.getByTestId('escape-readout').innerText()).replace(/\s+/g, ' ');
    expect(readout).toContain(`x = (${saddle.x.map((v) => formatValue(v, 8)).join(', ')})`);
    expect(readout).toContain(saddle.eigenvalues.map((v) => formatValue(v, 6)).join(', '));
    await section.screenshot({ path: screenshotPath('escape-path-picture-saddle') });

    // Projection axes: (x1, x3).
    expect(await section.locator('[data-testid=escape-chart-paths] svg text[transform^="rotate(-90"]').textContent()).toBe(pic.names[1]);
    await section.getByTestId('path-axis-1').selectOption('2');
    // The vertical axis title is the one rotated text of the figure.
    const yTitle = () => section.locator('[data-testid=escape-chart-paths] svg text[transform^="rotate(-90"]').textContent();
    await expect.poll(yTitle).toBe(pic.names[2]);
    const texts = await section.locator('[data-testid=escape-chart-paths] svg text').evaluateAll((els) => els.map((e) => e.textContent ?? '').join(' '));
    expect(texts).toContain(`${pic.names[1]} not shown`);

    // Export as SVG: well-formed, with the provenance footer.
    await section.getByTestId(`export-toggle-paths-${formatValue(p)}`).click();
    const [dl] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), section.getByTestId(`export-svg-paths-${formatValue(p)}`).click()]);
    const svg = readFileSync((await dl.path())!, 'utf8');
    expect(svg).toContain('<svg');
    expect(svg).toContain('indicative');
    expect(svg).toContain('data-layer="minimum-action"');

    await section.getByTestId(`export-toggle-paths-${formatValue(p)}`).click();
    expect(await section.getByTestId(`export-svg-paths-${formatValue(p)}`).count()).toBe(0);
    await section.getByTestId('path-axis-1').selectOption('1');
    // A saddle's readout in the pictures (focused: in a projection another mark may lie on top of it).
    await section.locator(`[data-testid=escape-mark][aria-label^="${label}"]`).focus();
    for (const theme of ['light', 'dark'] as const) {
      await page.evaluate((t) => { document.documentElement.dataset.theme = t; window.dispatchEvent(new CustomEvent('bm-theme-change', { detail: t })); }, theme);
      await page.waitForTimeout(300);
      await section.screenshot({ path: screenshotPath(`escape-path-picture-${theme}`) });
    }
    await page.evaluate(() => { document.documentElement.dataset.theme = 'light'; });
  }, 240_000);
});
