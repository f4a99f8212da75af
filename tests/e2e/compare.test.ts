/**
 * The compare page (/compare?runs=…) in Chromium on the seeded demo variants (invented Fenn lakes),
 * as the demo modeler: the diagrams arrive by a separate JSON fetch (a loading state first, a message
 * and "Try again" when the fetch fails), the vertical axis opens as on the run page, column headers
 * are short with the full name on hover, the special-point table holds the rows alignSpecialPoints
 * matches, panels are large and locked to one parameter axis, and the overlay colours are not the
 * stable/unstable colours, in both themes. Screenshots go to the git-ignored screenshots/ folder.
 */
import type { Browser, BrowserContext, Page, Route } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/lib/atlas/types';
import { alignSpecialPoints } from '../../src/lib/plot/compare';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, shootBothThemes, signIn } from './browser.ts';

interface ApiItem { runId: number; label: string; shortLabel: string; diagram: Diagram }

let browser: Browser;
let context: BrowserContext;
let page: Page;
let runIds: number[] = [];
let items: ApiItem[] = [];
const compareUrl = () => `${BASE_URL}/compare?runs=${runIds.join(',')}`;

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1360, height: 1000 }, colorScheme: 'light' });
  page = await context.newPage();
  page.on('pageerror', (e) => console.error('[compare page error]', e.message));
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
  const runs = (await (await page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace`)).json()) as { items: { id: number; modelName: string }[] };
  // One finished run per seeded variant ("Fenn lakes: ...", invented demo data), in seed order.
  const seen = new Set<string>();
  for (const r of [...runs.items].sort((a, b) => a.id - b.id)) {
    if (r.modelName.startsWith('Fenn lakes') && !seen.has(r.modelName)) { seen.add(r.modelName); runIds.push(r.id); }
  }
  expect(runIds.length, 'three finished demo variants').toBeGreaterThanOrEqual(3);
  runIds = runIds.slice(0, 3);
  const res = await page.request.get(`${BASE_URL}/api/compare?runs=${runIds.join(',')}`);
  expect(res.status()).toBe(200);
  items = ((await res.json()) as { items: ApiItem[] }).items;
}, 90_000);
afterAll(async () => { await context?.close(); await browser?.close(); });

async function openCompare() {
  await page.goto(compareUrl());
  await hydrated(page);
  await page.waitForSelector('[data-testid=compare-view] .dg-compare-panel', { timeout: 30_000 });
}

describe('the compare page of three demo variants, as the demo modeler', () => {
  it('ships no diagram in the HTML and shows a loading state until the JSON arrives', async () => {
    const html = await (await page.request.get(compareUrl())).text();
    expect(html).not.toContain('&quot;branches&quot;');
    expect(html.length).toBeLessThan(100_000);

    let release!: () => void;
    const held = new Promise<void>((r) => { release = r; });
    const hold = async (route: Route) => { await held; await route.continue(); };
    await page.route('**/api/compare?*', hold);
    await page.goto(compareUrl());
    await hydrated(page);
    const status = page.getByTestId('compare-status');
    await expect.poll(() => status.getAttribute('data-state')).toBe('loading');
    expect(await status.textContent()).toBe(`Loading the diagrams of run ${runIds[0]}, run ${runIds[1]} and run ${runIds[2]}…`);
    await shootBothThemes(page, 'compare-loading');
    release();
    await page.waitForSelector('[data-testid=compare-view] .dg-compare-panel', { timeout: 30_000 });
    expect(await page.getByTestId('compare-status').count()).toBe(0);
    await page.unroute('**/api/compare?*', hold);
  }, 90_000);

  it('says what failed when the fetch fails, and "Try again" loads the comparison', async () => {
    const fail = (route: Route) => route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'unavailable', message: 'the database is restarting' } }) });
    await page.route('**/api/compare?*', fail);
    await page.goto(compareUrl());
    await hydrated(page);
    const alert = page.getByTestId('compare-status').getByRole('alert');
    await alert.waitFor({ timeout: 15_000 });
    expect(await alert.textContent()).toBe('The diagrams could not be loaded: the database is restarting');
    await shootBothThemes(page, 'compare-failed');
    await page.unroute('**/api/compare?*', fail);
    await page.getByRole('button', { name: 'Try again' }).click();
    await page.waitForSelector('[data-testid=compare-view] .dg-compare-panel', { timeout: 30_000 });
  }, 90_000);

  it('opens on the vertical axis the run page opens on', async () => {
    await page.goto(`${BASE_URL}/runs/${runIds[0]}`);
    await hydrated(page);
    await page.waitForSelector('[data-testid=projection-select]', { timeout: 30_000 });
    const onRunPage = await page.getByTestId('projection-select').inputValue();
    await openCompare();
    expect(await page.getByTestId('compare-projection').inputValue()).toBe(onRunPage);
    expect(onRunPage).toBe('mean'); // three lakes: the mean state
  }, 90_000);

  it('heads the table columns with short names and keeps each full name on hover', async () => {
    const headers = page.getByTestId('compare-special-table').locator('thead th abbr');
    const texts = await headers.allTextContents();
    expect(texts.slice(0, 3)).toEqual(items.map((i) => i.shortLabel));
    expect(await headers.evaluateAll((els) => els.slice(0, 3).map((e) => e.getAttribute('title')))).toEqual(items.map((i) => i.label));
    // Short enough that no header wraps.
    for (const h of await page.getByTestId('compare-special-table').locator('thead th').all()) {
      const box = (await h.boundingBox())!;
      expect(box.height).toBeLessThan(40);
    }
  });

  it('lists the special points as matched by branch, type and nearness (alignSpecialPoints on the fetched diagrams)', async () => {
    const expected = alignSpecialPoints(items.map((i) => i.diagram));
    const shown = await page.getByTestId('compare-special-table').locator('tbody tr').evaluateAll((trs) => trs.map((tr) => [tr.getAttribute('data-ids'), tr.querySelector('th')!.textContent]));
    expect(shown).toEqual(expected.map((r) => [r.ids!.map((x) => x ?? '').join(','), r.label]));
    // Every matched row joins points of one type.
    for (const r of expected) {
      const types = r.ids!.map((id, k) => (id ? items[k].diagram.bifurcations.find((s) => s.id === id)!.type : null)).filter(Boolean);
      expect(new Set(types).size).toBe(1);
    }
    const hover = await page.getByTestId('compare-special-table').locator('tbody th').first().getAttribute('title');
    expect(hover).toContain(items[0].shortLabel);
  });

  it('draws large stacked panels locked to one parameter axis', async () => {
    const panels = page.locator('.dg-compare-panel');
    expect(await panels.count()).toBe(3);
    const boxes = await Promise.all([0, 1, 2].map(async (k) => (await panels.nth(k).boundingBox())!));
    for (const b of boxes) { expect(b.width).toBeGreaterThan(900); expect(b.height).toBeGreaterThanOrEqual(339); }
    expect(Math.abs(boxes[0].x - boxes[1].x)).toBeLessThan(1);
    const ticks = () => panels.nth(2).locator('.dg-axis').first().locator('text').allTextContents();
    const before = await ticks();
    await panels.nth(0).scrollIntoViewIfNeeded();
    const b0 = (await panels.nth(0).boundingBox())!;
    await page.mouse.move(b0.x + b0.width / 2, b0.y + b0.height / 2);
    for (let i = 0; i < 3; i++) await page.mouse.wheel(0, -300);
    await expect.poll(ticks).not.toEqual(before);
    await page.getByRole('button', { name: 'Reset view' }).click();
    await expect.poll(ticks).toEqual(before);
    await shootBothThemes(page, 'compare-panels');
  }, 60_000);

  it('overlays in colours that are not the stable or unstable branch colours, in both themes', async () => {
    await page.getByRole('radio', { name: 'Overlaid' }).click();
    await page.waitForSelector('[data-testid=compare-view][data-mode=overlay]');
    const panel = page.locator('.dg-compare-panel');
    expect(await panel.count()).toBe(1);
    expect((await panel.boundingBox())!.height).toBeGreaterThanOrEqual(539);
    for (const theme of ['light', 'dark'] as const) {
      await page.evaluate((t) => { document.documentElement.dataset.theme = t; }, theme);
      const colours = await page.evaluate(() => {
        const root = document.querySelector('[data-testid=compare-view]')!;
        const probe = (v: string) => {
          const el = document.createElementNS('http://www.w3.org/2000/svg', 'line');
          el.setAttribute('stroke', `var(${v})`);
          root.querySelector('svg')!.appendChild(el);
          const c = getComputedStyle(el).stroke;
          el.remove();
          return c;
        };
        const drawn = [...root.querySelectorAll('path[data-diagram]')].map((p) => [p.getAttribute('data-diagram'), getComputedStyle(p).stroke]);
        return { stable: probe('--dg-stable'), unstable: probe('--dg-unstable'), drawn };
      });
      const perDiagram = new Map<string, Set<string>>();
      for (const [d, c] of colours.drawn) perDiagram.set(d!, (perDiagram.get(d!) ?? new Set()).add(String(c)));
      expect(perDiagram.size, theme).toBe(3);
      const used = [...perDiagram.values()].map((s) => { expect(s.size).toBe(1); return [...s][0]; });
      expect(new Set(used).size).toBe(3);
      for (const c of used) { expect(c).not.toBe(colours.stable); expect(c).not.toBe(colours.unstable); }
    }
    await page.evaluate(() => { document.documentElement.dataset.theme = 'light'; });
    await shootBothThemes(page, 'compare-overlay');
  }, 60_000);
});
