/** Shared Chromium launcher for browser tests: Debian's /usr/bin/chromium through playwright-core. */
import { chromium, type Browser } from 'playwright-core';
import { mkdirSync } from 'node:fs';
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

/** Signs in through the real form and waits until the app has sent the browser on. */
export async function signIn(page: import('playwright-core').Page, email: string, password: string, next = '/'): Promise<void> {
  await page.goto(`${BASE_URL}/sign-in?next=${encodeURIComponent(next)}`);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.pathname !== '/sign-in');
}
