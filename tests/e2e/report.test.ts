/**
 * The printable report (/report) in Chromium on the seeded demo runs, checked against the API: runs
 * are ticked in a list of the finished runs (no typed ids); special-point states are labelled with
 * the model's node ids; the model's equations are typeset by KaTeX shipped with the app (no request
 * leaves the app's origin, KaTeX's own font is loaded), its parameters and links match the stored
 * version; only open review comments are listed; printed to an A4 PDF, the first figure is on page 1
 * and the second run starts on a later page (text read back with pdf.js). Screenshots in both themes.
 */
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/lib/atlas/types';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, shootBothThemes, signIn } from './browser.ts';

interface ApiRun { id: number; modelId: number; modelName: string; versionNumber: number; settings?: { override?: unknown } }
interface NetworkDoc {
  format: 'brinkmap/network-1';
  element: { variable: string; rate: string; parameters?: Record<string, number> };
  nodes: { id: string; parameters?: Record<string, number> }[];
  links?: { from: string; to: string; weight?: number; twoWay?: boolean }[];
  coupling: { parameter: string; value: number; term?: string };
}

let browser: Browser;
let runs: ApiRun[] = [];

beforeAll(async () => { browser = await launchBrowser(); }, 60_000);
afterAll(async () => { await browser?.close(); });

async function signedIn(role: string, width = 1280): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width, height: 1000 }, colorScheme: 'light' });
  const page = await context.newPage();
  page.on('pageerror', (e) => console.error(`[${role} page error]`, e.message));
  await signIn(page, demoAccount(role).email, demoAccount(role).password);
  return { context, page };
}

const pdfText = async (pdf: Buffer): Promise<{ pages: string[]; sizes: number[][] }> => {
  const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
  const doc = await pdfjs.getDocument({ data: new Uint8Array(pdf), isEvalSupported: false }).promise;
  const pages: string[] = [];
  const sizes: number[][] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const p = await doc.getPage(i);
    sizes.push([...p.view]);
    pages.push((await p.getTextContent()).items.map((it) => ('str' in it ? it.str : '')).join(' ').replace(/\s+/g, ' '));
  }
  return { pages, sizes };
};

describe('the printable report, as the demo modeler', () => {
  let context: BrowserContext;
  let page: Page;
  const outside: string[] = [];
  beforeAll(async () => {
    ({ context, page } = await signedIn('modeler'));
    page.on('request', (r) => { if (!r.url().startsWith(BASE_URL) && !r.url().startsWith('data:')) outside.push(r.url()); });
    const res = await page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace&pageSize=100`);
    expect(res.status()).toBe(200);
    // Runs of the versions as stored first: a slice of a map (tests/e2e/map-run.test.ts may have made some) names its
    // overridden value in the caption, which the checks of the default caption below do not expect.
    const items = ((await res.json()) as { items: ApiRun[] }).items;
    runs = [...items.filter((r) => !r.settings?.override), ...items.filter((r) => r.settings?.override)];
    expect(runs.length, 'the seed has at least two finished demo runs').toBeGreaterThanOrEqual(2);
  }, 60_000);
  afterAll(async () => { await context?.close(); });

  it('lists every finished run as a checkbox; ticking two and pressing Update report shows both, in the listed order', async () => {
    await page.goto(`${BASE_URL}/report`);
    await hydrated(page);
    expect(await page.getByTestId('report-section').count()).toBe(0);
    await expect.poll(() => page.getByTestId('report-empty').textContent()).toContain('Tick the runs');
    // No typed ids: the picker is checkboxes, one per finished run.
    expect(await page.locator('[data-testid=report-form] input[type=text][name=runs], [data-testid=report-form] input:not([type])[name=runs]').count()).toBe(0);
    const boxes = page.getByTestId('report-run-picker').locator('input[type=checkbox][name=runs]');
    expect((await boxes.evaluateAll((els) => els.map((e) => Number((e as HTMLInputElement).value)))).sort()).toEqual(runs.map((r) => r.id).sort());
    for (const r of runs.slice(0, 2)) await page.getByRole('checkbox', { name: new RegExp(`^Run ${r.id} · version ${r.versionNumber} ·`) }).check();
    await Promise.all([page.waitForURL(/\/report\?/), page.getByRole('button', { name: 'Update report' }).click()]);
    const url = new URL(page.url());
    expect(url.searchParams.getAll('runs').map(Number).sort()).toEqual(runs.slice(0, 2).map((r) => r.id).sort());
    const shown = await page.getByTestId('report-section').evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-run-id'))));
    expect(shown.sort()).toEqual(runs.slice(0, 2).map((r) => r.id).sort());
    // The ticks survive the round trip.
    for (const r of runs.slice(0, 2)) expect(await page.getByRole('checkbox', { name: new RegExp(`^Run ${r.id} · version`) }).isChecked()).toBe(true);
  }, 60_000);

  it('labels every special-point state with the node ids of the run\'s model version, value by value', async () => {
    const run = runs[0];
    await page.goto(`${BASE_URL}/report?runs=${run.id}`);
    const diagram = ((await (await page.request.get(`${BASE_URL}/api/runs/${run.id}/result`)).json()) as { result: { diagram: Diagram } }).result.diagram;
    const doc = ((await (await page.request.get(`${BASE_URL}/api/models/${run.modelId}/versions/${run.versionNumber}`)).json()) as { version: { document: NetworkDoc } }).version.document;
    expect(doc.format).toBe('brinkmap/network-1');
    const nodeIds = doc.nodes.map((n) => n.id);
    const rows = page.getByTestId('report-special-row');
    expect(await rows.count()).toBe(diagram.bifurcations.length);
    expect(diagram.bifurcations.length).toBeGreaterThan(0);
    for (const [k, sp] of diagram.bifurcations.entries()) {
      const entries = await rows.nth(k).getByTestId('report-state-entry').allTextContents();
      expect(entries).toEqual(sp.x.map((v, i) => `${nodeIds[i]} ${v.toPrecision(6)}`));
    }
    const all = (await page.getByTestId('report-special-table').textContent())!;
    expect(all).not.toMatch(/\bx\d+\b/);
  }, 60_000);

  it('typesets the model\'s equations with the shipped KaTeX and lists its parameters, node values and links from the stored version', async () => {
    const run = runs[0];
    await page.goto(`${BASE_URL}/report?runs=${run.id}`);
    const doc = ((await (await page.request.get(`${BASE_URL}/api/models/${run.modelId}/versions/${run.versionNumber}`)).json()) as { version: { document: NetworkDoc } }).version.document;
    const equations = page.getByTestId('report-equation');
    expect(await equations.count()).toBe(3);
    // KaTeX output: MathML for readers plus its HTML, with the source TeX kept as an annotation.
    for (let k = 0; k < 3; k++) {
      expect(await equations.nth(k).locator('.katex math').count()).toBe(1);
      expect(await equations.nth(k).locator('.katex-html').count()).toBe(1);
    }
    const tex = await equations.evaluateAll((els) => els.map((e) => e.querySelector('annotation[encoding="application/x-tex"]')?.textContent ?? ''));
    expect(tex[0]).toContain('\\sum_{j \\to i} w_{ji}');
    expect(tex[0]).toContain(`{${doc.element.variable}}_{i}`);
    expect(tex[1]).toMatch(new RegExp(`^f\\(${doc.element.variable}\\) = `));
    // Every symbol of the element rate appears in the typeset MathML of its equation.
    const symbols = new Set(doc.element.rate.match(/[A-Za-z_][A-Za-z0-9_]*/g));
    const mi = await equations.nth(1).locator('math mi').allTextContents();
    for (const s of symbols) expect(mi.join(' ')).toContain(s);
    expect(tex[2]).toMatch(/^g\(\\mathit\{source\}, \\mathit\{target\}\) = /);
    // KaTeX's stylesheet and fonts come from the app itself.
    await page.evaluate(() => document.fonts.ready);
    expect(await page.evaluate(() => [...document.fonts].some((f) => f.family.replace(/"/g, '') === 'KaTeX_Main' && f.status === 'loaded'))).toBe(true);
    expect(await equations.first().locator('.katex').evaluate((e) => getComputedStyle(e).fontFamily)).toContain('KaTeX_Main');
    expect(outside, 'no request leaves the app').toEqual([]);

    const params = await page.getByTestId('report-parameter-row').evaluateAll((els) => els.map((e) => e.getAttribute('data-name')));
    expect(params).toEqual([doc.coupling.parameter, ...Object.keys(doc.element.parameters ?? {})]);
    const links = page.getByTestId('report-link-row');
    expect(await links.count()).toBe((doc.links ?? []).length);
    for (const [k, l] of (doc.links ?? []).entries()) {
      const cells = await links.nth(k).locator('td').allTextContents();
      expect(cells).toEqual([l.from, l.to, String(l.weight ?? 1), l.twoWay && l.from !== l.to ? 'both ways' : 'one way']);
    }
    const overrides = doc.nodes.filter((n) => Object.keys(n.parameters ?? {}).length > 0);
    if (overrides.length) {
      const nodeRows = await page.getByTestId('report-node-table').locator('tbody tr').evaluateAll((els) => els.map((e) => e.textContent ?? ''));
      for (const n of overrides) expect(nodeRows.find((t) => t.startsWith(n.id))).toContain(Object.entries(n.parameters!).map(([p, v]) => `${p} = ${v}`).join(', '));
    }
    expect(await page.getByTestId('report-network-drawing').locator('svg circle').count()).toBe(doc.nodes.length);
  }, 60_000);

  it('lists the run\'s open review comments and leaves resolved ones out', async () => {
    const run = runs[0];
    const reviewer = await signedIn('reviewer');
    const stamp = Date.now().toString(36);
    const post = async (body: string) => {
      const res = await reviewer.page.request.post(`${BASE_URL}/api/runs/${run.id}/comments`, { data: { body, target: { kind: 'run' } }, headers: { origin: BASE_URL } });
      expect(res.status()).toBe(201);
      return ((await res.json()) as { comment: { id: number } }).comment.id;
    };
    const openId = await post(`Report e2e: still open ${stamp}`);
    const doneId = await post(`Report e2e: answered ${stamp}`);
    await reviewer.context.close();
    const resolved = await page.request.patch(`${BASE_URL}/api/comments/${doneId}`, { data: { resolved: true }, headers: { origin: BASE_URL } });
    expect(resolved.status()).toBe(200);

    await page.goto(`${BASE_URL}/report?runs=${run.id}`);
    const api = ((await (await page.request.get(`${BASE_URL}/api/runs/${run.id}/comments`)).json()) as { comments: { id: number; resolved: boolean }[] }).comments;
    const expected = api.filter((c) => !c.resolved).map((c) => c.id).sort((a, b) => a - b);
    const shown = await page.getByTestId('report-comment').evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-comment-id'))));
    expect(shown.sort((a, b) => a - b)).toEqual(expected);
    expect(shown).toContain(openId);
    expect(shown).not.toContain(doneId);
    const text = (await page.getByTestId('report-comments').textContent())!;
    expect(text).toContain(`still open ${stamp}`);
    expect(text).not.toContain(`answered ${stamp}`);
    expect(text).toContain('about the run as a whole');
  }, 60_000);

  it('prints on A4 with the first figure on page 1 and the second run starting on a later page', async () => {
    const [a, b] = runs;
    await page.goto(`${BASE_URL}/report?runs=${a.id}&runs=${b.id}`);
    await hydrated(page);
    await shootBothThemes(page, 'report-two-runs');
    // Printing from the dark theme still gives black on white.
    await page.evaluate(() => { document.documentElement.dataset.theme = 'dark'; });
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('header').first().isVisible()).toBe(false);
    expect(await page.getByTestId('report-form').isVisible()).toBe(false);
    expect(await page.locator('main').evaluate((e) => getComputedStyle(e).color)).toBe('rgb(0, 0, 0)');
    const pdf = await page.pdf({ preferCSSPageSize: true, printBackground: true });
    await page.emulateMedia({ media: 'screen' });
    await page.evaluate(() => { document.documentElement.dataset.theme = 'light'; });
    const { pages, sizes } = await pdfText(pdf);
    // A4 is 210 mm × 297 mm = 595.28 pt × 841.89 pt (ISO 216; 1 in = 25.4 mm = 72 pt).
    for (const s of sizes) {
      expect(s[2] - s[0]).toBeCloseTo((210 / 25.4) * 72, 0);
      expect(s[3] - s[1]).toBeCloseTo((297 / 25.4) * 72, 0);
    }
    const first = pages[0];
    expect(first).toContain(`Figure 1. ${a.modelName}, version ${a.versionNumber} (run ${a.id})`);
    // The whole figure is on page 1: its axis title, its legend, its caption and its provenance line below the plot.
    const diagram = ((await (await page.request.get(`${BASE_URL}/api/runs/${a.id}/result`)).json()) as { result: { diagram: Diagram } }).result.diagram;
    expect(first).toContain(`parameter ${diagram.parameter}`);
    expect(first).toContain('stable branch');
    expect(first).toContain(`${a.modelName}, version ${a.versionNumber}: equilibria against ${diagram.parameter}.`);
    expect(first).toMatch(new RegExp(`run ${a.id} · engine`));
    const second = pages.findIndex((t) => t.includes(`Figure 2. ${b.modelName}`));
    expect(second).toBeGreaterThan(0);
    expect(pages[second]).toContain(`parameter ${diagram.parameter}`);
    expect(pages.join(' ')).toContain('Open review comments');
  }, 120_000);
});

describe('the printable report, as the demo reviewer at 800 px', () => {
  it('fits its picker and tables into the page without sideways scrolling', async () => {
    const { context, page } = await signedIn('reviewer', 800);
    await page.goto(`${BASE_URL}/report?runs=${runs[0].id}`);
    await hydrated(page);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(800);
    await page.screenshot({ path: screenshotPath('report-800-light'), fullPage: true });
    await context.close();
  }, 60_000);
});
