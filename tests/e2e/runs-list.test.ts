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
