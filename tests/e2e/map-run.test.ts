/**
 * A two-parameter map end to end in Chromium: as the demo modeler, open a finished diagram run of the
 * first demo model, start a small map over the element parameter b through "Map over a second
 * parameter" (a field error beside its field first), follow the run to its map, hover a curve point
 * and read its numbers against the API, check the crosshair readout, export the map as SVG (parsed:
 * one path per curve, the provenance footer) and look at both themes; click the map and get the
 * one-parameter diagram at that value below it (a slice run, no new version), click again and get the
 * same run, and Enter on the keyboard crosshair; a reviewer opens an existing slice but starts none and
 * sees no start button. Screenshots in screenshots/map-run-*.png and map-slice-*.png.
 */
import { readFileSync } from 'node:fs';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, shootBothThemes, signIn } from './browser.ts';

let browser: Browser;
let context: BrowserContext;
let page: Page;
let traceRunId = 0;
let mapRunId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1280, height: 900 }, colorScheme: 'light', acceptDownloads: true });
  page = await context.newPage();
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
  const models = (await (await page.request.get(`${BASE_URL}/api/models`)).json()) as { items: { id: number; name: string }[] };
  const modelId = models.items.find((m) => m.name.includes('downstream flow only'))!.id;
  const runs = (await (await page.request.get(`${BASE_URL}/api/runs?kind=trace&modelId=${modelId}`)).json()) as { items: { id: number; status: string; sliceOf: number | null; settings: { override?: unknown } }[] };
  // A run of the version itself: slices of a map (another test file makes them) override a parameter
  // and offer no study or map forms.
  traceRunId = runs.items.find((r) => r.status === 'done' && r.sliceOf === null && !r.settings?.override)?.id ?? 0;
}, 60_000);
afterAll(async () => { await browser?.close(); });

describe('a map run in the browser', () => {
  it('starts a map from a finished diagram run and follows it to the map', async () => {
    expect(traceRunId, 'the seed has a finished diagram run of the first demo model').toBeGreaterThan(0);
    await page.goto(`${BASE_URL}/runs/${traceRunId}`);
    await hydrated(page);
    await page.getByTestId('start-map-open').click();
    const form = page.getByTestId('start-map-form');
    expect(await form.getByTestId('mp-second').inputValue()).toBe('b');
    await form.getByTestId('mp-secondFrom').fill('0.6');
    await form.getByTestId('mp-secondTo').fill('0.6');
    await expect.poll(() => form.getByTestId('mp-secondTo-error').textContent()).toContain('must differ from secondFrom');
    await form.getByTestId('mp-secondFrom').fill('0.55');
    await form.getByTestId('mp-secondTo').fill('0.65');
    expect(await form.getByTestId('mp-secondTo-error').count()).toBe(0);
    await page.screenshot({ path: screenshotPath('map-run-form'), fullPage: true });
    await Promise.all([
      page.waitForURL((u) => /^\/runs\/\d+$/.test(u.pathname) && u.pathname !== `/runs/${traceRunId}`, { timeout: 20_000 }),
      form.getByTestId('start-map-submit').click(),
    ]);
    mapRunId = Number(new URL(page.url()).pathname.split('/').pop());
    const run = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}`)).json()) as { run: { kind: string; settings: Record<string, unknown> } };
    expect(run.run.kind).toBe('map');
    expect(run.run.settings).toMatchObject({ second: 'b', secondFrom: 0.55, secondTo: 0.65 });
    await expect.poll(async () => {
      if ((await page.getByTestId('map-view').count()) === 0) return false;
      return Number(await page.getByTestId('map-view').getAttribute('data-curves')) > 0;
    }, { timeout: 170_000, interval: 1000 }).toBe(true);
    await hydrated(page);
  }, 240_000);

  it('hovering a curve point reads out its parameter values as the API stores them; the crosshair reads the pointer', async () => {
    expect(mapRunId).toBeGreaterThan(0);
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}/map`)).json()) as { parameters: string[]; curves: { id: string; points: { p: [number, number] }[] }[]; secondValue: number };
    expect(api.parameters).toEqual(['beta', 'b']);
    expect(api.secondValue).toBe(0.6);
    const mark = page.locator('[data-testid=map-mark][data-kind=curve]').first();
    const id = (await mark.getAttribute('data-id'))!;
    const [curveId, index] = id.split(':');
    const point = api.curves.find((c) => c.id === curveId)!.points[Number(index)];
    await mark.hover();
    const readout = page.getByTestId('map-readout');
    await expect.poll(() => readout.textContent()).toContain(`beta = ${point.p[0]}`);
    expect(await readout.textContent()).toContain(`b = ${point.p[1]}`);
    // Keyboard: the same mark takes focus and shows the same readout.
    await page.mouse.move(0, 0);
    await mark.focus();
    await expect.poll(() => readout.textContent()).toContain(`beta = ${point.p[0]}`);
    await mark.blur();
    // The crosshair: the middle of the plot area reads about the middle of both ranges (4 significant digits).
    const svg = page.getByTestId('map-svg');
    const box = (await svg.boundingBox())!;
    await page.mouse.move(box.x + 5, box.y + 5);
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.3);
    await expect.poll(() => page.getByTestId('map-coords').count()).toBe(1);
    const coords = await page.getByTestId('map-coords').textContent();
    expect(coords).toMatch(/beta = [\d.]+, b = [\d.]+/);
    const b = Number(/b = ([\d.]+)$/.exec(coords!)![1]);
    expect(b).toBeGreaterThanOrEqual(0.55);
    expect(b).toBeLessThanOrEqual(0.65);
    await page.getByTestId('map-view').scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath('map-run-hover') });
    await page.mouse.move(0, 0);
  }, 60_000);

  it('exports the map as SVG with one path per curve and the provenance footer; both themes', async () => {
    await page.getByTestId('map-export-toggle').click();
    const [dl] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.getByTestId('map-export-svg').click()]);
    const text = readFileSync((await dl.path())!, 'utf8');
    expect(XMLValidator.validate(text)).toBe(true);
    const doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '' }).parse(text);
    const paths = ([] as Record<string, string>[]).concat(doc.svg.path ?? []);
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}/map`)).json()) as { curves: { id: string }[]; points: { id: string }[] };
    expect(paths.filter((p) => p['data-curve']).map((p) => p['data-curve'])).toEqual(api.curves.map((c) => c.id));
    expect(paths.filter((p) => p['data-point']).map((p) => p['data-point'])).toEqual(api.points.map((c) => c.id));
    expect(text).toContain(`run ${mapRunId}`);
    expect(text).toContain('indicative');
    const [png] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.getByTestId('map-export-png').click()]);
    expect(readFileSync((await png.path())!).subarray(1, 4).toString()).toBe('PNG');
    await page.getByTestId('map-export-toggle').click();
    await shootBothThemes(page, 'map-run');
  }, 120_000);

  let sliceRunId = 0;
  let sliceValue = 0;
  it('clicking the map opens the one-parameter diagram at that value below it, computed without a new version; a second click reuses the run', async () => {
    const modelId = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}`)).json()).run.modelId as number;
    const versionsBefore = (await (await page.request.get(`${BASE_URL}/api/models/${modelId}/versions`)).json()) as { versions: unknown[] };
    const svg = page.getByTestId('map-svg');
    await svg.scrollIntoViewIfNeeded();
    const box = (await svg.boundingBox())!;
    const at = { x: box.x + box.width * 0.55, y: box.y + box.height * 0.28 };
    await page.mouse.move(at.x, at.y);
    const coords = (await page.getByTestId('map-coords').textContent())!;
    await page.mouse.click(at.x, at.y);
    const panel = page.getByTestId('map-slice-panel');
    await expect.poll(() => panel.getAttribute('data-run'), { timeout: 20_000 }).toMatch(/^\d+$/);
    sliceRunId = Number(await panel.getAttribute('data-run'));
    sliceValue = Number(await panel.getAttribute('data-value'));
    // The value under the pointer (the readout's 4 digits), rounded to 1e-4 (a thousandth of the range 0.1).
    expect(Math.abs(sliceValue - Number(/b = ([\d.]+)$/.exec(coords)![1]))).toBeLessThan(2e-4);
    expect(Number((sliceValue * 1e4).toFixed(6)) % 1).toBe(0);
    const run = (await (await page.request.get(`${BASE_URL}/api/runs/${sliceRunId}`)).json()).run as { kind: string; sliceOf: number; versionNumber: number; settings: Record<string, unknown> };
    expect(run).toMatchObject({ kind: 'trace', sliceOf: mapRunId, versionNumber: 1, settings: { override: { parameter: 'b', value: sliceValue } } });
    // Progress while it computes, then the diagram itself, in the panel.
    await expect.poll(() => panel.locator('[data-testid=diagram-view]').count(), { timeout: 170_000, interval: 1000 }).toBe(1);
    expect(await panel.getAttribute('data-status')).toBe('done');
    expect(await panel.textContent()).toContain(`b = ${sliceValue} overridden (slice of map run ${mapRunId})`);
    expect(await panel.getByTestId('map-slice-link').getAttribute('href')).toBe(`/runs/${sliceRunId}`);
    // Its line on the map, beside the model's own.
    expect(await svg.locator(`path[data-layer=slice][data-value="${sliceValue}"]`).count()).toBe(1);
    const versionsAfter = (await (await page.request.get(`${BASE_URL}/api/models/${modelId}/versions`)).json()) as { versions: unknown[] };
    expect(versionsAfter.versions.length).toBe(versionsBefore.versions.length);
    await page.mouse.move(0, 0);
    await page.getByTestId('map-view').scrollIntoViewIfNeeded();
    await shootBothThemes(page, 'map-slice');
    await page.getByTestId('run-map').screenshot({ path: screenshotPath('map-slice-panel') });

    // Close it and click the same spot: the same run, answered as already computed.
    await panel.getByRole('button', { name: 'Close' }).click();
    expect(await panel.count()).toBe(0);
    // The same value again: a click on the slice's own line (the map grew a legend entry, so the old pixel moved).
    const onLine = async (pg: Page, value: number, xFraction: number) => {
      const map = pg.getByTestId('map-svg');
      await map.scrollIntoViewIfNeeded();
      const line = (await map.locator(`path[data-layer=slice][data-value="${value}"]`).boundingBox())!;
      await pg.mouse.click(line.x + line.width * xFraction, line.y + line.height / 2);
    };
    await onLine(page, sliceValue, 0.55);
    await expect.poll(() => page.getByTestId('map-slice-panel').getAttribute('data-cached'), { timeout: 20_000 }).toBe('true');
    expect(Number(await page.getByTestId('map-slice-panel').getAttribute('data-run'))).toBe(sliceRunId);
    const slices = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}/slices`)).json()) as { slices: { id: number; value: number }[] };
    expect(slices.slices.filter((x) => x.value === sliceValue).map((x) => x.id)).toEqual([sliceRunId]);
    await expect.poll(() => page.getByTestId('map-slice-panel').locator('[data-testid=diagram-view]').count(), { timeout: 30_000 }).toBe(1);
  }, 240_000);

  it('keyboard: focus the map, move the crosshair with the arrow keys, Enter opens the slice at its value', async () => {
    await page.getByTestId('map-slice-panel').getByRole('button', { name: 'Close' }).click();
    const svg = page.getByTestId('map-svg');
    await svg.focus();
    await page.keyboard.press('ArrowUp');
    await expect.poll(() => page.getByTestId('map-coords').count()).toBe(1);
    const coords = (await page.getByTestId('map-coords').textContent())!;
    await page.keyboard.press('Enter');
    const panel = page.getByTestId('map-slice-panel');
    await expect.poll(() => panel.getAttribute('data-run'), { timeout: 20_000 }).toMatch(/^\d+$/);
    const value = Number(await panel.getAttribute('data-value'));
    // One step up from the middle of b in [0.55, 0.65]: a hundredth of the plot above 0.6.
    expect(value).toBeGreaterThan(0.6);
    expect(Math.abs(value - Number(/b = ([\d.]+)$/.exec(coords)![1]))).toBeLessThan(2e-4);
    await panel.getByRole('button', { name: 'Close' }).click();
  }, 60_000);

  it('a reviewer opens an existing slice from the map but cannot start one', async () => {
    const reviewer = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const p = await reviewer.newPage();
    await signIn(p, demoAccount('reviewer').email, demoAccount('reviewer').password);
    await p.goto(`${BASE_URL}/runs/${mapRunId}`);
    await expect.poll(() => p.getByTestId('map-svg').count(), { timeout: 30_000 }).toBe(1);
    await hydrated(p);
    const svg = p.getByTestId('map-svg');
    await svg.scrollIntoViewIfNeeded();
    const line = (await svg.locator(`path[data-layer=slice][data-value="${sliceValue}"]`).boundingBox())!;
    await p.mouse.click(line.x + line.width * 0.4, line.y + line.height / 2);
    await expect.poll(() => p.getByTestId('map-slice-panel').getAttribute('data-run'), { timeout: 20_000 }).toBe(String(sliceRunId));
    await p.getByTestId('map-slice-panel').getByRole('button', { name: 'Close' }).click();
    // (Clicking Close may have scrolled the page.)
    await svg.scrollIntoViewIfNeeded();
    const box = (await svg.boundingBox())!;
    await p.mouse.click(box.x + box.width * 0.2, box.y + box.height * 0.12);
    await expect.poll(() => p.getByTestId('map-slice-missing').count(), { timeout: 20_000 }).toBe(1);
    const before = (await (await p.request.get(`${BASE_URL}/api/runs/${mapRunId}/slices`)).json()).slices.length;
    const refused = await p.request.post(`${BASE_URL}/api/runs/${mapRunId}/slices`, { data: { value: 0.6 } });
    expect(refused.status()).toBe(403);
    expect((await (await p.request.get(`${BASE_URL}/api/runs/${mapRunId}/slices`)).json()).slices.length).toBe(before);
    // The slice's own run page says it is one, with the overridden value.
    await p.goto(`${BASE_URL}/runs/${sliceRunId}`);
    expect(await p.getByTestId('run-override').textContent()).toContain(`map run ${mapRunId}`);
    await p.screenshot({ path: screenshotPath('map-slice-run-page') });
    await reviewer.close();
  }, 90_000);

  it('a clicked point keeps its numbers and offers, as a secondary action, a new version with b set, traced over the map\'s range', async () => {
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}/map`)).json()) as { curves: { id: string; points: { p: [number, number] }[] }[]; ranges: { first: [number, number] } };
    const mark = page.locator('[data-testid=map-mark][data-kind=curve]').nth(2);
    const [curveId, index] = (await mark.getAttribute('data-id'))!.split(':');
    const b = api.curves.find((c) => c.id === curveId)!.points[Number(index)].p[1];
    await mark.click();
    await expect.poll(() => page.getByTestId('map-picked').textContent()).toContain(`b = ${b}`);
    // The two writes are answered here, so the demo model keeps its single version for the other tests;
    // what the page sends is what is checked (the endpoints themselves have their own tests).
    const sent: { url: string; body: any }[] = [];
    await page.route('**/api/models/*/versions', async (route) => {
      sent.push({ url: route.request().url(), body: route.request().postDataJSON() });
      await route.fulfill({ status: 201, contentType: 'application/json', body: JSON.stringify({ version: { number: 2 }, created: true }) });
    });
    await page.route('**/api/runs', async (route) => {
      if (route.request().method() !== 'POST') return route.continue();
      sent.push({ url: route.request().url(), body: route.request().postDataJSON() });
      await route.fulfill({ status: 201, contentType: 'application/json', body: JSON.stringify({ run: { id: traceRunId } }) });
    });
    await Promise.all([
      page.waitForURL((u) => u.pathname === `/runs/${traceRunId}`, { timeout: 20_000 }),
      page.getByTestId('map-trace-at').click(),
    ]);
    expect(sent).toHaveLength(2);
    expect(sent[0].body.document.element.parameters.b).toBe(b);
    expect(sent[0].body.document.nodes).toEqual([{ id: 'upper', parameters: { a: 0.08 } }, { id: 'middle', parameters: { a: 0.06 } }, { id: 'lower', parameters: { a: 0.05 } }]);
    expect(sent[0].body.changeNote).toContain(`map of run ${mapRunId}`);
    expect(sent[1].body).toEqual({ modelId: expect.any(Number), version: 2, kind: 'trace', settings: { from: api.ranges.first[0], to: api.ranges.first[1] } });
    await page.unrouteAll();
  }, 60_000);

  it('the printable report of the diagram run shows the map of its version', async () => {
    const api = (await (await page.request.get(`${BASE_URL}/api/runs/${mapRunId}/map`)).json()) as { curves: { id: string }[] };
    await page.goto(`${BASE_URL}/report?runs=${traceRunId}`);
    const section = page.getByTestId('report-map');
    expect(Number(await section.getAttribute('data-run-id'))).toBe(mapRunId);
    expect(await section.locator('svg path[data-curve]').count()).toBe(api.curves.length);
    expect(await section.textContent()).toContain(`run ${mapRunId}`);
    await section.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath('map-run-report') });
  }, 60_000);

  it('a reviewer sees no start button on a finished diagram run', async () => {
    const reviewer = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const p = await reviewer.newPage();
    await signIn(p, demoAccount('reviewer').email, demoAccount('reviewer').password);
    await p.goto(`${BASE_URL}/runs/${traceRunId}`);
    await hydrated(p);
    expect(await p.getByTestId('run-diagram').count()).toBe(1);
    expect(await p.getByTestId('start-map-open').count()).toBe(0);
    expect(await p.getByTestId('start-map').count()).toBe(0);
    // Nor on the model page, where the modeler has one for the latest version.
    const modelId = (await (await page.request.get(`${BASE_URL}/api/runs/${traceRunId}`)).json()).run.modelId as number;
    await p.goto(`${BASE_URL}/models/${modelId}`);
    await hydrated(p);
    expect(await p.getByTestId('start-map').count()).toBe(0);
    await reviewer.close();
    await page.goto(`${BASE_URL}/models/${modelId}`);
    await hydrated(page);
    expect(await page.getByTestId('start-map-open').count()).toBe(1);
  }, 60_000);
});
