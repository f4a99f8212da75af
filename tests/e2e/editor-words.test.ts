/**
 * Issue 11, "the editor speaks the modeler's words", in Chromium as the demo modeler: parameters
 * offered from the rate's unknown symbols, messages with screen labels instead of internal paths,
 * CSV hints, undo/redo by button and keyboard, signed link weights in the drawing, the fresh form,
 * the placeholder, the heading after a save, italic parameters, the import of a taken name and the
 * directed link count. Each step is screenshotted in both themes (screenshots/words-*.png).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { BASE_URL, demoAccount, hydrated, launchBrowser, shootBothThemes, signIn } from './browser.ts';

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
});

async function asModeler(): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, colorScheme: 'light' });
  const page = await context.newPage();
  page.on('pageerror', (e) => console.error('[modeler page error]', e.message));
  await signIn(page, demoAccount('modeler').email, demoAccount('modeler').password);
  return { context, page };
}

const stamp = Date.now().toString(36);
const modelName = `Words alder birch ${stamp}`;
let modelPath = '';

const parameterNames = (page: Page) =>
  page.locator('input[aria-label^="Parameter "][aria-label$=" name"]').evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value));

describe('the editor speaks the modeler\'s words', () => {
  it('a fresh form: no complaints, a placeholder in the default variable, parameters from the rate, undo and redo', async () => {
    const { context, page } = await asModeler();
    await page.goto(`${BASE_URL}/models/new`);
    await hydrated(page);
    const status = page.getByTestId('preview-status');
    await expect.poll(() => status.textContent()).toContain('The preview appears once the model is complete');
    expect(await status.textContent()).not.toContain('Fix the fields marked above');
    expect(await page.getByLabel('State variable').inputValue()).toBe('x');
    expect(await page.getByLabel('Rate expression').getAttribute('placeholder')).toBe('a - b * x + x^8 / (1 + x^8)');
    await shootBothThemes(page, 'words-fresh');

    await page.getByLabel('Name', { exact: true }).fill(modelName);
    await page.getByLabel('Rate expression').fill('a - b * x + r * x^2');
    const offers = page.getByTestId('rate-unknowns');
    await expect.poll(() => offers.textContent()).toContain('Add parameter r');
    expect(await offers.getByRole('button').allTextContents()).toEqual(['Add parameter a', 'Add parameter b', 'Add parameter r']);
    await offers.getByRole('button', { name: 'Add parameter r' }).click();
    expect(await parameterNames(page)).toEqual(['r']);
    // The plain button takes the rate's next unknown symbols, not a fresh letter.
    await page.getByRole('button', { name: 'Add parameter', exact: true }).click();
    await page.getByRole('button', { name: 'Add parameter', exact: true }).click();
    expect(await parameterNames(page)).toEqual(['r', 'a', 'b']);
    expect(await offers.count()).toBe(0);
    // Every symbol in the typeset rate is italic; only the d of d/dt is upright.
    expect(await page.locator('.ed-tex .katex-html .mathrm').allTextContents()).toEqual(['d', 'd']);
    expect(await page.locator('.ed-tex .katex-html .mathit').allTextContents()).toContain('b');
    await shootBothThemes(page, 'words-parameters');

    // Undo and redo: buttons, then Ctrl+Z / Ctrl+Shift+Z.
    await page.getByRole('button', { name: 'Undo' }).click();
    expect(await parameterNames(page)).toEqual(['r', 'a']);
    await page.getByRole('button', { name: 'Redo' }).click();
    expect(await parameterNames(page)).toEqual(['r', 'a', 'b']);
    await page.getByLabel('Value of a').focus();
    await page.keyboard.press('Control+z');
    expect(await parameterNames(page)).toEqual(['r', 'a']);
    await page.keyboard.press('Control+Shift+z');
    expect(await parameterNames(page)).toEqual(['r', 'a', 'b']);

    // The coupling term's unknown symbols are offered too, but never the variable or the coupling parameter.
    await page.getByLabel('Coupling term', { exact: true }).fill('k * (source - target) + beta * x');
    const termOffers = page.getByTestId('term-unknowns');
    await expect.poll(() => termOffers.textContent()).toContain('Add parameter k');
    expect(await termOffers.getByRole('button').allTextContents()).toEqual(['Add parameter k']);
    await termOffers.getByRole('button', { name: 'Add parameter k' }).click();
    expect(await parameterNames(page)).toEqual(['r', 'a', 'b', 'k']);
    expect(await termOffers.count()).toBe(0);
    await context.close();
  }, 120_000);

  it('messages name "Node 2 id", links are drawn with signed weights, CSV problems name the right node and hint at decimal commas', async () => {
    const { context, page } = await asModeler();
    await page.goto(`${BASE_URL}/models/new`);
    await hydrated(page);
    await page.getByLabel('Name', { exact: true }).fill(modelName);
    await page.getByLabel('Rate expression').fill('a - b * x + x^8 / (1 + x^8)');
    const offers = page.getByTestId('rate-unknowns');
    await offers.getByRole('button', { name: 'Add parameter a' }).click();
    await offers.getByRole('button', { name: 'Add parameter b' }).click();
    await page.getByLabel('Value of a').fill('0.05');
    await page.getByLabel('Value of b').fill('0.6');

    await page.getByRole('button', { name: 'Add node' }).click();
    await page.getByRole('button', { name: 'Add node' }).click();
    // Adding a node is one undo step; the keys work with the focus on the page itself too.
    const nodeCount = () => page.locator('.ed-node-list li').count();
    expect(await nodeCount()).toBe(2);
    await page.locator('h1').click();
    await page.keyboard.press('Control+z');
    expect(await nodeCount()).toBe(1);
    await page.keyboard.press('Control+Shift+z');
    expect(await nodeCount()).toBe(2);
    await page.getByLabel('Node 1 id').fill('alder');
    await page.getByLabel('Node 2 id').fill('alder');
    const summary = page.getByTestId('issue-summary');
    await expect.poll(() => summary.textContent(), { timeout: 10000 }).toContain('Node 2 id');
    const text = (await summary.textContent()) ?? '';
    expect(text).toContain('Node 1');
    // The words of the message are on the screen: each node row and link row carries its number.
    expect(await page.locator('.ed-node-label').allTextContents()).toEqual(['Node 1 id', 'Node 2 id']);
    expect(text).not.toMatch(/nodes\[|nodes\.\d|element\.|links\[/);
    await shootBothThemes(page, 'words-messages');
    await page.getByLabel('Node 2 id').fill('birch');
    await expect.poll(() => summary.textContent(), { timeout: 10000 }).not.toContain('Node 2 id');

    // Links with signed weights: width by magnitude, dashed when negative.
    await page.getByRole('button', { name: 'Add link' }).click();
    await page.getByLabel('Link 1 weight').fill('0.25');
    await page.getByLabel('Weight from birch to alder').fill('-1');
    const drawing = page.getByTestId('network-drawing');
    const look = (link: string) => drawing.locator(`[data-link="${link}"]`).evaluate((el) => {
      const cs = getComputedStyle(el);
      return { classes: el.getAttribute('class'), width: parseFloat(cs.strokeWidth), dash: cs.strokeDasharray, colour: cs.stroke };
    });
    const positive = await look('alder->birch');
    const negative = await look('birch->alder');
    expect(await page.locator('th.ed-link-label').allTextContents()).toEqual(['Link 1', 'Link 2']);
    expect(negative.classes).toContain('ed-link-negative');
    expect(positive.classes).not.toContain('ed-link-negative');
    expect(negative.width).toBeGreaterThan(positive.width);
    expect(negative.dash).not.toBe('none');
    expect(positive.dash).toBe('none');
    expect(negative.colour).not.toBe(positive.colour);
    expect(await drawing.getAttribute('aria-label')).toContain('1 with a negative weight (dashed)');
    // Undo a link edit, then redo it.
    await page.getByRole('button', { name: 'Undo' }).click();
    await expect.poll(() => drawing.locator('[data-link="birch->alder"]').count()).toBe(0);
    await page.getByRole('button', { name: 'Redo' }).click();
    await expect.poll(() => drawing.locator('[data-link="birch->alder"]').count()).toBe(1);
    await shootBothThemes(page, 'words-drawing');

    // CSV: a ragged decimal-comma file names only the node that really has no row, with a hint.
    const csv = page.getByLabel('Upload an adjacency matrix (CSV)');
    await csv.setInputFiles({ name: 'comma.csv', mimeType: 'text/csv', buffer: Buffer.from(',alder,birch,cedar\nalder,0,0,25,0\nbirch,0,0,0\n') });
    const problems = page.locator('#ed-csv-problems');
    await expect.poll(() => problems.textContent()).toContain('decimal commas (0,5)');
    expect(await problems.textContent()).toContain('row 1, column D: node "cedar" is in the header but has no row');
    expect(await problems.textContent()).not.toContain('node "alder" is in the header but has no row');
    await csv.setInputFiles({ name: 'semi.csv', mimeType: 'text/csv', buffer: Buffer.from(';alder;birch\nalder;0;0,25\nbirch;-1;0\n') });
    await expect.poll(() => problems.textContent()).toContain('write it with a decimal point: 0.25');
    // A misspelt row id is named as the node that lacks a row.
    await csv.setInputFiles({ name: 'typo.csv', mimeType: 'text/csv', buffer: Buffer.from(',alder,birch\nalder,0,0.25\nbrich,0,0\n') });
    await expect.poll(() => problems.textContent()).toContain('node "brich" is not in the header row (is it "birch", which has no row?)');
    await shootBothThemes(page, 'words-csv');
    // A CSV that loads is one undo step too.
    await csv.setInputFiles({ name: 'good.csv', mimeType: 'text/csv', buffer: Buffer.from(',alder,birch\nalder,0,0.25\nbirch,0,0\n') });
    await expect.poll(() => drawing.locator('[data-link]').count()).toBe(1);
    await page.getByRole('button', { name: 'Undo' }).click();
    await expect.poll(() => drawing.locator('[data-link]').count()).toBe(2);
    await page.getByRole('button', { name: 'Redo' }).click();
    await expect.poll(() => drawing.locator('[data-link]').count()).toBe(1);

    await page.getByTestId('save-model').click();
    await page.waitForURL(/\/models\/\d+$/, { timeout: 15000 });
    modelPath = new URL(page.url()).pathname;
    expect(await page.getByTestId('link-count').textContent()).toBe('1 directed link');
    await context.close();
  }, 120_000);

  it('after a save the heading shows the new version and the history says "Link alder → birch weight: 0.25 → 0.2"', async () => {
    const { context, page } = await asModeler();
    await page.goto(`${BASE_URL}${modelPath}/edit`);
    await hydrated(page);
    expect(await page.getByTestId('edit-heading-version').textContent()).toBe('from version 1');
    await page.getByLabel('Link 1 weight').fill('0.2');
    await page.getByLabel('Change note').fill('Weaker alder to birch');
    await page.getByTestId('save-model').click();
    await expect.poll(() => page.locator('.ed-save .ed-ok').textContent(), { timeout: 10000 }).toContain('Saved as version 2');
    expect(await page.getByTestId('edit-heading-version').textContent()).toBe('at version 2, just saved');
    await expect.poll(() => page.locator('.ed-diff-list').textContent(), { timeout: 10000 }).toContain('Link alder → birch weight: 0.25 → 0.2');
    await shootBothThemes(page, 'words-history');

    // The model page: the same words for the change, and a run form whose errors are not doubled paths.
    await page.goto(`${BASE_URL}${modelPath}`);
    await hydrated(page);
    expect(await page.getByTestId('version-changes').textContent()).toContain('Link alder → birch weight: 0.25 → 0.2');
    await page.locator('#run-from').fill('0.1');
    await page.locator('#run-to').fill('0.1');
    await page.getByTestId('start-run').click();
    const alert = page.locator('form[aria-label="Start a run"] [role="alert"]');
    await expect.poll(() => alert.textContent(), { timeout: 10000 }).toContain('Sweep to: must differ from Sweep from');
    expect(await alert.textContent()).not.toContain('settings.');
    await shootBothThemes(page, 'words-model-page');
    await context.close();
  }, 90_000);

  it('importing a model whose name exists makes "name (2)", and the summary counts directed links', async () => {
    const { context, page } = await asModeler();
    await page.goto(`${BASE_URL}/models`);
    await hydrated(page);
    const id = modelPath.split('/').pop();
    const latest = await page.request.get(`${BASE_URL}/api/models/${id}/versions/latest`);
    const document = ((await latest.json()) as { version: { document: Record<string, unknown> } }).version.document;
    const file = { ...document, name: modelName, links: [{ from: 'alder', to: 'birch', weight: 0.2, twoWay: true }] };
    await page.getByLabel('Import from a file (model document, JSON)').setInputFiles({ name: 'twin.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(file)) });
    await page.waitForURL(/\/models\/\d+\?renamedFrom=/, { timeout: 15000 });
    expect(await page.getByTestId('model-name').textContent()).toBe(`${modelName} (2)`);
    expect(await page.getByTestId('renamed-notice').textContent()).toContain(`the workspace already has a model named “${modelName}”`);
    expect(await page.getByTestId('link-count').textContent()).toBe('2 directed links (1 two-way pair counted both ways)');
    await shootBothThemes(page, 'words-import');

    // A refused file lists every problem by its screen label.
    await page.goto(`${BASE_URL}/models`);
    await hydrated(page);
    const broken = { ...document, name: `Broken ${stamp}`, nodes: [{ id: 'alder' }, { id: 'alder' }], links: [{ from: 'alder', to: 'cedar', weight: 1 }] };
    await page.getByLabel('Import from a file (model document, JSON)').setInputFiles({ name: 'broken.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(broken)) });
    const refused = page.getByTestId('import-error');
    await expect.poll(() => refused.textContent()).toContain("Node 2 id: duplicate node id 'alder' (also Node 1)");
    expect(await refused.textContent()).toContain("Link 1 to: unknown node 'cedar'");
    expect(await refused.textContent()).not.toMatch(/nodes\[|links\[|\(and 1 more problem\)/);
    await shootBothThemes(page, 'words-import-refused');
    await context.close();
  }, 60_000);

  it('a new model with a taken name is told before saving, saved as "name (3)", and can be renamed from the notice', async () => {
    const { context, page } = await asModeler();
    await page.goto(`${BASE_URL}/models/new`);
    await hydrated(page);
    await page.getByLabel('Name', { exact: true }).fill(modelName.toUpperCase());
    const taken = page.getByTestId('name-taken');
    await expect.poll(() => taken.textContent(), { timeout: 10000 }).toContain(`it will be saved as “${modelName.toUpperCase()} (3)”`);
    expect(await taken.textContent()).toContain(`already has a model named “${modelName}”`);
    await shootBothThemes(page, 'words-name-taken');
    await page.getByLabel('Name', { exact: true }).fill(`${modelName} elsewhere`);
    await expect.poll(() => taken.count(), { timeout: 10000 }).toBe(0);
    await page.getByLabel('Name', { exact: true }).fill(modelName);
    await expect.poll(() => taken.count(), { timeout: 10000 }).toBe(1);

    await page.getByLabel('Rate expression').fill('a - x');
    await page.getByTestId('rate-unknowns').getByRole('button', { name: 'Add parameter a' }).click();
    await page.getByRole('button', { name: 'Add node' }).click();
    await page.getByTestId('save-model').click();
    await page.waitForURL(/\/models\/\d+\?renamedFrom=/, { timeout: 15000 });
    expect(await page.getByTestId('model-name').textContent()).toBe(`${modelName} (3)`);
    const notice = page.getByTestId('renamed-notice');
    expect(await notice.textContent()).toContain(`Saved as “${modelName} (3)”`);
    expect(await page.getByTestId('link-count').textContent()).toBe('0 directed links');
    expect(await page.locator('#summary-h + dl').textContent()).toContain('1 node (n1)');

    // Renaming onto another model's name is refused in words; a free name is taken.
    await notice.getByLabel('New name').fill(modelName);
    await notice.getByRole('button', { name: 'Rename' }).click();
    await page.waitForLoadState('load');
    expect(await page.locator('#rename-error').textContent()).toContain(`Name: the workspace already has a model named “${modelName}”`.replace(/[“”]/g, '"'));
    await shootBothThemes(page, 'words-rename-refused');
    await page.getByTestId('renamed-notice').getByLabel('New name').fill(`${modelName} single node`);
    await page.getByTestId('renamed-notice').getByRole('button', { name: 'Rename' }).click();
    await page.waitForURL(/renamed=1/, { timeout: 15000 });
    expect(await page.getByTestId('model-name').textContent()).toBe(`${modelName} single node`);
    expect(await page.getByTestId('renamed-done').textContent()).toBe(`Renamed to “${modelName} single node”.`);
    await context.close();
  }, 90_000);
  it('the Name field renames the model; onto another model\'s name it is refused in words and nothing is saved', async () => {
    const { context, page } = await asModeler();
    await page.goto(`${BASE_URL}${modelPath}/edit`);
    await hydrated(page);
    const name = page.getByLabel('Name', { exact: true });
    expect(await name.inputValue()).toBe(modelName);
    await name.fill(`${modelName} (2)`);
    const taken = page.getByTestId('name-taken');
    await expect.poll(() => taken.textContent(), { timeout: 10000 }).toContain(`already has a model named “${modelName} (2)”. Choose another name`);
    await page.getByLabel('Change note').fill('Rename');
    await page.getByTestId('save-model').click();
    await expect.poll(() => page.getByTestId('save-error').textContent(), { timeout: 10000 }).toContain('Not saved: the new name could not be stored');
    expect(await page.locator('#field-name-errors').textContent()).toContain(`the workspace already has a model named "${modelName} (2)"`);
    await shootBothThemes(page, 'words-rename-in-editor');
    const versionsBefore = await (await page.request.get(`${BASE_URL}/api/models/${modelPath.split('/').pop()}/versions`)).json();

    await name.fill(`${modelName} carr`);
    await expect.poll(() => taken.count(), { timeout: 10000 }).toBe(0);
    await page.getByTestId('save-model').click();
    await expect.poll(() => page.locator('.ed-save .ed-ok').textContent(), { timeout: 10000 }).toContain(`Saved as version ${versionsBefore.versions.length + 1}`);
    expect(await page.getByTestId('edit-heading-name').textContent()).toBe(`${modelName} carr`);
    expect(await page.title()).toContain(`Edit ${modelName} carr`);
    await page.goto(`${BASE_URL}${modelPath}`);
    expect(await page.getByTestId('model-name').textContent()).toBe(`${modelName} carr`);
    await context.close();
  }, 90_000);
});
