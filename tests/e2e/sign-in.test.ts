import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, screenshotPath } from './browser.ts';

const demo = JSON.parse(readFileSync('seeds/demo-accounts.json', 'utf8')) as {
  workspace: { name: string };
  users: { email: string; password: string; role: string; displayName: string }[];
};

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
});

describe('signing in through the real form in Chromium', () => {
  for (const user of demo.users) {
    it(`the demo ${user.role} signs in and sees the ${user.role} navigation`, async () => {
      const context = await browser.newContext({ viewport: { width: 1280, height: 800 }, colorScheme: user.role === 'reviewer' ? 'dark' : 'light' });
      const page = await context.newPage();
      await page.goto(`${BASE_URL}/members`);
      expect(new URL(page.url()).pathname).toBe('/sign-in');
      await page.getByLabel('E-mail address').fill(user.email);
      await page.getByLabel('Password').fill(user.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForURL(`${BASE_URL}/members`);

      const nav = page.getByRole('navigation', { name: 'Main' });
      for (const label of ['Models', 'Runs', 'Reviews', 'Members']) {
        await expect(nav.getByRole('link', { name: label, exact: true }).count()).resolves.toBe(1);
      }
      expect(await page.getByTestId('role-badge').textContent()).toBe(user.role);
      expect(await page.locator('#bm-workspace option:checked').textContent()).toBe(demo.workspace.name);
      // Owners manage people: the mail box link and the invite form exist only for them.
      const devMailLinks = await nav.getByRole('link', { name: 'Mail box (dev)' }).count();
      const inviteForms = await page.getByTestId('invite-form').count();
      expect(devMailLinks).toBe(user.role === 'owner' ? 1 : 0);
      expect(inviteForms).toBe(user.role === 'owner' ? 1 : 0);
      expect(await page.getByTestId('results-notice').textContent()).toContain('Model results are indicative');
      await page.screenshot({ path: screenshotPath(`members-${user.role}`), fullPage: true });

      await nav.getByRole('link', { name: 'Members' }).focus();
      await page.goto(`${BASE_URL}/`);
      expect(await page.getByTestId('role-abilities').textContent()).toBeTruthy();
      await page.screenshot({ path: screenshotPath(`dashboard-${user.role}`), fullPage: true });

      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL(`${BASE_URL}/sign-in`);
      await context.close();
    });
  }

  it('a wrong password shows the message on the form, and the theme toggle is remembered', async () => {
    const context = await browser.newContext({ viewport: { width: 420, height: 800 }, colorScheme: 'light' });
    const page = await context.newPage();
    await page.goto(`${BASE_URL}/sign-in`);
    await page.getByLabel('E-mail address').fill(demo.users[1].email);
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForSelector('[data-testid="form-error"]');
    expect(await page.getByTestId('form-error').textContent()).toBe('Wrong e-mail address or password.');
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('light');
    await page.getByRole('button', { name: /theme/ }).click();
    await page.reload();
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
    // Keyboard: Tab from the top reaches the skip link first, with a visible focus outline.
    await page.keyboard.press('Tab');
    const focused = await page.evaluate(() => ({ text: document.activeElement?.textContent, outline: getComputedStyle(document.activeElement!).outlineStyle }));
    expect(focused.text).toBe('Skip to content');
    expect(focused.outline).toBe('solid');
    await page.screenshot({ path: screenshotPath('sign-in-error-dark-narrow'), fullPage: true });
    await context.close();
  });
});
