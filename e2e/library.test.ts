import { readFile } from 'node:fs/promises';
import { expect, test, type Locator, type Page } from '@playwright/test';
import { watchErrors } from './support';

/**
 * The Models page: the examples on first start, a new model from an example, rename,
 * export and re-import with the same digest, a refused file with nothing added, delete
 * and undo, all by the page's own controls (and the keyboard).
 */

const TITLES = [
  'Lake Wendmoor: phosphorus cycle of an invented shallow lake',
  'Lake Ambrel: one-box phosphorus model',
  'Tessel Mere: closed nutrient-phytoplankton-zooplankton-detritus model'
];

const entries = (page: Page) => page.getByTestId('entry');
const titles = (page: Page) => page.getByTestId('entry-title');

async function openModels(page: Page) {
  await page.goto('/');
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lake Ledger');
  await expect(entries(page)).toHaveCount(3);
}

/** Import a file through the file chooser the import field opens. */
async function chooseFile(page: Page, file: string | { name: string; mimeType: string; buffer: Buffer }) {
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.getByLabel('Model file (.json)').click()]);
  await chooser.setFiles(file);
}

async function digestOf(entry: Locator): Promise<string> {
  return (await entry.getByTestId('entry-digest').textContent()) ?? '';
}

test('first start shows the three examples, the demo lake first, with the tagline and the footnote', async ({ page }) => {
  const errors = watchErrors(page);
  await openModels(page);
  await expect(page.getByText("Compartment models of a lake's phosphorus, restoration scenarios")).toBeVisible();
  await expect(titles(page)).toHaveText(TITLES);
  const demo = entries(page).first();
  await expect(demo.getByTestId('entry-model-id')).toHaveText('demo_lake');
  await expect(demo.getByTestId('entry-revision')).toHaveText('revision 1');
  await expect(demo.getByTestId('entry-digest')).toHaveText(/^sha256:[0-9a-f]{12}$/);
  await expect(demo.getByTestId('entry-draft')).toHaveText('no draft changes');
  for (const action of ['Rename', 'Duplicate', 'Export', 'Delete']) {
    await expect(page.getByRole('button', { name: `${action} ${TITLES[0]}`, exact: true })).toBeVisible();
  }
  await expect(page.getByRole('link', { name: `Open ${TITLES[0]}`, exact: true })).toHaveAttribute('href', /\/models\/[^/]+\/build$/);
  await expect(page.locator('#invented')).toContainText('invented');
  await page.screenshot({ path: 'test-results/models.png', fullPage: true });

  // A reload does not seed again.
  await page.reload();
  await expect(entries(page)).toHaveCount(3);
  expect(errors).toEqual([]);
});

test('the Models page fits a 390×844 phone screen without sideways scrolling', async ({ page }) => {
  const errors = watchErrors(page);
  await page.setViewportSize({ width: 390, height: 844 });
  await openModels(page);
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/models-mobile.png', fullPage: true });
  expect(errors).toEqual([]);
});

test('a model from the demo is renamed, exported and re-imported with the same digest', async ({ page }) => {
  const errors = watchErrors(page);
  await openModels(page);

  await page.getByLabel('Example').selectOption({ label: TITLES[0] });
  await page.getByRole('button', { name: 'Add example' }).click();
  await expect(entries(page)).toHaveCount(4);
  await expect(page.getByTestId('library-message')).toHaveText(`Added '${TITLES[0]}' from the examples.`);
  const mine = entries(page).first();
  await expect(mine.getByRole('link', { name: `Open ${TITLES[0]}` })).toBeFocused();

  // Rename in place: Escape cancels, Enter saves (a revision of its own).
  await mine.getByRole('button', { name: /^Rename / }).click();
  const field = page.getByRole('textbox', { name: `New title for ${TITLES[0]}` });
  await expect(field).toBeFocused();
  await field.fill('Wendmoor, my scenarios');
  await field.press('Escape');
  await expect(mine.getByTestId('entry-title')).toHaveText(TITLES[0]);
  await expect(mine.getByRole('button', { name: /^Rename / })).toBeFocused();
  await page.keyboard.press('Enter');
  await page.getByRole('textbox', { name: /^New title for / }).fill('   ');
  await page.keyboard.press('Enter');
  await expect(mine.getByRole('alert')).toHaveText('A title cannot be empty.');
  await page.screenshot({ path: 'test-results/models-rename.png' });
  await page.getByRole('textbox', { name: /^New title for / }).fill('Wendmoor, my scenarios');
  await page.keyboard.press('Enter');
  await expect(mine.getByTestId('entry-title')).toHaveText('Wendmoor, my scenarios');
  await expect(mine.getByTestId('entry-revision')).toHaveText('revision 2');
  await expect(mine.getByTestId('entry-draft')).toHaveText('no draft changes');
  const digest = await digestOf(mine);
  expect(digest).toMatch(/^sha256:[0-9a-f]{12}$/);
  expect(digest).not.toBe(await digestOf(entries(page).nth(1)));

  // Export: a download named after the model id, pretty JSON of the renamed model.
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Export Wendmoor, my scenarios', exact: true }).click()
  ]);
  expect(download.suggestedFilename()).toBe('demo_lake.model.json');
  const file = await download.path();
  const text = await readFile(file, 'utf8');
  expect(JSON.parse(text)).toMatchObject({ id: 'demo_lake', title: 'Wendmoor, my scenarios' });
  expect(text.split('\n')[1]).toBe('  "format": "lakeledger.model/1",');

  // Import the same file: a new entry, revision 1, with the very same digest.
  await chooseFile(page, { name: 'demo_lake.model.json', mimeType: 'application/json', buffer: Buffer.from(text) });
  await expect(entries(page)).toHaveCount(5);
  await expect(page.getByTestId('library-message')).toHaveText("Imported 'Wendmoor, my scenarios' from demo_lake.model.json.");
  const imported = entries(page).first();
  await expect(imported.getByTestId('entry-revision')).toHaveText('revision 1');
  await expect(imported.getByText('imported', { exact: true })).toBeVisible();
  expect(await digestOf(imported)).toBe(digest);
  expect(errors).toEqual([]);
});

test('a bad file is refused with its problems and nothing is added', async ({ page }) => {
  const errors = watchErrors(page);
  await openModels(page);
  const twoIds = '{\n  "format": "lakeledger.model/1",\n  "id": "twins",\n  "states": [\n    { "id": "TP", "id": "TP2", "unit": "mg/m^3" }\n  ]\n}\n';
  await chooseFile(page, { name: 'twins.model.json', mimeType: 'application/json', buffer: Buffer.from(twoIds) });
  const problems = page.getByTestId('import-problems');
  await expect(problems.getByRole('heading')).toHaveText('✗ twins.model.json was not imported, nothing was added: 1 problem.');
  await expect(problems.getByRole('listitem')).toHaveText([/^states\[0\]\.id: the key 'id' appears twice in one object \(line 5\)/]);
  await expect(entries(page)).toHaveCount(3);
  await page.screenshot({ path: 'test-results/models-refused.png', fullPage: true });

  // A file that is JSON but not a valid model: each problem with its path.
  const invalid = JSON.stringify({ format: 'lakeledger.model/1', id: 'half', conserved: { element: 'P', unit: 'kg' }, parameters: [], states: [], flows: [] });
  await chooseFile(page, { name: 'half.json', mimeType: 'application/json', buffer: Buffer.from(invalid) });
  await expect(problems.getByRole('heading')).toContainText('half.json was not imported, nothing was added');
  await expect(problems.getByRole('listitem').first()).toContainText('states');
  await expect(entries(page)).toHaveCount(3);

  await problems.getByRole('button', { name: 'Dismiss' }).click();
  await expect(problems).toHaveCount(0);
  await expect(page.getByLabel('Model file (.json)')).toBeFocused();
  await page.reload();
  await expect(entries(page)).toHaveCount(3);
  expect(errors).toEqual([]);
});

test('delete says what goes with the model, and Undo (by keyboard) brings all of it back', async ({ page }) => {
  const errors = watchErrors(page);
  await openModels(page);
  const before = await digestOf(entries(page).nth(1));

  await page.getByRole('button', { name: `Delete ${TITLES[1]}`, exact: true }).click();
  await expect(entries(page)).toHaveCount(2);
  const notice = page.getByTestId('deletion-notice');
  await expect(notice).toContainText(`Deleted '${TITLES[1]}' with its 1 revision.`);
  const undo = notice.getByRole('button', { name: `Undo deleting ${TITLES[1]}` });
  await expect(undo).toBeFocused();
  await page.screenshot({ path: 'test-results/models-deleted.png' });
  await page.keyboard.press('Enter');
  await expect(notice).toHaveCount(0);
  await expect(titles(page)).toHaveText(TITLES);
  expect(await digestOf(entries(page).nth(1))).toBe(before);
  await expect(page.getByTestId('library-message')).toHaveText(`Restored '${TITLES[1]}'.`);

  // Without undo the deletion stays, and a reload does not bring the example back.
  await page.getByRole('button', { name: `Delete ${TITLES[2]}`, exact: true }).click();
  await expect(entries(page)).toHaveCount(2);
  await notice.getByRole('button', { name: 'Dismiss' }).click();
  await page.reload();
  await expect(entries(page)).toHaveCount(2);
  await expect(titles(page)).toHaveText(TITLES.slice(0, 2));
  expect(errors).toEqual([]);
});

test('a new empty model asks for a title and gets an id from it', async ({ page }) => {
  const errors = watchErrors(page);
  await openModels(page);
  await page.getByRole('button', { name: 'Create empty model' }).click();
  await expect(page.getByRole('alert')).toHaveText('A title cannot be empty.');
  await expect(entries(page)).toHaveCount(3);
  await page.getByLabel('Title', { exact: true }).fill('North basin');
  await page.keyboard.press('Enter');
  await expect(entries(page)).toHaveCount(4);
  await expect(entries(page).first().getByTestId('entry-model-id')).toHaveText('north_basin');
  await page.getByRole('button', { name: 'Duplicate North basin', exact: true }).click();
  await expect(entries(page)).toHaveCount(5);
  await expect(entries(page).first().getByTestId('entry-title')).toHaveText('North basin (copy)');
  await expect(entries(page).first().getByTestId('entry-model-id')).toHaveText('north_basin_copy');
  expect(errors).toEqual([]);
});
