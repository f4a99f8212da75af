/**
 * An escape study run (kind 'escapes') on the run page: as the demo modeler, start a small study of the
 * first demo model through the API, wait for the worker, and open /runs/<id>: a table with one row
 * per parameter value (most frequent escape order with its interval, the prediction, the mean first
 * escape time, the lowest barrier) and the data links, no diagram. Screenshots in both themes.
 */
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BASE_URL, demoAccount, hydrated, launchBrowser, shootBothThemes, signIn } from './browser.ts';

let browser: Browser;
let context: BrowserContext;
let page: Page;
beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1280, height: 900 }, colorScheme: 'light' });
  page = await context.newPage();
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
}, 60_000);
afterAll(async () => { await browser?.close(); });

describe('an escape study on the run page', () => {
  it('shows one row per parameter value with the data links, matching the API', async () => {
    const models = (await (await page.request.get(`${BASE_URL}/api/models`)).json()) as { items: { id: number; name: string }[] };
    const model = models.items.find((m) => m.name.includes('downstream flow only'))!;
    expect(model, 'the first demo model').toBeTruthy();
    const start = await page.request.post(`${BASE_URL}/api/runs`, {
      data: { modelId: model.id, kind: 'escapes', settings: { noise: 0.45, values: [0.05, 0.1], paths: 200, seed: 3 } },
    });
    expect(start.status(), await start.text()).toBe(201);
    const runId = ((await start.json()) as { run: { id: number } }).run.id;
    await expect.poll(async () => ((await (await page.request.get(`${BASE_URL}/api/runs/${runId}`)).json()) as { run: { status: string } }).run.status,
      { timeout: 150_000, interval: 500 }).toBe('done');
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${runId}/escapes`)).json()) as { points: { p: number; paths: number; sequences: { order: string[]; count: number }[]; barriers: { from: string; barrier: number | null }[]; capped: number }[] };
    await page.goto(`${BASE_URL}/runs/${runId}`);
    await hydrated(page);
    const table = page.getByTestId('escape-table');
    expect(await table.locator('tbody tr').count()).toBe(api.points.length);
    for (const [k, pt] of api.points.entries()) {
      const row = table.locator('tbody tr').nth(k);
      const cells = await row.locator('td').allTextContents();
      expect(Number(cells[1])).toBe(pt.paths);
      const top = [...pt.sequences].sort((a, b) => b.count - a.count)[0];
      expect(cells[2]).toBe(top.order.join(' → '));
      // The lowest exit barrier is out of the start state (all-base), as the barrier chart draws it,
      // not the lowest barrier of any state's edge.
      const out = pt.barriers.filter((b) => b.from === 'all-base' && b.barrier !== null).map((b) => b.barrier!);
      expect(out.length).toBeGreaterThan(0);
      expect(Number(cells[6])).toBeCloseTo(Math.min(...out), 4);
      expect(cells[7]).toBe(pt.capped > 0 ? `${pt.capped} of ${pt.paths}` : '0');
    }
    expect(await page.getByTestId('run-diagram').count()).toBe(0);
    expect(await page.getByRole('link', { name: 'CSV' }).getAttribute('href')).toBe(`/api/runs/${runId}/escapes.csv`);
    await shootBothThemes(page, 'run-escape-study');
  }, 200_000);
});
