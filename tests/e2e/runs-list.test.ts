import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, screenshotPath, signIn } from './browser.ts';

const demo = JSON.parse(readFileSync('seeds/demo-accounts.json', 'utf8')) as {
  users: { email: string; password: string; role: string }[];
};
const reviewer = demo.users.find((u) => u.role === 'reviewer')!;

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
});

describe('the runs page', () => {
  it('keeps each run id and version on one line at 800 px', async () => {
    const context = await browser.newContext({ viewport: { width: 800, height: 900 }, colorScheme: 'light' });
    const page = await context.newPage();
    await signIn(page, reviewer.email, reviewer.password, '/runs');
    await page.goto(`${BASE_URL}/runs`);
    // First two cells of every row (run id, version and hash): a box no taller than 1.7 line heights of its font.
    const cells = await page.locator('[data-testid="runs-table"] tbody tr').evaluateAll((rows) => rows.flatMap((r) => [...r.querySelectorAll('td')].filter((_, k) => k === 0 || k === 2).map((td) => {
      const range = document.createRange();
      range.selectNodeContents(td);
      // Lines: the text's boxes grouped by their top, tops within 6 px being one line.
      const tops = [...range.getClientRects()].map((q) => q.top).sort((a, b) => a - b);
      const lines = tops.filter((t, k) => k === 0 || t - tops[k - 1] > 6).length;
      return { text: td.textContent?.trim(), lines };
    })));
    expect(cells.length).toBeGreaterThan(0);
    for (const c of cells) expect(c, c.text).toMatchObject({ lines: 1 });
    await page.screenshot({ path: screenshotPath('runs-index-800'), fullPage: true });
    await context.close();
  }, 60_000);

  for (const scheme of ['light', 'dark'] as const) {
    it(`lists the demo variants' finished runs with links to their run views (${scheme} theme)`, async () => {
      const context = await browser.newContext({ viewport: { width: 1280, height: 800 }, colorScheme: scheme });
      const page = await context.newPage();
      await signIn(page, reviewer.email, reviewer.password, '/runs');
      await page.goto(`${BASE_URL}/runs`);
      const table = page.getByTestId('runs-table');
      for (const variant of ['downstream flow only', 'flow plus groundwater exchange', 'restored upper lake']) {
        await expect(table.getByRole('link', { name: new RegExp(variant) }).count()).resolves.toBeGreaterThan(0);
      }
      expect(await page.getByTestId('placeholder').count()).toBe(0);
      await page.screenshot({ path: screenshotPath(`runs-index-${scheme}`), fullPage: true });

      // The status filter narrows the list: every row shown under "done" says done.
      await page.getByRole('navigation', { name: 'Filter runs by status' }).getByRole('link', { name: 'done', exact: true }).click();
      await page.waitForURL(/status=done/);
      const statuses = await page.locator('[data-testid="runs-table"] td[data-status]').evaluateAll((cells) => cells.map((c) => c.getAttribute('data-status')));
      expect(statuses.length).toBeGreaterThan(0);
      expect(statuses.every((s) => s === 'done')).toBe(true);

      await page.locator('[data-testid="runs-table"] a[href^="/runs/"]').first().click();
      await page.waitForURL(/\/runs\/\d+$/);
      await context.close();
    });
  }
});
