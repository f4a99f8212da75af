/**
 * Page-level layout in Chromium, on the seeded demo workspace, at 1280 px and 800 px and in both
 * themes: every page (editor, run and compare included) has one centred page container shared by
 * header, main and footer, and nothing scrolls sideways; the workspace selector shows the whole
 * workspace name; member names never wrap; the file pickers and the "Mark resolved" control wear the
 * app's quiet-button style (and the control works). Screenshots of every page go to screenshots/.
 */
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, signIn } from './browser.ts';

let browser: Browser;
beforeAll(async () => { browser = await launchBrowser(); }, 60_000);
afterAll(async () => { await browser?.close(); });

async function signedIn(role: string, width: number): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width, height: 900 }, colorScheme: 'light' });
  const page = await context.newPage();
  page.on('pageerror', (e) => console.error(`[${role} page error]`, e.message));
  await signIn(page, demoAccount(role).email, demoAccount(role).password);
  return { context, page };
}

const setTheme = (page: Page, theme: 'light' | 'dark') => page.evaluate((t) => {
  document.documentElement.dataset.theme = t;
  window.dispatchEvent(new CustomEvent('bm-theme-change', { detail: t }));
}, theme);

/** Left edge and width of the header's, main's and footer's containers, and the page's scroll width. */
const frame = (page: Page) => page.evaluate(() => {
  const box = (id: string) => {
    const el = document.querySelector(`[data-testid=${id}]`)!;
    const r = el.getBoundingClientRect();
    const cs = getComputedStyle(el);
    return { left: Math.round(r.left), right: Math.round(document.documentElement.clientWidth - r.right), width: Math.round(r.width), padLeft: cs.paddingLeft };
  };
  return { header: box('page-header'), main: box('page-main'), footer: box('page-footer'), scrollWidth: document.documentElement.scrollWidth, clientWidth: document.documentElement.clientWidth };
});

async function paths(page: Page): Promise<Record<string, string>> {
  const runs = ((await (await page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace`)).json()) as { items: { id: number; modelId: number }[] }).items;
  expect(runs.length).toBeGreaterThanOrEqual(2);
  return {
    home: '/', models: '/models', model: `/models/${runs[0].modelId}`, edit: `/models/${runs[0].modelId}/edit`, 'new-model': '/models/new',
    runs: '/runs', run: `/runs/${runs[0].id}`, compare: `/compare?runs=${runs[0].id}&runs=${runs[1].id}`, reviews: '/reviews',
    members: '/members', report: `/report?runs=${runs[0].id}`, account: '/account/password',
  };
}

describe('one centred page container on every page', () => {
  for (const width of [1280, 800]) {
    it(`at ${width} px: header, main and footer share one centred container on every page, no sideways scrolling, both themes shot`, async () => {
      const { context, page } = await signedIn('owner', width);
      for (const [name, path] of Object.entries(await paths(page))) {
        await page.goto(BASE_URL + path);
        await hydrated(page);
        const f = await frame(page);
        expect(f.main, `${name}: main and header line up`).toEqual(f.header);
        expect(f.footer, `${name}: footer and header line up`).toEqual(f.header);
        expect(Math.abs(f.main.left - f.main.right), `${name}: centred`).toBeLessThanOrEqual(1);
        expect(f.main.width, `${name}: at most 80rem`).toBeLessThanOrEqual(1280);
        expect(f.scrollWidth, `${name}: no sideways scrolling`).toBeLessThanOrEqual(f.clientWidth);
        for (const theme of ['light', 'dark'] as const) {
          await setTheme(page, theme);
          await page.waitForTimeout(200);
          await page.screenshot({ path: screenshotPath(`layout-${name}-${width}-${theme}`), fullPage: true });
        }
        await setTheme(page, 'light');
      }
      await context.close();
    }, 240_000);
  }

  it('at 1600 px the run, compare and editor pages are as wide as the list pages, centred with room either side', async () => {
    const { context, page } = await signedIn('owner', 1600);
    const all = await paths(page);
    const widths: Record<string, { left: number; width: number }> = {};
    for (const name of ['models', 'members', 'run', 'compare', 'edit']) {
      await page.goto(BASE_URL + all[name]);
      const f = await frame(page);
      widths[name] = { left: f.main.left, width: f.main.width };
    }
    for (const name of ['run', 'compare', 'edit', 'members']) expect(widths[name], name).toEqual(widths.models);
    expect(widths.models.width).toBe(1280);
    expect(widths.models.left).toBe(160);
    await context.close();
  }, 90_000);
});

describe('the model page', () => {
  it('the "Start a run" card is as wide as the cards above and below it', async () => {
    const { context, page } = await signedIn('owner', 1280);
    const all = await paths(page);
    await page.goto(BASE_URL + all.model);
    await hydrated(page);
    const widths = await page.evaluate(() => {
      const form = document.querySelector('form[aria-label="Start a run"]')!;
      const card = (el: Element | null) => Math.round(el!.getBoundingClientRect().width);
      const cards = [...document.querySelectorAll('[data-testid=page-main] section, [data-testid=page-main] .bm-card')].map((el) => card(el));
      return { form: card(form), widest: Math.max(...cards) };
    });
    expect(widths.form).toBe(widths.widest);
    await context.close();
  }, 60_000);
});

describe('the header and the members table', () => {
  for (const width of [1280, 800]) {
    it(`at ${width} px the workspace selector shows the whole workspace name`, async () => {
      const { context, page } = await signedIn('owner', width);
      const fit = await page.getByTestId('workspace-switcher').evaluate((el) => {
        const select = el as HTMLSelectElement;
        const cs = getComputedStyle(select);
        const ctx = document.createElement('canvas').getContext('2d')!;
        ctx.font = `${cs.fontWeight} ${cs.fontSize} ${cs.fontFamily}`;
        const text = select.options[select.selectedIndex].text;
        // Room for the text: the box less its padding and the drop-down arrow (about 1.25em wide).
        const room = select.clientWidth - parseFloat(cs.paddingLeft) - parseFloat(cs.paddingRight) - 1.25 * parseFloat(cs.fontSize);
        return { text, needed: ctx.measureText(text).width, room };
      });
      expect(fit.text).toBe('Fennmoor Lakes Working Group (demo)');
      expect(fit.room).toBeGreaterThanOrEqual(fit.needed);
      await context.close();
    }, 60_000);

    it(`at ${width} px every member's name sits on one line and the table fits its card`, async () => {
      const { context, page } = await signedIn('owner', width);
      await page.goto(`${BASE_URL}/members`);
      const names = await page.getByTestId('member-name').evaluateAll((els) => els.map((el) => {
        const range = document.createRange();
        range.selectNodeContents(el);
        const tops = new Set([...range.getClientRects()].map((r) => Math.round(r.top)));
        return { text: el.textContent, lines: tops.size };
      }));
      expect(names.length).toBe(3);
      for (const n of names) expect(n.lines, n.text ?? '').toBe(1);
      const card = await page.getByTestId('members-table').evaluate((t) => ({ table: t.getBoundingClientRect().width, card: t.parentElement!.clientWidth }));
      expect(card.table).toBeLessThanOrEqual(card.card);
      await page.screenshot({ path: screenshotPath(`layout-members-table-${width}`), fullPage: true });
      await context.close();
    }, 60_000);
  }
});

/** The quiet-button look as computed on a reference element (the header's Sign out button). */
const looks = (page: Page, selector: string, pseudo?: string) => page.evaluate(([sel, ps]) => {
  const cs = getComputedStyle(document.querySelector(sel!)!, ps ?? null);
  return { border: `${cs.borderTopWidth} ${cs.borderTopStyle} ${cs.borderTopColor}`, radius: cs.borderTopLeftRadius, color: cs.color, cursor: cs.cursor, background: cs.backgroundColor };
}, [selector, pseudo] as const);

describe('styled controls', () => {
  it('the file pickers (model import, adjacency CSV) use the quiet-button border, radius and theme colours', async () => {
    const { context, page } = await signedIn('modeler', 1280);
    const runs = ((await (await page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace`)).json()) as { items: { modelId: number }[] }).items;
    for (const [path, id] of [['/models', '#import-file'], [`/models/${runs[0].modelId}/edit`, '#ed-csv']] as const) {
      await page.goto(BASE_URL + path);
      await hydrated(page);
      const seen: Record<string, string> = {};
      for (const theme of ['light', 'dark'] as const) {
        await setTheme(page, theme);
        const button = await looks(page, id, '::file-selector-button');
        const ref = await looks(page, 'header form[action="/sign-out"] button');
        expect(button.border, `${path} ${theme}`).toBe(ref.border);
        expect(button.radius).toBe(ref.radius);
        expect(button.color).toBe(ref.color);
        expect(button.cursor).toBe('pointer');
        // The button's face is the theme's surface colour, not the browser's grey.
        const surface = await page.evaluate(() => { const d = document.createElement('div'); d.style.background = 'var(--bm-surface)'; document.body.append(d); const c = getComputedStyle(d).backgroundColor; d.remove(); return c; });
        expect(button.background).toBe(surface);
        seen[theme] = button.background;
        await page.locator(id).screenshot({ path: screenshotPath(`layout-file-picker-${path === '/models' ? 'import' : 'csv'}-${theme}`) });
      }
      expect(seen.light).not.toBe(seen.dark);
    }
    await context.close();
  }, 90_000);

  it('"Mark resolved" is a quiet button in both themes; it resolves the comment and its state label follows, Reopen undoes it', async () => {
    const reviewer = await signedIn('reviewer', 1280);
    const runs = ((await (await reviewer.page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace`)).json()) as { items: { id: number }[] }).items;
    const body = `Layout e2e: please check ${Date.now().toString(36)}`;
    const created = await reviewer.page.request.post(`${BASE_URL}/api/runs/${runs[0].id}/comments`, { data: { body }, headers: { origin: BASE_URL } });
    expect(created.status()).toBe(201);
    const commentId = ((await created.json()) as { comment: { id: number } }).comment.id;
    await reviewer.context.close();

    const { context, page } = await signedIn('modeler', 1280);
    await page.goto(`${BASE_URL}/reviews`);
    await hydrated(page);
    const row = page.getByTestId('review-comments').locator('tr', { hasText: body });
    const button = row.getByTestId('resolve-comment');
    expect(await button.textContent()).toBe('Mark resolved');
    expect(await row.getByTestId('comment-state').textContent()).toBe('open');
    for (const theme of ['light', 'dark'] as const) {
      await setTheme(page, theme);
      await button.evaluate((el) => el.setAttribute('data-probe', '1'));
      const mine = await looks(page, '[data-probe="1"]');
      const ref = await looks(page, 'header form[action="/sign-out"] button');
      expect(mine.border, theme).toBe(ref.border);
      expect(mine.radius).toBe(ref.radius);
      expect(mine.color).toBe(ref.color);
      expect(mine.cursor).toBe('pointer');
      await row.screenshot({ path: screenshotPath(`layout-mark-resolved-${theme}`) });
    }
    await setTheme(page, 'light');

    await button.click();
    await expect.poll(() => button.textContent()).toBe('Reopen');
    expect(await row.getByTestId('comment-state').textContent()).toBe('resolved');
    const after = ((await (await page.request.get(`${BASE_URL}/api/runs/${runs[0].id}/comments`)).json()) as { comments: { id: number; resolved: boolean }[] }).comments;
    expect(after.find((c) => c.id === commentId)?.resolved).toBe(true);
    await button.click();
    await expect.poll(() => button.textContent()).toBe('Mark resolved');
    expect(await row.getByTestId('comment-state').textContent()).toBe('open');
    await context.close();
  }, 90_000);
});
