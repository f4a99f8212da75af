/**
 * Issue 6 in Chromium: the demo modeler builds a model from scratch in the editor (expression with a
 * deliberate mistake first, parameters, nodes, a link, a bad and a good CSV upload), sees the live
 * preview, saves, starts a run, watches the progress bar finish and finds the branches and special
 * points of the stored result in the page. The demo reviewer finds no edit controls, is refused by the
 * API, and comments on the run. Every page built for the issue is screenshotted in both themes into
 * the git-ignored screenshots/ folder.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { BASE_URL, demoAccount, hydrated, launchBrowser, screenshotPath, shootBothThemes, signIn, specialMarkCount } from './browser.ts';


let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
});

async function signedIn(role: string): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, colorScheme: 'light' });
  const page = await context.newPage();
  page.on('pageerror', (e) => console.error(`[${role} page error]`, e.message));
  await signIn(page, demoAccount(role).email, demoAccount(role).password);
  return { context, page };
}


const rate = 'a - b * P + P^8 / (1 + P^8)';
let modelPath = '';
let runId = 0;

describe('the model editor and the run view, as the demo modeler', () => {
  it('builds a model from scratch with live checks, CSV upload and a preview, then saves it', async () => {
    const { context, page } = await signedIn('modeler');
    await page.goto(`${BASE_URL}/models`);
    await hydrated(page);
    await shootBothThemes(page, 'models-index');
    await page.getByTestId('new-model').click();
    await page.waitForURL(`${BASE_URL}/models/new`);
    await hydrated(page);
    const editor = page.getByRole('form', { name: 'Model editor' });
    await editor.waitFor();

    // Keyboard: the name field takes focus and Tab moves on to the description, with a visible ring.
    await page.getByLabel('Name', { exact: true }).focus();
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('field-description');
    expect(await page.evaluate(() => getComputedStyle(document.activeElement!).outlineStyle)).toBe('solid');
    await page.getByLabel('Name', { exact: true }).fill('E2E lakes from scratch');
    await page.getByLabel('Description').fill('Invented test model: three lakes typed into the editor.');
    await page.getByLabel('State variable').fill('P');
    // A symbol without a parameter first: the validator's message appears under the field.
    const rateInput = page.getByLabel('Rate expression');
    await rateInput.fill('a - b * P + c');
    await page.getByRole('button', { name: 'Add parameter', exact: true }).click();
    await page.getByRole('button', { name: 'Add parameter', exact: true }).click();
    await page.getByLabel('Value of a').fill('0.05');
    await page.getByLabel('Value of b').fill('0.6');
    await expect.poll(() => rateInput.getAttribute('aria-invalid'), { timeout: 5000 }).toBe('true');
    const describedBy = (await rateInput.getAttribute('aria-describedby')) ?? '';
    const errorText = await page.locator(`[id="${describedBy.split(' ').pop()}"]`).textContent();
    expect(errorText).toContain('c');
    await rateInput.fill(rate);
    await expect.poll(() => rateInput.getAttribute('aria-invalid'), { timeout: 5000 }).toBe(null);
    expect(await page.locator('.ed-tex .katex').count()).toBeGreaterThan(0);

    await page.getByRole('button', { name: 'Add node' }).click();
    await page.getByRole('button', { name: 'Add node' }).click();
    await page.getByLabel('Node 1 id').fill('upper');
    await page.getByLabel('Node 2 id').fill('middle');
    await page.getByRole('button', { name: 'Add link' }).click();
    expect(await page.getByLabel('Link 1 from').inputValue()).toBe('upper');
    expect(await page.getByLabel('Link 1 to').inputValue()).toBe('middle');
    // The matrix shows the link and edits flow back into the link table.
    expect(await page.getByLabel('Weight from upper to middle').inputValue()).toBe('1');
    await page.getByLabel('Weight from middle to upper').fill('0.5');
    expect(await page.getByLabel('Link 2 weight').inputValue()).toBe('0.5');

    // A bad CSV is refused with row and column; a good one replaces the links and adds a node.
    const csv = page.getByLabel('Upload an adjacency matrix (CSV)');
    await csv.setInputFiles({ name: 'bad.csv', mimeType: 'text/csv', buffer: Buffer.from(',upper,middle\nupper,0,lots\nmiddle,0,0\n') });
    await expect.poll(() => page.locator('#ed-csv-problems').textContent()).toContain('row 2, column C');
    await csv.setInputFiles({ name: 'chain.csv', mimeType: 'text/csv', buffer: Buffer.from(',upper,middle,lower\nupper,0,1,0\nmiddle,0,0,1\nlower,0,0,0\n') });
    await expect.poll(() => page.locator('#ed-csv-problems').textContent()).toContain('new nodes lower');
    expect(await page.getByLabel('Node 3 id').inputValue()).toBe('lower');
    expect(await page.locator('[data-testid="network-drawing"] [data-link]').count()).toBe(2);

    await page.getByLabel('To', { exact: true }).fill('0.5');
    // Live preview of the 3-node chain, computed by /api/preview.
    await expect.poll(() => page.getByTestId('preview-status').textContent(), { timeout: 15000 }).toMatch(/\d+ branches, \d+ special points/);
    const preview = page.getByTestId('live-preview').getByTestId('diagram-view');
    await preview.waitFor();
    expect(Number(await preview.getAttribute('data-total-points'))).toBeGreaterThan(0);
    await shootBothThemes(page, 'model-new');

    await page.getByTestId('save-model').click();
    await page.waitForURL(/\/models\/\d+$/, { timeout: 15000 });
    modelPath = new URL(page.url()).pathname;
    expect(await page.getByTestId('model-name').textContent()).toBe('E2E lakes from scratch');
    await context.close();
  }, 120_000);

  it('keeps the form when a save fails and says why in words', async () => {
    const { context, page } = await signedIn('modeler');
    await page.goto(`${BASE_URL}${modelPath}/edit`);
    await hydrated(page);
    await page.getByRole('form', { name: 'Model editor' }).waitFor();
    await page.getByLabel('Change note').fill('');
    await page.getByTestId('save-model').click();
    expect(await page.getByTestId('save-error').textContent()).toContain('change note');
    await page.getByLabel('b on node middle').fill('0.55');
    await page.getByLabel('Change note').fill('Middle lake flushes less');
    await page.getByTestId('save-model').click();
    await expect.poll(() => page.locator('.ed-save .ed-ok').textContent(), { timeout: 10000 }).toContain('Saved as version 2');
    // The history shows the field-level change.
    await expect.poll(() => page.locator('.ed-diff-list').textContent(), { timeout: 10000 }).toContain('Node middle parameters: added {"b":0.55}');
    await shootBothThemes(page, 'model-edit');
    await context.close();
  }, 60_000);

  it('starts a run, watches the progress bar finish and finds every special point of the result in the page', async () => {
    const { context, page } = await signedIn('modeler');
    await page.goto(`${BASE_URL}${modelPath}`);
    await hydrated(page);
    await shootBothThemes(page, 'model-overview');
    await page.getByTestId('start-run').click();
    await page.waitForURL(/\/runs\/\d+$/, { timeout: 15000 });
    await hydrated(page);
    runId = Number(new URL(page.url()).pathname.split('/').pop());
    // A fresh result shows the progress bar first (a reused one is done at once and shows the diagram).
    const bar = page.getByTestId('run-progress');
    if (await bar.count()) {
      expect(await bar.getAttribute('role')).toBe('progressbar');
      expect(Number(await bar.getAttribute('aria-valuenow'))).toBeGreaterThanOrEqual(0);
      await page.screenshot({ path: screenshotPath('run-progress-light'), fullPage: true });
    }
    await page.getByTestId('diagram-view').waitFor({ timeout: 120_000 });
    const api = await page.request.get(`${BASE_URL}/api/runs/${runId}/result`);
    expect(api.status()).toBe(200);
    const body = (await api.json()) as { result: { diagram: { branches: unknown[]; bifurcations: { id: string }[] } } };
    const section = page.getByTestId('run-diagram');
    expect(Number(await section.getAttribute('data-branches'))).toBe(body.result.diagram.branches.length);
    expect(await specialMarkCount(page)).toBe(body.result.diagram.bifurcations.length);
    expect(await page.locator('[data-testid="branch-table"] tbody tr').count()).toBe(body.result.diagram.branches.length);
    await shootBothThemes(page, 'run-view');
    await context.close();
  }, 180_000);
});

describe('importing a model document from the models page', () => {
  it('a refused file names the field; a valid one becomes a new model', async () => {
    const { context, page } = await signedIn('modeler');
    await page.goto(`${BASE_URL}/models`);
    await hydrated(page);
    const id = modelPath.split('/').pop();
    const version = await page.request.get(`${BASE_URL}/api/models/${id}/versions/latest`);
    const document = ((await version.json()) as { version: { document: Record<string, unknown> } }).version.document;
    const input = page.getByLabel('Import from a file (model document, JSON)');
    const broken = { ...document, sweep: { parameter: 'nothing', from: 0, to: 1 } };
    await input.setInputFiles({ name: 'broken.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(broken)) });
    await expect.poll(() => page.locator('#import-error').textContent(), { timeout: 10000 }).toContain('Swept parameter: unknown parameter');
    await input.setInputFiles({ name: 'imported.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify({ ...document, name: 'E2E imported copy' })) });
    await page.waitForURL(/\/models\/\d+$/, { timeout: 15000 });
    expect(await page.getByTestId('model-name').textContent()).toBe('E2E imported copy');
    await context.close();
  }, 60_000);
});

describe('the same model as the demo reviewer', () => {
  it('shows no edit controls, the API refuses an edit, and a comment can be added to the run', async () => {
    const { context, page } = await signedIn('reviewer');
    await page.goto(`${BASE_URL}${modelPath}`);
    await hydrated(page);
    expect(await page.getByTestId('edit-model').count()).toBe(0);
    expect(await page.getByTestId('start-run').count()).toBe(0);
    await page.goto(`${BASE_URL}/models`);
    await hydrated(page);
    expect(await page.getByTestId('new-model').count()).toBe(0);
    await page.goto(`${BASE_URL}${modelPath}/edit`);
    await hydrated(page);
    expect(await page.getByRole('form', { name: 'Model editor' }).count()).toBe(0);
    await shootBothThemes(page, 'model-edit-reviewer');

    const id = modelPath.split('/').pop();
    const version = await page.request.get(`${BASE_URL}/api/models/${id}/versions/latest`);
    const document = ((await version.json()) as { version: { document: unknown } }).version.document;
    const refused = await page.request.post(`${BASE_URL}/api/models/${id}/versions`, { data: { document, changeNote: 'reviewer tries' } });
    expect(refused.status()).toBe(403);
    const preview = await page.request.post(`${BASE_URL}/api/preview`, { data: { document } });
    expect(preview.status()).toBe(403);

    await page.goto(`${BASE_URL}/runs/${runId}`);
    await hydrated(page);
    expect(await page.getByTestId('start-run').count()).toBe(0);
    await shootBothThemes(page, 'run-view-reviewer');
    await page.getByRole('textbox', { name: 'Comment' }).fill('Please state where the loading values come from.');
    await page.getByTestId('add-comment').click();
    await expect.poll(() => page.getByTestId('comments').textContent(), { timeout: 10000 }).toContain('where the loading values come from');
    await page.goto(`${BASE_URL}/reviews?resolved=1`);
    await hydrated(page);
    expect(await page.getByTestId('review-comments').textContent()).toContain('where the loading values come from');
    await shootBothThemes(page, 'reviews-reviewer');
    // Export a report from the reviews page: tick the run, press the report button.
    await page.getByLabel(`Choose run ${runId}`, { exact: true }).check();
    await page.getByRole('button', { name: 'Printable report of the chosen runs' }).click();
    await page.waitForURL(/\/report\?/);
    await hydrated(page);
    expect(await page.getByTestId('report-section').count()).toBe(1);
    expect(await page.locator('[data-testid="report-section"] svg path[data-special]').count()).toBeGreaterThanOrEqual(0);
    await shootBothThemes(page, 'report');
    await context.close();
  }, 90_000);

  it('the modeler sees the open comment on their model, and compares two runs', async () => {
    const { context, page } = await signedIn('modeler');
    await page.goto(`${BASE_URL}/reviews`);
    await hydrated(page);
    expect(await page.getByTestId('review-comments').textContent()).toContain('where the loading values come from');
    await shootBothThemes(page, 'reviews-modeler');
    const runs = await page.request.get(`${BASE_URL}/api/runs?status=done&kind=trace`);
    // Two variants: the latest finished runs of two different models.
    const items = ((await runs.json()) as { items: { id: number; modelId: number }[] }).items;
    const ids = items.filter((r, k) => items.findIndex((q) => q.modelId === r.modelId) === k).map((r) => r.id).slice(0, 2);
    expect(ids.length).toBe(2);
    await page.goto(`${BASE_URL}/compare?runs=${ids.join(',')}`);
    await hydrated(page);
    // The compare page fetches its diagrams after load (CompareLoader).
    await page.getByTestId('compare-view').waitFor({ timeout: 60_000 });
    expect(await page.getByTestId('compare-view').count()).toBe(1);
    expect(await page.getByTestId('compare-special-table').count()).toBe(1);
    await shootBothThemes(page, 'compare');
    await context.close();
  }, 90_000);
});
