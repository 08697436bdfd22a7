import { expect, test } from '@playwright/test';
import { DEMO, watchErrors } from './support';

/**
 * The Uncertainty screen end to end in Chromium: the demo lake's baseline and its combined
 * option (fish removal and load cut) as a 100-member ensemble in the worker pool: progress
 * with time left, a cancel that keeps the members done (partial), the partial ensemble
 * stored with its members' series, resume by keyboard to the end of the same design, the
 * percentile bands, the share meeting a target with its interval, the paired difference and
 * the "not stored yet" note. The whole ensemble is stored without the members' series; after
 * a reload both stored ensembles are listed: the partial one reopens resumable, the whole one
 * with the same bands, shares and paired differences as before; both are deleted (the first
 * after a "Keep"). Screenshots at 1280×800 and 390×844. Then a small Morris screening
 * (r = 2 over the demo lake's 61 ranged inputs: 124 runs) is started with its method and
 * settings named, cancelled, resumed and ranked.
 */

const N = 100;

test('ensemble of baseline and combined option: progress, cancel, resume, bands and shares, stored and reopened', async ({ page }) => {
  test.setTimeout(300_000);
  const errors = watchErrors(page);
  await page.setViewportSize({ width: 1280, height: 800 });
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Uncertainty' }).click();
  await expect(page).toHaveURL(/\/uncertainty$/);
  await expect(page.getByRole('heading', { name: 'Ensemble', exact: true })).toBeVisible();
  await expect(page.getByTestId('caution')).toContainText('local rules and licensed practice');

  // Defaults: 100 members, a seed shown; the baseline and the combined option are chosen.
  await expect(page.getByTestId('members')).toHaveValue('100');
  await expect(page.getByTestId('seed')).toHaveValue(/^\d+$/);
  await expect(page.getByTestId('scenario-baseline')).toBeChecked();
  await expect(page.getByTestId('scenario-load_and_fish')).toBeChecked();
  await expect(page.getByTestId('scenario-fish_removal')).not.toBeChecked();

  // Too few scenarios is refused in words.
  await page.getByTestId('scenario-load_and_fish').uncheck();
  await page.getByTestId('start').click();
  await expect(page.getByRole('alert')).toContainText('at least two scenarios');
  await page.getByTestId('scenario-load_and_fish').check();

  await page.getByTestId('members').fill(String(N));
  await page.getByTestId('seed').fill('4242');
  const t0 = Date.now();
  await page.getByTestId('start').click();

  // Progress with a time left, then cancel after the first members.
  const progress = page.getByTestId('progress');
  await expect(progress).toHaveAttribute('data-total', String(N));
  await expect(progress).toContainText(/left/);
  await expect.poll(async () => Number(await progress.getAttribute('data-done')), { timeout: 60_000 }).toBeGreaterThanOrEqual(2);
  await expect(progress).toContainText(/about \d+ (s|min)|under 5 s/);
  await page.getByTestId('cancel').click();
  await expect(progress).toHaveAttribute('data-partial', 'yes');
  await expect(page.getByTestId('partial')).toBeVisible();
  const kept = Number(await progress.getAttribute('data-done'));
  expect(kept).toBeGreaterThanOrEqual(2);
  expect(kept).toBeLessThan(N);
  await expect(page.getByTestId('not-stored')).toContainText('not stored yet');
  // the members kept are drawn already
  await expect(page.getByTestId('band-chart-chlorophyll')).toBeVisible();

  // Store the partial ensemble with its members' series (so it can resume after reopening).
  await expect(page.getByTestId('no-stored')).toBeVisible();
  const keep = page.getByTestId('keep-series');
  await expect(keep).not.toBeChecked();
  await keep.check();
  await page.getByTestId('store-ensemble').click();
  const note = page.getByTestId('store-note');
  await expect(note).toContainText(new RegExp(`^Stored as ens_[0-9a-f]{16}: ${kept} of ${N} members \\(partial\\) under 2 scenarios, about [\\d.]+ (bytes|kB|MB) as JSON text, with each member's series\\. It is in the archive log \\(entry \\d+\\)`));
  const partialId = /ens_[0-9a-f]{16}/.exec((await note.textContent()) ?? '')![0];
  const stored = page.getByTestId('stored-ensemble');
  await expect(stored).toHaveCount(1);
  await expect(stored.first()).toHaveAttribute('data-ensemble-id', partialId);
  await expect(stored.first()).toContainText(`${kept} of ${N} members (partial)`);
  await expect(stored.first().getByTestId('series-kept')).toHaveText('kept');
  await keep.uncheck();

  // Resume by keyboard: the same design (seed 4242) to the end.
  const resume = page.getByTestId('resume');
  await expect(resume).toContainText(`${N - kept} members left, seed 4242`);
  await resume.focus();
  await page.keyboard.press('Enter');
  await expect(progress).toHaveAttribute('data-done', String(N), { timeout: 180_000 });
  await expect(progress).toHaveAttribute('data-partial', 'no');
  await expect(progress).toContainText('Complete.');
  const seconds = (Date.now() - t0) / 1000;
  console.log(`uncertainty e2e: ${N} members × 2 scenarios in ${seconds.toFixed(1)} s (incl. cancel and resume)`);

  // Bands of the three roles.
  for (const role of ['chlorophyll', 'totalP', 'secchi']) await expect(page.getByTestId(`band-chart-${role}`)).toBeVisible();
  await expect(page.getByTestId('band-chart-chlorophyll').getByRole('img')).toHaveAttribute('aria-label', new RegExp(`\\(${N} members\\) ends with median`));

  // The chlorophyll outcome: set a target, see shares with intervals and the paired difference.
  const chl = page.getByTestId('outcome-chlorophyll.last');
  await expect(chl).toContainText('share of parameter sets meeting the target (a probability only under the assumed ranges)'.replace(/^s/, 'S'));
  const rows = chl.getByTestId('outcome-row');
  await expect(rows).toHaveCount(2);
  await expect(rows.nth(0).getByTestId('share')).toHaveText('set a target');
  await chl.getByLabel(/Target \(at most/).fill('1000');
  await expect(rows.nth(0).getByTestId('share')).toContainText(`100 % (${N} of ${N}); 95 % interval`);
  await chl.getByLabel(/Target \(at most/).fill('0');
  await expect(rows.nth(0).getByTestId('share')).toContainText(`0 % (0 of ${N}); 95 % interval 0 % to`);
  await chl.getByLabel(/Target \(at most/).fill('40');
  await expect(rows.nth(1).getByTestId('share')).toContainText(new RegExp(`\\d+ % \\(\\d+ of ${N}\\);\\s+95 % interval \\d+ % to \\d+ %`));
  await expect(rows.nth(0).getByTestId('paired')).toHaveText('(the baseline)');
  await expect(rows.nth(1).getByTestId('paired')).toContainText(new RegExp(`-?\\d.* \\(.* to .*\\), ${N} pairs`));

  await expect(page.getByTestId('problems')).toContainText(/None|failed/);
  await page.screenshot({ path: 'test-results/uncertainty-1280.png', fullPage: true });
  await page.getByTestId('band-chart-chlorophyll').screenshot({ path: 'test-results/uncertainty-1280-chl.png' });

  // What the page shows now, to be seen again after reopening.
  const ROLES = ['chlorophyll', 'totalP', 'secchi'];
  const bandWords = async () => Promise.all(ROLES.map((role) => page.getByTestId(`band-chart-${role}`).getByRole('img').getAttribute('aria-label')));
  const outcomeWords = async () => Promise.all([0, 1].flatMap((i) => [rows.nth(i).getByTestId('share').innerText(), rows.nth(i).getByTestId('paired').innerText()]));
  const bandsBefore = await bandWords();
  const outcomesBefore = await outcomeWords();
  const problemsBefore = await page.getByTestId('problems').innerText();
  expect(outcomesBefore[2]).toMatch(/\d+ % \(\d+ of 100\);\s+95 % interval \d+ % to \d+ %/);

  // Store the whole ensemble without the members' series (the default).
  await expect(keep).not.toBeChecked();
  await page.getByTestId('store-ensemble').click();
  await expect(note).toContainText(new RegExp(`^Stored as ens_[0-9a-f]{16}: ${N} of ${N} members under 2 scenarios, about [\\d.]+ (kB|MB) as JSON text, bands and each member's indicator values, without the members' series\\. It is in the archive log \\(entry \\d+\\)`));
  const wholeId = /ens_[0-9a-f]{16}/.exec((await note.textContent()) ?? '')![0];
  expect(wholeId).not.toBe(partialId);
  const sizeText = /about [\d.]+ (kB|MB)/.exec((await note.textContent()) ?? '')![0];
  console.log(`uncertainty e2e: ${N} members stored without series: ${sizeText}`);

  // Reload: the page forgets the ensemble; the list has both, newest first.
  await page.reload();
  await expect(page.getByRole('heading', { name: 'Stored ensembles' })).toBeVisible();
  await expect(stored).toHaveCount(2);
  await expect(page.getByTestId('progress')).toHaveCount(0);
  await expect(stored.nth(0)).toHaveAttribute('data-ensemble-id', wholeId);
  await expect(stored.nth(0)).toContainText(`${N} of ${N} members, complete`);
  await expect(stored.nth(0)).toContainText('4242');
  await expect(stored.nth(0)).toContainText('Lake Wendmoor, baseline: present load, no measures; Lake Wendmoor: fish removal and external load cut by half');
  await expect(stored.nth(0).getByTestId('series-kept')).toHaveText('not kept (bands only)');
  await expect(stored.nth(1)).toHaveAttribute('data-ensemble-id', partialId);

  // The partial one with its series reopens resumable: the same design, the members kept.
  await stored.nth(1).getByTestId('open-ensemble').click();
  await expect(page.getByTestId('opened')).toContainText(`the ensemble ${partialId}`);
  await expect(progress).toHaveAttribute('data-done', String(kept));
  await expect(progress).toHaveAttribute('data-partial', 'yes');
  await expect(page.getByTestId('resume')).toContainText(`${N - kept} members left, seed 4242`);
  await expect(page.getByTestId('resume')).not.toHaveAttribute('aria-disabled', 'true');
  await expect(page.getByTestId('resume-refusal')).toHaveCount(0);
  await expect(page.getByTestId('band-chart-chlorophyll').getByRole('img')).toHaveAttribute('aria-label', new RegExp(`\\(${kept} members\\) ends with median`));

  // The whole one: the same bands, shares (for the same target) and paired differences.
  await stored.nth(0).getByTestId('open-ensemble').click();
  await expect(page.getByTestId('opened')).toContainText(`the ensemble ${wholeId}`);
  await expect(page.getByTestId('opened')).toContainText("without its members' series");
  await expect(progress).toHaveAttribute('data-done', String(N));
  await expect(progress).toContainText('Complete.');
  await expect(page.getByTestId('model-changed')).toHaveCount(0);
  await expect(page.getByTestId('resume')).toHaveCount(0);
  await expect(page.getByTestId('members')).toHaveValue(String(N));
  await expect(page.getByTestId('seed')).toHaveValue('4242');
  for (const role of ROLES) await expect(page.getByTestId(`band-chart-${role}`)).toBeVisible();
  expect(await bandWords()).toEqual(bandsBefore);
  await expect(rows.nth(1).getByTestId('share')).toHaveText('set a target');
  await chl.getByLabel(/Target \(at most/).fill('40');
  expect(await outcomeWords()).toEqual(outcomesBefore);
  expect(await page.getByTestId('problems').innerText()).toBe(problemsBefore);
  // it is stored already: nothing to store until members are added
  await expect(page.getByTestId('store')).toHaveCount(0);
  await page.screenshot({ path: 'test-results/uncertainty-1280-reopened.png', fullPage: true });

  // Delete with a confirm step: Keep leaves it; Delete for good removes it.
  const whole = stored.nth(0);
  await whole.getByTestId('delete-ensemble').click();
  await expect(whole.getByRole('group')).toContainText('Delete it for good?');
  await expect(whole.getByRole('button', { name: 'Keep' })).toBeFocused();
  await whole.getByRole('button', { name: 'Keep' }).click();
  await expect(stored).toHaveCount(2);
  await whole.getByTestId('delete-ensemble').click();
  await whole.getByTestId('confirm-delete').click();
  await expect(stored).toHaveCount(1);
  await expect(page.getByTestId('deleted-note')).toContainText(`Deleted the ensemble ${wholeId}`);
  await stored.nth(0).getByTestId('delete-ensemble').click();
  await stored.nth(0).getByTestId('confirm-delete').click();
  await expect(page.getByTestId('no-stored')).toBeVisible();
  // the last one opened stays on the page, no longer stored
  await expect(page.getByTestId('not-stored')).toBeVisible();

  // Sensitivity: the method and its settings are named; a start shows progress and can be cancelled.
  const morris = page.getByTestId('morris');
  await page.getByTestId('morris-r').fill('2');
  await expect(morris).toContainText(/Δ = 0\.667; \d+ inputs with a range, so \d+ runs/);
  await page.getByTestId('morris-start').click();
  await expect(page.getByTestId('morris-method')).toContainText('Method: Morris elementary effects, r = 2 trajectories, p = 4 levels, Δ = 0.667, seed 1');
  await expect(page.getByTestId('morris-progress')).toContainText(/0 of 2.*trajectories/);
  await page.getByTestId('morris-cancel').click();
  await expect(page.getByTestId('morris-progress')).toContainText('Partial: cancelled');
  await expect(page.getByTestId('morris-resume')).toContainText('2 trajectories left');
  // Resume to the end (2 × 62 runs): the ranked bars of μ* with σ and the table.
  await page.getByTestId('morris-resume').click();
  await expect(page.getByTestId('morris-progress')).toContainText('Complete.', { timeout: 90_000 });
  await expect(page.getByTestId('morris-chart').getByRole('img')).toHaveAttribute('aria-label', /^Inputs ranked by μ\*: 1\. \w+ \(μ\* [\d.e+-]+, σ /);
  await expect(page.getByTestId('morris-table').locator('tbody tr')).toHaveCount(61);
  await page.getByTestId('morris').screenshot({ path: 'test-results/uncertainty-1280-morris.png' });
  await page.setViewportSize({ width: 390, height: 844 });
  // the charts follow the narrower frame on their next resize
  await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
  await page.screenshot({ path: 'test-results/uncertainty-390.png', fullPage: true });
  await chl.screenshot({ path: 'test-results/uncertainty-390-outcome.png' });
  // nothing wider than the phone's screen but the scrolling tables
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth);
  expect(overflow).toBeLessThanOrEqual(390);
  await page.getByTestId('morris').screenshot({ path: 'test-results/uncertainty-390-morris.png' });
  expect(errors).toEqual([]);
});
