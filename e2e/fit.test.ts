import { expect, test, type Page } from '@playwright/test';

/**
 * The Fit screen end to end in Chromium: the demo lake's baseline is run on the Runs
 * screen, its invented monitoring data are read (preview counts, censored values), the
 * statistics are shown against the stored run, two parameters are calibrated in the
 * calibration worker with few iterations (progress, path, fitted values), and accepting
 * makes a new model revision. Screenshots at 1280×800 and 390×844.
 */

const DEMO = 'Lake Wendmoor: phosphorus cycle of an invented shallow lake';

function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (err) => errors.push(`pageerror: ${err.message}`));
  page.on('console', (msg) => {
    if (msg.type() === 'error') errors.push(`console: ${msg.text()}`);
  });
  return errors;
}

const revisionOf = async (page: Page) => Number(/revision (\d+)/.exec((await page.getByTestId('draft-status').textContent()) ?? '')?.[1]);

test('read the demo monitoring data, see the fit statistics, calibrate two parameters and accept the fit', async ({ page }) => {
  test.setTimeout(90_000);
  const errors = watchErrors(page);
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  const nav = page.getByRole('navigation', { name: 'Model screens' });
  await nav.getByRole('link', { name: 'Runs' }).click();
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 60_000 });

  await nav.getByRole('link', { name: 'Fit' }).click();
  await expect(page).toHaveURL(/\/fit$/);
  await expect(page.getByTestId('draft-status')).toContainText('revision');
  const before = await revisionOf(page);
  expect(before).toBeGreaterThanOrEqual(1);

  await page.getByRole('button', { name: "Use the demo lake's invented monitoring data" }).click();
  await expect(page.getByTestId('obs-file')).toContainText('demo-lake.observations.csv');
  await expect(page.getByTestId('obs-file')).toContainText('not yet archived');
  await expect(page.getByTestId('obs-summary')).toHaveText('270 data rows, 270 used in 180 dated values, no unreadable rows.');
  // Dissolved P below the detection limit, Secchi disks seen on the bottom: kept and counted.
  expect(Number(await page.getByTestId('below-DP').textContent())).toBeGreaterThan(0);
  expect(Number(await page.getByTestId('above-Secchi').textContent())).toBeGreaterThan(0);
  await expect(page.getByTestId('below-Chl')).toHaveText('0');
  // The mapping defaults from the engine's rules and can be changed.
  await expect(page.getByLabel('Series for TP')).toHaveValue('TP');

  // The statistics against the stored baseline run.
  await expect(page.getByTestId('fit-run').locator('option:checked')).toContainText('baseline');
  const stats = page.getByTestId('fit-stats');
  await expect(stats).toBeVisible();
  await expect(stats.getByTestId('stat-Chl-all')).toBeVisible();
  await expect(stats.getByTestId('stat-Chl-growing')).toBeVisible();
  const chlNse = Number(await stats.getByTestId('stat-Chl-all').getByTestId('nse').textContent());
  expect(Number.isFinite(chlNse)).toBe(true);
  await expect(page.getByTestId('fit-chart-Chl')).toBeVisible();
  await page.screenshot({ path: 'test-results/fit-1280-statistics.png', fullPage: false });
  await page.getByTestId('fit-chart-DP').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-1280-charts.png', fullPage: false });

  // Calibrate two parameters, by keyboard for one of them.
  await page.getByRole('checkbox', { name: /^muPhy = / }).check();
  await page.getByRole('checkbox', { name: /^kDIP = / }).focus();
  await page.keyboard.press('Space');
  await expect(page.getByRole('checkbox', { name: /^kDIP = / })).toBeChecked();
  await page.getByLabel('Most iterations').fill('3');
  await page.getByRole('button', { name: 'Calibrate 2 parameters' }).click();
  await expect(page.getByTestId('fit-progress')).toHaveText(/^Finished: objective \S+ → \S+ in \d+ iterations/, { timeout: 60_000 });
  const [b, a] = /objective (\S+) → (\S+) in/.exec((await page.getByTestId('fit-progress').textContent()) ?? '')!.slice(1).map(Number);
  expect(a).toBeLessThanOrEqual(b);
  await expect(page.getByTestId('fit-path')).toBeVisible();
  await expect(page.getByTestId('fit-result').getByTestId('fitted-muPhy')).toBeVisible();
  await expect(page.getByTestId('fit-warnings')).toBeVisible();
  await page.getByTestId('fit-path').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-1280-calibrated.png', fullPage: false });

  await page.getByRole('button', { name: 'Accept: write the fitted values into the model' }).click();
  await expect(page.getByTestId('fit-accepted')).toContainText(`Saved as revision ${before + 1}`);
  await expect(page.getByTestId('draft-status')).toContainText(`revision ${before + 1}`);
  // The revision's note names the file with the SHA-256 of its text, the values and the objective.
  await expect(page.getByTestId('fit-accepted')).toContainText(/Calibrated to demo-lake\.observations\.csv \(sha256:[0-9a-f]{64}\); muPhy 1\.6 → \S+, kDIP 3 → \S+; objective \S+ → \S+ after \d+ iterations?; .*NSE/);

  await page.setViewportSize({ width: 390, height: 844 });
  await page.getByTestId('fit-stats').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-statistics.png', fullPage: false });
  await page.getByTestId('fit-chart-Secchi').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-charts.png', fullPage: false });
  await page.getByTestId('fit-result').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-result.png', fullPage: false });
  expect(errors).toEqual([]);
});

test('a calibration can be cancelled and nothing changes', async ({ page }) => {
  test.setTimeout(90_000);
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  const nav = page.getByRole('navigation', { name: 'Model screens' });
  await nav.getByRole('link', { name: 'Runs' }).click();
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 60_000 });
  await nav.getByRole('link', { name: 'Fit' }).click();
  // Kept from the first load in this browser? A fresh context has nothing: load the demo data.
  await page.getByRole('button', { name: "Use the demo lake's invented monitoring data" }).click();
  await expect(page.getByTestId('fit-stats')).toBeVisible();
  const before = await revisionOf(page);
  await page.getByRole('checkbox', { name: /^muPhy = / }).check();
  await page.getByLabel('Most iterations').fill('50');
  await page.getByRole('button', { name: 'Calibrate 1 parameter' }).click();
  await expect(page.getByTestId('fit-progress')).toContainText('Calibrating');
  await page.getByRole('button', { name: 'Cancel calibration' }).click();
  await expect(page.getByTestId('fit-error')).toHaveText('The calibration was cancelled; nothing was changed.');
  await expect(page.getByRole('button', { name: 'Calibrate 1 parameter' })).toBeEnabled();
  expect(await revisionOf(page)).toBe(before);
});
