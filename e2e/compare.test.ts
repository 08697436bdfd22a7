import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { expect, test } from '@playwright/test';
import Papa from 'papaparse';
import { DEMO, watchErrors } from './support';

/**
 * The scenarios issue end to end in Chromium: the four demo options are run through the
 * worker pool with progress, one is cancelled and run again, all four are compared, the
 * combined option shows lower growing-season chlorophyll than the baseline in the table,
 * and the indicator CSV is exported and read back. The comparison is screenshotted.
 */

const TITLES = {
  baseline: 'Lake Wendmoor, baseline: present load, no measures',
  combined: 'Lake Wendmoor: fish removal and external load cut by half',
  fishOnly: 'Lake Wendmoor: benthivorous fish removal over three winters'
};

test('run the four demo options, cancel one and run it again, compare them and export the indicators', async ({ page }) => {
  test.setTimeout(180_000);
  const errors = watchErrors(page);
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Runs' }).click();
  await expect(page).toHaveURL(/\/runs$/);
  // The first visit runs the baseline by itself.
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 60_000 });
  await page.getByRole('button', { name: 'Clear finished' }).click();

  // All four options at once: they queue for the pool's workers, each with its progress.
  await page.getByRole('button', { name: 'Pick all' }).click();
  await page.getByRole('button', { name: 'Run the 4 picked scenarios' }).click();
  const jobs = page.getByTestId('job');
  await expect(jobs).toHaveCount(4);
  // The newest job is listed first; with fewer workers than runs it waits or runs now.
  const last = jobs.first();
  await expect(last.getByRole('progressbar')).toBeVisible();
  await last.getByRole('button', { name: 'Cancel' }).click();
  await expect(last.getByTestId('job-status')).toHaveText('cancelled');
  await expect(last.getByRole('button', { name: 'Run again' })).toBeFocused();
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('job-status')).toHaveText(['finished', 'finished', 'finished', 'finished'], { timeout: 120_000 });
  for (const c of await page.getByTestId('job-closure').allTextContents()) expect(c).toMatch(/^closed, \S+ of throughput$/);

  // Four stored runs (the baseline's second run is the same run, stored once), each closed.
  const stored = page.getByTestId('stored-run');
  await expect(stored).toHaveCount(4);
  for (const c of await page.getByTestId('stored-closure').allTextContents()) expect(c).toMatch(/closed, \S+ of throughput/);
  const idOf = async (title: string) => (await stored.filter({ hasText: title }).getAttribute('data-run-id'))!;
  const baselineId = await idOf(TITLES.baseline);
  const combinedId = await idOf(TITLES.combined);
  const fishOnlyId = await idOf(TITLES.fishOnly);

  // Pick all four for Compare.
  for (const box of await page.getByRole('checkbox', { name: /^Compare / }).all()) await box.check();
  await page.getByTestId('compare-picked').click();
  await expect(page).toHaveURL(/\/compare\?runs=/);
  const table = page.getByTestId('indicator-table');
  await expect(table.locator('tbody tr')).toHaveCount(4, { timeout: 30_000 });
  await expect(page.locator('[data-drawn-ms]')).toHaveCount(1, { timeout: 30_000 });
  for (const role of ['chlorophyll', 'totalP', 'dissolvedP', 'secchi']) await expect(page.getByTestId(`compare-chart-${role}`)).toBeVisible();

  // The table: growing-season chlorophyll over the last five years, combined below baseline.
  const cell = (runId: string) => table.locator(`tr[data-run-id="${runId}"] td[data-indicator="chlorophyll.last"] .value`);
  const number = async (runId: string) => Number(((await cell(runId).textContent()) ?? '').replace(/[^0-9.]/g, ''));
  const base = await number(baselineId);
  const combined = await number(combinedId);
  expect(base).toBeGreaterThan(0);
  expect(combined).toBeGreaterThan(0);
  expect(combined).toBeLessThan(base);
  // Fish removal alone relapses: the relapse indicator names the year it is back (long-run issue).
  await expect(table.locator(`tr[data-run-id="${fishOnlyId}"] td[data-indicator="relapse"]`)).toHaveText(/^20\d\d \(/);
  await expect(table.locator(`tr[data-run-id="${combinedId}"] td[data-indicator="relapse"]`)).toContainText('none to the end');

  // A target line the manager sets, then the screenshot of the comparison.
  await page.getByTestId('target-chlorophyll').fill('25');
  await page.waitForTimeout(300);
  await page.screenshot({ path: 'test-results/compare-four.png', fullPage: true });

  // The indicators as CSV: read back, with the header naming model, runs and digests.
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-csv-indicators').click()]);
  const text = readFileSync((await download.path())!, 'utf8');
  expect(text).toMatch(/^# /);
  expect(text).toContain(combinedId);
  expect(text).toMatch(/sha256:[0-9a-f]{64}/);
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, comments: '#', skipEmptyLines: true });
  expect(parsed.errors).toEqual([]);
  const chl = (runId: string) => Number(parsed.data.find((r) => r.run === runId && r.indicator === 'chlorophyll.last')?.value);
  expect(chl(combinedId)).toBeLessThan(chl(baselineId));
  expect(Math.abs(chl(baselineId) - base) / base).toBeLessThan(0.01);

  // The printable report of the same runs: options in words with the fish caution, the
  // table, and on paper none of the app's navigation.
  await page.getByTestId('open-report').click();
  await expect(page).toHaveURL(/\/report\?runs=.*&target=25/);
  const report = page.getByTestId('report');
  await expect(report.getByTestId('report-table').locator('tbody tr')).toHaveCount(4);
  await expect(report.getByText(/^Remove 80 % of benthivorous fish/)).toHaveCount(2);
  await expect(report.locator('.caution').first()).toContainText('Caution:');
  await expect(report).toContainText('no legal threshold is built in');
  await expect(report).toContainText(combinedId);
  await page.emulateMedia({ media: 'print' });
  await expect(page.getByRole('navigation', { name: 'Model screens' })).toBeHidden();
  await expect(page.getByRole('button', { name: 'Print or save as PDF' })).toBeHidden();
  const pdf = await page.pdf({ path: 'test-results/report.pdf', format: 'A4', printBackground: true });
  expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
  // The printed text (poppler's pdftotext) names the digests, the run ids and the cautions.
  const printed = execFileSync('pdftotext', ['-layout', 'test-results/report.pdf', '-'], { encoding: 'utf8' });
  expect(printed).toMatch(/sha256:[0-9a-f]{64}/);
  expect(printed).toContain(combinedId);
  expect(printed).toContain('Caution:');
  expect(printed).toMatch(/permits/);
  await page.emulateMedia({ media: 'screen' });
  // No ensemble yet: the report says the spread is not shown, and where to get it.
  await expect(report).toContainText('the spread that uncertain rates give is not shown here');

  // An ensemble of the baseline and the combined option, stored: the report shows the spread
  // of chlorophyll-a and the share of parameter sets meeting the target, with its words.
  const reportUrl = page.url();
  const nav = page.getByRole('navigation', { name: 'Model screens' });
  await nav.getByRole('link', { name: 'Uncertainty' }).click();
  await page.getByTestId('members').fill('8');
  await page.getByTestId('start').click();
  await expect(page.getByTestId('progress')).toHaveAttribute('data-done', '8', { timeout: 60_000 });
  await page.getByRole('button', { name: /Store this ensemble/ }).click();
  await expect(page.getByTestId('stored-ensembles').locator('tbody tr')).toHaveCount(1);
  await page.goto(reportUrl);
  const spread = page.getByTestId('report-spread');
  await expect(spread).toContainText('Run again with 8 sets of the uncertain rates');
  await expect(spread.locator('tbody tr')).toHaveCount(2);
  await expect(spread.locator('tbody tr').nth(1)).toContainText(/\d+ of 8 \(\d+ %; 95 % interval \d+–\d+ %\)/);
  await expect(spread).toContainText('a probability only under the ranges assumed');
  expect(errors).toEqual([]);
});
