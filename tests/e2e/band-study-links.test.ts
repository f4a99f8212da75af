/**
 * Band links to escape studies on the real run page in Chromium: as the demo modeler, open the
 * seeded diagram run of each demo lake variant, open its bands by keyboard (Tab to the band, Enter),
 * and read in the band panel the link to the seeded escape study of the same version
 * (seeds/03_demo_escape_studies.ts) with the prediction at the stored value the helper picks from
 * the API's own data (bands and escape graphs from /api/runs/:id/result, values and predictions from
 * /api/runs/:id/escapes), or the words for a band without a stored value. The link opens the study
 * by keyboard. Panel screenshots in both themes: screenshots/band-study-links-*.png.
 */
import { readFileSync } from 'node:fs';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bandStudyLinks } from '../../src/components/diagram/band-studies';
import type { EscapePoint } from '../../src/lib/server/escapes/rows';
import { formatValue } from '../../src/lib/plot/ticks';
import type { EscapeGraph, RegimeBand } from '../../src/lib/regimes/types';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, signIn } from './browser.ts';

const file = JSON.parse(readFileSync('seeds/demo-escape-studies.json', 'utf8')) as { settings: { seed: number; noise: number } };

let browser: Browser;
let context: BrowserContext;
let page: Page;
beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1360, height: 1000 }, colorScheme: 'light' });
  page = await context.newPage();
  page.on('pageerror', (e) => console.error('[page error]', e.message));
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
}, 60_000);
afterAll(async () => { await browser?.close(); });

const getJson = async <T>(path: string): Promise<T> => (await (await page.request.get(`${BASE_URL}${path}`)).json()) as T;

async function setTheme(theme: 'light' | 'dark') {
  await page.evaluate((t) => {
    document.documentElement.dataset.theme = t;
    window.dispatchEvent(new CustomEvent('bm-theme-change', { detail: t }));
  }, theme);
  await page.waitForTimeout(250);
}

describe('band links to the escape studies of the same version', () => {
  it('every band of every demo variant links to its seeded study with the prediction at the right stored value', async () => {
    const models = (await getJson<{ items: { id: number; name: string }[] }>('/api/models')).items.filter((m) => m.name.startsWith('Fenn lakes:'));
    expect(models.length).toBe(3);
    let withValue = 0;
    for (const [mi, model] of models.entries()) {
      type RunItem = { id: number; status: string; versionNumber: number; settings: { seed?: number } };
      const traces = (await getJson<{ items: RunItem[] }>(`/api/runs?kind=trace&modelId=${model.id}&pageSize=50`)).items.filter((r) => r.status === 'done' && r.versionNumber === 1);
      const studies = (await getJson<{ items: RunItem[] }>(`/api/runs?kind=escapes&modelId=${model.id}&pageSize=50`)).items.filter((r) => r.status === 'done' && r.versionNumber === 1);
      const seeded = studies.find((r) => r.settings.seed === file.settings.seed);
      expect(seeded, `${model.name}: the seeded study`).toBeTruthy();
      const trace = traces[traces.length - 1];
      const result = await getJson<{ result: { regimes: { regimes?: RegimeBand[]; escapeGraphs?: EscapeGraph[] } } }>(`/api/runs/${trace.id}/result?points=2000`);
      const bands = result.result.regimes.regimes ?? [];
      const graphs = result.result.regimes.escapeGraphs ?? [];
      const api = await getJson<{ study: { noise: number; start: string }; points: EscapePoint[] }>(`/api/runs/${seeded!.id}/escapes`);
      const asStudy = { runId: seeded!.id, noise: api.study.noise, start: api.study.start, paths: null,
        points: api.points.filter((p) => p.status === 'done').map((p) => ({ p: p.p, orders: p.prediction?.sequences ?? [] })) };

      await page.goto(`${BASE_URL}/runs/${trace.id}`);
      await hydrated(page);
      await page.waitForSelector('[data-testid=diagram-view]:not([data-drawn-points="0"])', { timeout: 30_000 });
      const ribbons = page.getByTestId('band-ribbon');
      expect(await ribbons.count()).toBe(bands.length);
      for (const [k, band] of bands.entries()) {
        // By keyboard: focus the band's ribbon and press Enter.
        await ribbons.nth(k).focus();
        await page.keyboard.press('Enter');
        const panel = page.getByTestId('side-panel');
        const item = panel.locator(`[data-testid=band-study][data-run="${seeded!.id}"]`);
        await expect.poll(() => item.count()).toBe(1);
        expect(await item.getByTestId('band-study-link').getAttribute('href')).toBe(`/runs/${seeded!.id}`);
        expect(await item.getByTestId('band-study-link').textContent()).toBe(`Escape study (noise σ = ${file.settings.noise})`);
        const graph = graphs.find((g) => g.p >= band.from && g.p <= band.to);
        const [want] = bandStudyLinks(band, [asStudy], graph?.p);
        if (want.at) {
          withValue++;
          expect(Number(await item.getAttribute('data-at')), `${model.name}, band ${k + 1}`).toBe(want.at.p);
          expect(await item.textContent()).toContain(`${formatValue(want.at.p, 6)} (its stored value in this band nearest`);
          const top = [...want.at.orders].sort((a, b) => (b.probability ?? -1) - (a.probability ?? -1))[0];
          expect(await item.getByTestId('band-study-orders').locator('tbody tr').first().textContent()).toContain(top.order.join(' → '));
        } else {
          expect(await item.getByTestId('band-study-none').textContent()).toBe('This study has no stored value inside this band.');
        }
        if (mi === 1 && k === 0) {
          // The link focused by keyboard, so the screenshots show its focus ring.
          await item.getByTestId('band-study-link').focus();
          await item.scrollIntoViewIfNeeded();
          for (const theme of ['light', 'dark'] as const) {
            await setTheme(theme);
            await panel.screenshot({ path: screenshotPath(`band-study-links-panel-${theme}`) });
          }
          await setTheme('light');
        }
      }
      if (mi === 1) {
        // The link opens the study, by keyboard.
        await page.getByTestId('band-study-link').first().focus();
        await Promise.all([page.waitForURL((u) => u.pathname.startsWith('/runs/') && u.pathname !== `/runs/${trace.id}`), page.keyboard.press('Enter')]);
        await hydrated(page);
        expect(await page.getByTestId('escape-study').count()).toBe(1);
      }
    }
    // The demo values (0.05 to 1.15) lie in most bands of the three variants.
    expect(withValue).toBeGreaterThan(0);
  }, 240_000);
});
