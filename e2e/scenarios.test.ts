import { expect, test, type Page } from '@playwright/test';
import { DEMO, watchErrors } from './support';

/**
 * The Scenarios screen on the demo lake (the seeded example "Lake Wendmoor"): a baseline
 * is there, a new scenario gets a fish removal from the catalogue, chosen by keyboard; its
 * sentence in a manager's words and its caution show as text; a cost is set; Save
 * revision gives a number and a digest; after a reload the same scenario is open with the
 * measure and its cost kept. Screenshots at 1280×800 and 390×844.
 */

async function openDemoScenarios(page: Page) {
  await page.goto('/');
  const open = page.getByRole('link', { name: `Open ${DEMO}`, exact: true });
  await expect(open).toBeVisible({ timeout: 20_000 });
  const href = await open.getAttribute('href');
  expect(href).toMatch(/\/models\/[^/]+\/build$/);
  await page.goto(href!.replace(/\/build$/, '/scenarios'));
  await expect(page.getByRole('heading', { name: /^Scenarios/, level: 2 })).toBeVisible();
}

const entries = (page: Page) => page.getByTestId('scenario-entry');

test('a fish removal from the catalogue shows its sentence, caution and cost, and is kept as a revision', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoScenarios(page);

  // The baseline is there and open; its key is in the address.
  const baseline = entries(page).filter({ hasText: 'baseline' });
  await expect(baseline).toHaveCount(1);
  await expect(baseline).toContainText('Lake Wendmoor, baseline');
  await expect(baseline.getByRole('link')).toHaveAttribute('aria-current', 'true');
  await expect(page).toHaveURL(/\/scenarios\?s=/);
  await expect(page.getByText('No measures: this scenario is a baseline.')).toBeVisible();
  // The shipped demo scenarios came along, with their measures in words.
  await expect(entries(page)).toHaveCount(4);
  await page.screenshot({ path: 'test-results/scenarios-baseline.png', fullPage: false });

  // A new empty scenario opens, in the address too.
  const baselineUrl = page.url();
  await page.getByRole('button', { name: 'New empty scenario' }).click();
  await expect(entries(page)).toHaveCount(5);
  await expect(page.getByLabel('Title', { exact: true })).toHaveValue('New scenario');
  await expect.poll(() => page.url()).not.toBe(baselineUrl);
  await page.getByLabel('Title', { exact: true }).fill('Fish out, three winters');

  // Choose the measure and its target by keyboard.
  const measure = page.getByLabel('Measure', { exact: true });
  await measure.focus();
  await measure.selectOption({ label: 'Fish removal (benthivorous fish)' });
  await expect(page.getByTestId('add-caution')).toContainText(/Caution:.*permit/);
  await expect(page.getByLabel('Acts on', { exact: true })).toHaveValue('BFI');
  await page.getByRole('button', { name: 'Add measure' }).focus();
  await page.keyboard.press('Enter');

  const card = page.getByTestId('measure-card');
  await expect(card).toHaveCount(1);
  await expect(card.getByTestId('measure-sentence')).toHaveText('Remove 75 % of benthivorous fish P (BFI) each February 2028–2030.');
  await expect(card.getByTestId('measure-caution')).toBeVisible();
  await expect(card.getByTestId('measure-caution')).toContainText('The model only projects');

  // Edit the share: the sentence follows.
  await card.getByLabel('Share removed').fill('80');
  await expect(card.getByTestId('measure-sentence')).toHaveText('Remove 80 % of benthivorous fish P (BFI) each February 2028–2030.');

  // A cost for it.
  await card.getByLabel('Amount', { exact: true }).fill('180000');
  await card.getByLabel('Cost note (optional)').fill('three campaigns, invented');
  await expect(page.getByTestId('cost-total')).toContainText('EUR 180,000');
  await expect(page.getByTestId('scenario-problems')).toContainText('The scenario is valid for this model.');
  await page.screenshot({ path: 'test-results/scenarios-measure.png', fullPage: false });
  await page.screenshot({ path: 'test-results/scenarios-measure-full.png', fullPage: true });

  // Save revision: number and short digest.
  await page.getByRole('button', { name: 'Save revision' }).click();
  await expect(page.getByTestId('scenario-commit-result')).toContainText(/Saved as revision 2, digest sha256:[0-9a-f]{12}/);
  const scenarioUrl = page.url();
  expect(scenarioUrl).toMatch(/\?s=/);

  // Reload: the same scenario is open with the measure and cost kept.
  await page.reload();
  await expect(page.getByLabel('Title', { exact: true })).toHaveValue('Fish out, three winters');
  expect(page.url()).toBe(scenarioUrl);
  const kept = page.getByTestId('measure-card');
  await expect(kept.getByTestId('measure-sentence')).toHaveText('Remove 80 % of benthivorous fish P (BFI) each February 2028–2030.');
  await expect(kept.getByTestId('measure-caution')).toBeVisible();
  await expect(kept.getByLabel('Amount', { exact: true })).toHaveValue('180000');
  await expect(page.getByTestId('scenario-revision-state')).toContainText(/Newest revision: 2 sha256:[0-9a-f]{12}/);
  await expect(page.getByTestId('scenario-revision-state')).toContainText('The draft is the same as it.');

  // Phone size.
  await page.setViewportSize({ width: 390, height: 844 });
  await expect(page.getByRole('link', { name: 'Go to the open scenario' })).toBeVisible();
  await page.screenshot({ path: 'test-results/scenarios-phone-top.png', fullPage: false });
  await kept.scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/scenarios-phone.png', fullPage: false });
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow).toBeLessThanOrEqual(0);

  expect(errors).toEqual([]);
});

test('removing a measure and deleting a scenario can be undone', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoScenarios(page);
  await entries(page).filter({ hasText: 'fish removal over three winters' }).getByRole('link').click();
  const card = page.getByTestId('measure-card');
  await expect(card).toHaveCount(1);
  await expect(card.getByTestId('measure-sentence')).toHaveText('Remove 80 % of benthivorous fish P (BFI) each February 2028–2030.');
  await expect(card.getByLabel('Amount', { exact: true })).toHaveValue('210000');

  await card.getByRole('button', { name: 'Remove measure fishOut' }).click();
  await expect(card).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Undo' })).toBeFocused();
  await page.keyboard.press('Enter');
  await expect(card).toHaveCount(1);
  await expect(card.getByLabel('Amount', { exact: true })).toHaveValue('210000');

  await page.getByRole('button', { name: /^Delete Lake Wendmoor: benthivorous fish removal/ }).click();
  await expect(entries(page)).toHaveCount(3);
  await page.getByRole('button', { name: 'Undo' }).click();
  await expect(entries(page)).toHaveCount(4);
  expect(errors).toEqual([]);
});
