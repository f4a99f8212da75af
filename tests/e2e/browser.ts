/** Shared Chromium launcher for browser tests: Debian's /usr/bin/chromium through playwright-core. */
import { chromium, type Browser, type Page } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

export const BASE_URL = (process.env.TEST_BASE_URL ?? 'http://127.0.0.1:4322').replace(/\/$/, '');
export const SCREENSHOT_DIR = join(process.cwd(), 'screenshots');

export function launchBrowser(): Promise<Browser> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export function screenshotPath(name: string): string {
  return join(SCREENSHOT_DIR, `${name}.png`);
}

/** The invented demo accounts that the seed creates (seeds/demo-accounts.json). */
export interface DemoAccount { email: string; password: string; role: string; displayName: string }
const demoAccounts = (JSON.parse(readFileSync('seeds/demo-accounts.json', 'utf8')) as { users: DemoAccount[] }).users;
export function demoAccount(role: 'owner' | 'modeler' | 'reviewer' | string): DemoAccount {
  const found = demoAccounts.find((u) => u.role === role);
  if (!found) throw new Error(`no demo account with role ${role}`);
  return found;
}

/** Waits until every island on the page has hydrated (Astro drops the ssr attribute then). */
export async function hydrated(page: Page): Promise<void> {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0, undefined, { timeout: 30_000 });
}

/** Signs in through the real form and waits until the app has sent the browser on. */
export async function signIn(page: Page, email: string, password: string, next?: string): Promise<void> {
  await page.goto(`${BASE_URL}/sign-in${next ? `?next=${encodeURIComponent(next)}` : ''}`);
  await hydrated(page);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([
    page.waitForURL((u) => u.pathname !== '/sign-in', { timeout: 20_000 }),
    page.getByRole('button', { name: 'Sign in' }).click(),
  ]);
}

/** Full-page screenshots in the light and the dark theme (the layout's toggle sets data-theme and fires bm-theme-change). */
export async function shootBothThemes(page: Page, name: string): Promise<void> {
  for (const theme of ['light', 'dark'] as const) {
    await page.evaluate((t) => {
      document.documentElement.dataset.theme = t;
      window.dispatchEvent(new CustomEvent('bm-theme-change', { detail: t }));
    }, theme);
    await page.waitForTimeout(250);
    await page.screenshot({ path: screenshotPath(`${name}-${theme}`), fullPage: true });
  }
  await page.evaluate(() => { document.documentElement.dataset.theme = 'light'; });
}

/**
 * Special points drawn in a diagram view: single glyphs ([data-special-id]) plus the members of every
 * folded group of glyphs drawn over each other ([data-group-ids], DiagramView / glyph-clusters.ts).
 */
export async function specialMarkCount(page: Page, scope = '[data-testid=diagram-view]'): Promise<number> {
  const single = await page.locator(`${scope} [data-special-id]`).count();
  const grouped = await page.locator(`${scope} [data-testid=glyph-group]`).evaluateAll((gs) => gs.reduce((n, g) => n + (g.getAttribute('data-group-ids') ?? '').split(' ').filter(Boolean).length, 0));
  return single + grouped;
}
