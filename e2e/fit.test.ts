import { readFileSync } from 'node:fs';
import { expect, test, type Page } from '@playwright/test';
import { DEMO, watchErrors } from './support';

/**
 * The Fit screen end to end in Chromium.
 *
 * 1. A monitoring CSV for the demo lake (invented: the shipped file with chlorophyll renamed
 *    `Chla`, so it must be mapped by hand, and three more chlorophyll rows at a second
 *    station, one of them below the detection limit) is read through the file input and
 *    stored as an observation set; the renamed name is mapped, the preview and the fit
 *    statistics show, one station is chosen, a calibration of two parameters is cancelled
 *    (its best point so far is kept and shown) and another is accepted: a new model revision
 *    and a calibration record, found in the model's history and in the Archive's log. After a
 *    reload the stored sets are listed and the one the fit used is chosen; a set is deleted
 *    and brought back with Undo.
 * 2. The demo's shipped file (preview counts, censored values, the baseline run) and the
 *    move of a file kept in localStorage by an earlier version into the library.
 * Screenshots at 1280×800 and 390×844.
 */

const FILE = 'wendmoor-monitoring.csv';

/** The invented file: the demo's rows with `Chl` renamed, plus chlorophyll at station North (one below the limit). */
function monitoringCsv(): string {
  const demo = readFileSync('static/examples/demo-lake.observations.csv', 'utf8');
  return (
    demo.replace(/,Chl,/g, ',Chla,').trimEnd() +
    '\n2027-07-03,Chla,58.0,ug/L,0.5,North,\n2028-01-20,Chla,<1,ug/L,0.5,North,\n2029-07-03,Chla,63.5,ug/L,0.5,North,\n'
  );
}

const revisionOf = async (page: Page) => Number(/revision (\d+)/.exec((await page.getByTestId('draft-status').textContent()) ?? '')?.[1]);

async function openFitAfterBaseline(page: Page) {
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  const nav = page.getByRole('navigation', { name: 'Model screens' });
  await nav.getByRole('link', { name: 'Runs' }).click();
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 60_000 });
  await nav.getByRole('link', { name: 'Fit' }).click();
  await expect(page).toHaveURL(/\/fit$/);
  await expect(page.getByTestId('draft-status')).toContainText('revision');
  return nav;
}

test('import a monitoring CSV, map it, choose a station, cancel one calibration, accept another, and find the revision and its record', async ({ page }) => {
  test.setTimeout(180_000);
  const errors = watchErrors(page);
  const nav = await openFitAfterBaseline(page);
  const before = await revisionOf(page);
  expect(before).toBeGreaterThanOrEqual(1);
  await expect(page.getByTestId('obs-sets-none')).toBeVisible();

  // Read the file through the file input: stored at once, with the engine's default mapping.
  await page.getByTestId('obs-input').setInputFiles({ name: FILE, mimeType: 'text/csv', buffer: Buffer.from(monitoringCsv(), 'utf8') });
  await expect(page.getByTestId('obs-notice')).toHaveText(new RegExp(`^Stored ${FILE.replace('.', '\\.')} as observation set obs_[0-9a-f]{16}; it is now in use\\.$`));
  await expect(page.getByTestId('obs-set')).toHaveCount(1);
  const firstSet = (await page.getByTestId('obs-set').first().getAttribute('data-set-id'))!;
  await expect(page.getByTestId('obs-file')).toContainText(FILE);
  await expect(page.getByTestId('obs-file')).not.toContainText('archived');
  // `Chla` is no series id or role: its rows are listed, not dropped.
  await expect(page.getByLabel('Series for Chla')).toHaveValue('');
  await expect(page.getByLabel('Series for TP')).toHaveValue('TP');
  await expect(page.getByTestId('obs-summary')).toHaveText('273 data rows, 225 used in 135 dated values, 48 rows could not be read.');
  await expect(page.getByTestId('obs-problems').locator('li').first()).toContainText("unknown variable 'Chla'");

  // Map it by hand: every row is read, the below-limit chlorophyll at North is counted.
  await page.getByLabel('Series for Chla').selectOption('Chl');
  await expect(page.getByTestId('obs-summary')).toHaveText('273 data rows, 273 used in 183 dated values, no unreadable rows.');
  await expect(page.getByTestId('below-Chl')).toHaveText('1');
  expect(Number(await page.getByTestId('below-DP').textContent())).toBeGreaterThan(0);
  expect(Number(await page.getByTestId('above-Secchi').textContent())).toBeGreaterThan(0);
  await expect(page.getByTestId('obs-pending')).toContainText('which series each name means');
  await page.getByRole('button', { name: `Store, replacing ${firstSet}` }).click();
  await expect(page.getByTestId('obs-notice')).toContainText(`in place of ${firstSet}`);
  await expect(page.getByTestId('obs-pending')).toHaveCount(0);
  await expect(page.getByTestId('obs-set')).toHaveCount(1);
  const mappedSet = (await page.getByTestId('obs-set').first().getAttribute('data-set-id'))!;
  expect(mappedSet).not.toBe(firstSet);

  // The fit statistics against the stored baseline run.
  await expect(page.getByTestId('fit-run').locator('option:checked')).toContainText('baseline');
  const stats = page.getByTestId('fit-stats');
  await expect(stats.getByTestId('stat-Chl-all')).toBeVisible();
  await expect(stats.getByTestId('stat-Chl-growing')).toBeVisible();
  expect(Number.isFinite(Number(await stats.getByTestId('stat-Chl-all').getByTestId('nse').textContent()))).toBe(true);
  await expect(page.getByTestId('fit-chart-Chl')).toBeVisible();

  // One station: the other stations' rows are left out (and counted), the North chlorophyll with them.
  await page.getByRole('radio', { name: 'One station only' }).check();
  await page.getByLabel('Station', { exact: true }).selectOption('Deep');
  await expect(page.getByTestId('obs-summary')).toHaveText('273 data rows, 180 used in 180 dated values, no unreadable rows, 93 left out by the station or depth choice.');
  await expect(page.getByTestId('below-Chl')).toHaveText('0');
  await expect(page.getByTestId('above-Secchi')).toHaveText('0');
  await expect(page.getByTestId('obs-pending')).toContainText('the station choice');
  await page.getByTestId('obs-combine').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-1280-observations.png', fullPage: false });

  // Calibrate two parameters (one by keyboard), and cancel: the best point so far is kept and shown.
  await page.getByRole('checkbox', { name: /^muPhy = / }).check();
  await page.getByRole('checkbox', { name: /^kDIP = / }).focus();
  await page.keyboard.press('Space');
  await expect(page.getByRole('checkbox', { name: /^kDIP = / })).toBeChecked();
  await page.getByLabel('Most iterations').fill('50');
  // Eighteen more parameters for the run to cancel: 21 runs an iteration and 40 more for the
  // checks at the end (about 25 ms each), so the search lasts seconds on any machine and the
  // cancel (seen within half a second) lands while it is still going.
  const params = page.getByRole('group', { name: 'Parameters to fit (with their ranges)' }).getByRole('checkbox');
  const extra: number[] = [];
  for (let i = 0; extra.length < 18; i++) if (!(await params.nth(i).isChecked())) extra.push(i);
  for (const i of extra) await params.nth(i).check();
  await page.getByRole('button', { name: 'Calibrate 20 parameters' }).click();
  // cancel as soon as the first iteration reports
  await expect(page.getByTestId('fit-progress')).toHaveText(/Calibrating… iteration \d+/, { timeout: 60_000 });
  await page.getByRole('button', { name: 'Cancel calibration' }).click();
  await expect(page.getByTestId('fit-progress')).toHaveText(/^Cancelled early after \d+ iterations? \(\d+ runs\): the best point so far has objective \S+ → \S+\.$/, { timeout: 15_000 });
  const [cb, ca] = /objective (\S+) → (\S+)\./.exec((await page.getByTestId('fit-progress').textContent()) ?? '')!.slice(1).map(Number);
  expect(ca).toBeLessThanOrEqual(cb);
  await expect(page.getByTestId('fit-result')).toHaveAttribute('data-status', 'cancelled');
  await expect(page.getByTestId('fit-result').getByTestId('fitted-muPhy')).toBeVisible();
  await expect(page.getByTestId('fit-path')).toBeVisible();
  await expect(page.getByTestId('fit-warnings')).toContainText('Cancelled early');
  await expect(page.getByRole('button', { name: 'Accept the best point so far (cancelled early)' })).toBeEnabled();
  await expect(page.getByRole('button', { name: 'Calibrate 20 parameters' })).toBeEnabled();
  expect(await revisionOf(page)).toBe(before);
  await page.getByTestId('fit-path').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-1280-cancelled.png', fullPage: false });

  // Run again with the two parameters and few iterations, and accept: a revision and a calibration record.
  for (const i of extra) await params.nth(i).uncheck();
  await page.getByLabel('Most iterations').fill('3');
  await page.getByRole('button', { name: 'Calibrate 2 parameters' }).click();
  await expect(page.getByTestId('fit-progress')).toHaveText(/^Finished: objective \S+ → \S+ in \d+ iterations/, { timeout: 90_000 });
  const [b, a] = /objective (\S+) → (\S+) in/.exec((await page.getByTestId('fit-progress').textContent()) ?? '')!.slice(1).map(Number);
  expect(a).toBeLessThanOrEqual(b);
  await expect(page.getByTestId('fit-result')).toHaveAttribute('data-status', 'ok');
  await expect(page.getByTestId('fit-warnings')).toBeVisible();
  // the linearised 95 % interval of each fitted value, or why there is none
  for (const id of ['muPhy', 'kDIP']) await expect(page.getByTestId(`interval-${id}`)).toHaveText(/^(\S+ to \S+|not bounded by these data)$/);
  await page.getByRole('button', { name: 'Accept: write the fitted values into the model' }).click();
  await expect(page.getByTestId('fit-accepted')).toContainText(`Saved as revision ${before + 1}`);
  await expect(page.getByTestId('draft-status')).toContainText(`revision ${before + 1}`);
  // The note names the file with the SHA-256 of its text, how it was read and the stored set, the values and the objective.
  await expect(page.getByTestId('fit-accepted')).toContainText(
    /Calibrated to wendmoor-monitoring\.csv \(sha256:[0-9a-f]{64}; station Deep only, all depths averaged; set obs_[0-9a-f]{16}\); muPhy 1\.6 → \S+, kDIP 3 → \S+; objective \S+ → \S+ after \d+ iterations?; .*NSE/
  );
  await expect(page.getByTestId('fit-record')).toHaveText(new RegExp(`^Calibration cal_[0-9a-f]{16} stored; revision ${before + 1}\\. See it in the Archive's log\\.$`));
  const calId = /cal_[0-9a-f]{16}/.exec((await page.getByTestId('fit-record').textContent()) ?? '')![0];
  await expect(page.locator(`[data-testid="stored-calibration"][data-calibration-id="${calId}"]`)).toContainText(`revision ${before + 1}`);
  // The station choice the fit used was stored as a set of its own, and is in use.
  await expect(page.getByTestId('obs-set')).toHaveCount(2);
  const deepSet = (await page.locator('[data-testid="obs-set"][data-chosen="true"]').getAttribute('data-set-id'))!;
  expect(deepSet).not.toBe(mappedSet);
  await expect(page.locator(`[data-testid="obs-set"][data-set-id="${deepSet}"]`)).toContainText('station Deep only');
  await expect(page.getByTestId('obs-pending')).toHaveCount(0);
  await page.getByTestId('fit-accepted').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-1280-accepted.png', fullPage: false });

  // The record in the Archive's log, the observation sets beside it.
  await page.getByTestId('fit-record').getByRole('link', { name: "See it in the Archive's log" }).click();
  await expect(page).toHaveURL(/\/archive$/);
  await expect(page.getByTestId('log-entry').filter({ hasText: calId })).toContainText(`revision ${before + 1}`);
  // stored once (the revision's entry names it too, in the fit's note)
  await expect(page.locator('[data-testid="log-entry"][data-action="run"]').filter({ hasText: deepSet })).toHaveCount(1);
  // The new revision in the model's history, with the fit's note.
  await nav.getByRole('link', { name: 'Build' }).click();
  await page.getByRole('button', { name: /Show history/ }).click();
  await expect(page.locator('#bt-history')).toContainText('Calibrated to wendmoor-monitoring.csv');

  // After a reload the stored sets are listed and the one the fit used is chosen, with its station.
  await nav.getByRole('link', { name: 'Fit' }).click();
  // the link is the app's own navigation: wait for it, or the reload reloads Build
  await expect(page).toHaveURL(/\/fit$/);
  await page.reload();
  await expect(page.getByTestId('obs-set')).toHaveCount(2);
  await expect(page.locator('[data-testid="obs-set"][data-chosen="true"]')).toHaveAttribute('data-set-id', deepSet);
  await expect(page.getByRole('radio', { name: 'One station only' })).toBeChecked();
  await expect(page.getByLabel('Station', { exact: true })).toHaveValue('Deep');
  await expect(page.getByLabel('Series for Chla')).toHaveValue('Chl');
  await expect(page.getByTestId('obs-summary')).toContainText('180 used in 180 dated values');
  await expect(page.locator(`[data-testid="stored-calibration"][data-calibration-id="${calId}"]`)).toBeVisible();

  // Choosing the other set re-applies its reading; deleting it offers Undo, which brings it back.
  const mixedRow = page.locator(`[data-testid="obs-set"][data-set-id="${mappedSet}"]`);
  await mixedRow.getByRole('radio').check();
  await expect(page.getByRole('radio', { name: /^Average all stations/ })).toBeChecked();
  await expect(page.getByTestId('obs-summary')).toContainText('273 used in 183 dated values');
  await mixedRow.getByRole('button', { name: /^Delete/ }).click();
  await expect(page.getByTestId('obs-undo')).toContainText(`Deleted the observation set ${FILE} (${mappedSet}`);
  await expect(page.getByTestId('obs-set')).toHaveCount(1);
  await expect(page.locator('[data-testid="obs-set"][data-chosen="true"]')).toHaveAttribute('data-set-id', deepSet);
  await page.getByTestId('obs-undo').getByRole('button', { name: 'Undo' }).click();
  await expect(page.getByTestId('obs-set')).toHaveCount(2);
  await expect(page.locator('[data-testid="obs-set"][data-chosen="true"]')).toHaveAttribute('data-set-id', mappedSet);

  // An ensemble drawn from the calibration's intervals (Uncertainty: Ranges).
  await nav.getByRole('link', { name: 'Uncertainty' }).click();
  await page.getByTestId('range-source').selectOption(calId);
  await expect(page.getByTestId('range-hint')).toContainText(`accepted as revision ${before + 1}`);
  await page.getByTestId('members').fill('6');
  await page.getByTestId('start').click();
  await expect(page.getByTestId('design-ranges')).toContainText(`calibration ${calId}`);
  await expect(page.getByTestId('progress')).toHaveAttribute('data-done', '6', { timeout: 60_000 });
  await nav.getByRole('link', { name: 'Fit' }).click();

  await page.setViewportSize({ width: 390, height: 844 });
  await page.getByTestId('obs-sets').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-sets.png', fullPage: false });
  await page.getByTestId('obs-combine').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-combine.png', fullPage: false });
  expect(errors).toEqual([]);
});

test("the demo's shipped file, and a file kept in localStorage by an earlier version moved into the library", async ({ page }) => {
  test.setTimeout(120_000);
  const errors = watchErrors(page);
  await openFitAfterBaseline(page);
  const key = decodeURIComponent(/\/models\/([^/]+)\/fit$/.exec(page.url())![1]);

  // A copy as the earlier screen kept it: moved into the library once, and the key removed.
  const small = 'date,variable,value,unit\n2027-05-12,Sichttiefe,0.6,m\n2027-06-18,Sichttiefe,0.5,m\n';
  await page.evaluate(
    ([k, text]) => localStorage.setItem(`lakeledger.fit-observations.${k}`, JSON.stringify({ fileName: 'old-secchi.csv', digest: 'sha256:ignored', text, mapping: { Sichttiefe: 'Secchi' }, loadedAt: '2027-01-01T00:00:00Z' })),
    [key, small]
  );
  await page.reload();
  await expect(page.getByTestId('obs-notice')).toContainText('old-secchi.csv, kept in this browser by an earlier version of this screen, is now stored with the model as observation set obs_');
  expect(await page.evaluate((k) => localStorage.getItem(`lakeledger.fit-observations.${k}`), key)).toBeNull();
  await expect(page.getByTestId('obs-set')).toHaveCount(1);
  await expect(page.getByLabel('Series for Sichttiefe')).toHaveValue('Secchi');
  await expect(page.getByTestId('obs-summary')).toHaveText('2 data rows, 2 used in 2 dated values, no unreadable rows.');
  await page.reload();
  await expect(page.getByTestId('obs-set')).toHaveCount(1);
  await expect(page.getByTestId('obs-notice')).toHaveText('');

  // The shipped file: preview counts, censored values kept, the statistics against the baseline run.
  await page.getByRole('button', { name: "Use the demo lake's invented monitoring data" }).click();
  await expect(page.getByTestId('obs-notice')).toContainText('Stored demo-lake.observations.csv as observation set');
  await expect(page.getByTestId('obs-set')).toHaveCount(2);
  await expect(page.getByTestId('obs-file')).toContainText('demo-lake.observations.csv');
  await expect(page.getByTestId('obs-summary')).toHaveText('270 data rows, 270 used in 180 dated values, no unreadable rows.');
  expect(Number(await page.getByTestId('below-DP').textContent())).toBeGreaterThan(0);
  expect(Number(await page.getByTestId('above-Secchi').textContent())).toBeGreaterThan(0);
  await expect(page.getByTestId('below-Chl')).toHaveText('0');
  await expect(page.getByLabel('Series for TP')).toHaveValue('TP');
  await expect(page.getByTestId('fit-run').locator('option:checked')).toContainText('baseline');
  await expect(page.getByTestId('fit-stats').getByTestId('stat-Chl-all')).toBeVisible();
  await page.screenshot({ path: 'test-results/fit-1280-statistics.png', fullPage: false });
  await page.getByTestId('fit-chart-DP').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-1280-charts.png', fullPage: false });
  // The same file read the same way is one set: reading it again chooses the stored one.
  await page.getByRole('button', { name: "Use the demo lake's invented monitoring data" }).click();
  await expect(page.getByTestId('obs-notice')).toContainText('was stored already');
  await expect(page.getByTestId('obs-set')).toHaveCount(2);

  await page.setViewportSize({ width: 390, height: 844 });
  await page.getByTestId('fit-stats').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-statistics.png', fullPage: false });
  await page.getByTestId('fit-chart-Secchi').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/fit-390-charts.png', fullPage: false });
  expect(errors).toEqual([]);
});
