import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { BASE_URL, launchBrowser, screenshotPath } from './browser.ts';

const demo = JSON.parse(readFileSync('seeds/demo-accounts.json', 'utf8')) as {
  workspace: { name: string };
  users: { email: string; password: string; role: string }[];
};
const owner = demo.users.find((u) => u.role === 'owner')!;

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
});

describe('inviting through the browser', () => {
  it('the owner invites by the form, finds the link in the dev mail box, and the invitee joins as reviewer', async () => {
    const email = `browser-invitee-${Date.now().toString(36)}@test.brinkmap.invalid`;
    const ownerCtx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ownerCtx.newPage();
    await page.goto(`${BASE_URL}/sign-in?next=/members`);
    await page.getByLabel('E-mail address').fill(owner.email);
    await page.getByLabel('Password').fill(owner.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(`${BASE_URL}/members`);

    const invite = page.getByTestId('invite-form');
    await invite.getByLabel('E-mail address').fill(email);
    await invite.getByLabel('Role').selectOption('reviewer');
    await invite.getByRole('button', { name: 'Send invitation' }).click();
    await page.waitForURL(`${BASE_URL}/members?done=invite`);
    expect(await page.getByText(email).count()).toBeGreaterThan(0);

    await page.getByRole('link', { name: 'Mail box (dev)' }).click();
    await page.waitForURL(`${BASE_URL}/dev/mail`);
    const mail = page.getByTestId('dev-mail').filter({ hasText: email }).first();
    const link = await mail.getByRole('link').first().getAttribute('href');
    expect(link).toMatch(new RegExp(`^${BASE_URL}/invitations/[A-Za-z0-9_-]+$`));
    await page.screenshot({ path: screenshotPath('dev-mail-owner'), fullPage: true });

    const inviteeCtx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const invitee = await inviteeCtx.newPage();
    await invitee.goto(link!);
    expect(await invitee.getByRole('heading', { level: 1 }).textContent()).toContain(demo.workspace.name);
    await invitee.getByRole('link', { name: 'Create an account to join' }).click();
    expect(await invitee.getByLabel('E-mail address').inputValue()).toBe(email);
    await invitee.getByLabel('Your name').fill('Browser Invitee');
    await invitee.getByLabel('Password').fill('browser-invitee-pw');
    await invitee.getByRole('button', { name: 'Create account' }).click();
    await invitee.waitForURL(link!);
    await invitee.getByRole('button', { name: 'Join as reviewer' }).click();
    await invitee.waitForURL(`${BASE_URL}/`);
    expect(await invitee.getByTestId('role-badge').textContent()).toBe('reviewer');
    await invitee.screenshot({ path: screenshotPath('invitee-joined'), fullPage: true });
    await inviteeCtx.close();
    await ownerCtx.close();
  });
});
