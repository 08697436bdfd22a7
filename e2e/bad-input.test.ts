import { expect, test, type Page } from '@playwright/test';
import { BAD_FILES, MARKUP_FILES } from '../test/fixtures/bad-input';

/**
 * The bad-input catalogue in the real browser: each file is imported on the Models page,
 * its message is shown, and the library is unchanged; files with markup in their strings
 * are shown as text and run nothing. (The file larger than any document is left to the
 * unit test: building 50 MB in the test process proves nothing more.)
 */

const entries = (page: Page) => page.getByTestId('entry');

async function chooseFile(page: Page, name: string, text: string) {
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.getByLabel('Model file (.json)').click()]);
  await chooser.setFiles({ name, mimeType: 'application/json', buffer: Buffer.from(text) });
}

test('every bad file of the catalogue is refused with its message and nothing is added', async ({ page }) => {
  test.setTimeout(120_000);
  const errors: string[] = [];
  page.on('pageerror', (err) => errors.push(`pageerror: ${err.message}`));
  await page.goto('/');
  await expect(entries(page)).toHaveCount(3);
  const problems = page.getByTestId('import-problems');
  for (const [what, code, text] of BAD_FILES) {
    if (code === 'too_large') continue;
    await chooseFile(page, 'bad.json', text);
    await expect(problems.getByRole('heading'), what).toContainText('bad.json was not imported, nothing was added');
    await expect(problems.getByRole('listitem').first(), what).not.toBeEmpty();
    await expect(entries(page), what).toHaveCount(3);
    await problems.getByRole('button', { name: 'Dismiss' }).click();
  }
  expect(errors).toEqual([]);
});

test('markup in a title or label is shown as text and runs nothing', async ({ page }) => {
  await page.goto('/');
  await expect(entries(page)).toHaveCount(3);
  for (const [, text] of MARKUP_FILES) {
    await chooseFile(page, 'markup.json', text);
    await expect(page.getByTestId('library-message')).toContainText("Imported '");
  }
  await expect(entries(page)).toHaveCount(3 + MARKUP_FILES.length);
  await expect(page.getByTestId('entry-title').filter({ hasText: '<img src=x onerror="window.__pwned=1">' })).toHaveCount(1);
  await expect(page.getByTestId('entry-title').filter({ hasText: '<script>window.__pwned=1</script>' })).toHaveCount(1);
  // Open the one with the label on every screen that shows labels.
  await page.getByRole('link', { name: /^Open / }).first().click();
  for (const screen of ['Build', 'Balances', 'Scheme']) {
    await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: screen }).click();
    await page.waitForTimeout(300);
  }
  expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
  expect(await page.locator('img[src="x"]').count()).toBe(0);
});
