import { readFileSync } from 'node:fs';
import { gunzipSync, gzipSync } from 'node:zlib';
import { expect, test, type Page } from '@playwright/test';
import { verifyBundle } from '../src/lib/archive/bundle';

/**
 * The archive in Chromium: the baseline's run record verifies and reproduces bit for bit,
 * a note is logged, a run changed behind the app's back is named by Verify, and a bundle
 * exported here (gzip, read back with Node's zlib and verified) imports into a fresh
 * browser profile all or nothing: added, then skipped, and a tampered copy refused.
 */

const DEMO = 'Lake Wendmoor: phosphorus cycle of an invented shallow lake';

function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (err) => errors.push(`pageerror: ${err.message}`));
  return errors;
}

async function openDemo(page: Page, screen: string) {
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: screen, exact: true }).click();
}

test('verify, reproduce, note, tamper, export and import a bundle', async ({ page, browser }) => {
  test.setTimeout(150_000);
  const errors = watchErrors(page);
  await openDemo(page, 'Runs');
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 60_000 });
  const runId = (await page.getByTestId('stored-run').first().getAttribute('data-run-id'))!;
  // A second run to archive: the load cut alone.
  await page.getByRole('checkbox', { name: /^Lake Wendmoor, baseline/ }).uncheck();
  await page.getByRole('checkbox', { name: /^Lake Wendmoor: external load cut by half/ }).check();
  await page.getByRole('button', { name: 'Run the picked scenario' }).click();
  await expect(page.getByTestId('stored-run')).toHaveCount(2, { timeout: 60_000 });

  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Archive' }).click();
  await page.getByTestId('user-label').fill('A. Limnologist');
  await page.getByTestId('user-label').press('Tab');
  await page.getByTestId('verify').click();
  await expect(page.getByTestId('verify-result')).toHaveAttribute('data-ok', 'true');
  await expect(page.getByTestId('verify-result')).toContainText('Everything holds');

  const record = page.locator(`[data-testid="record"][data-run-id="${runId}"]`);
  await record.getByRole('button', { name: 'Reproduce' }).click();
  await expect(record.getByTestId('reproduce-result')).toHaveAttribute('data-verdict', 'identical', { timeout: 60_000 });
  await record.getByPlaceholder('a note for the log').fill('Figure 2 of the advice to the water board');
  await record.getByRole('button', { name: 'Add note' }).click();
  await expect(page.getByTestId('log-entry').first()).toContainText('A. Limnologist · noted on run');
  await page.screenshot({ path: 'test-results/archive.png', fullPage: true });

  // The bundle: gzip, verified outside the browser.
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-bundle').click()]);
  const gz = readFileSync((await download.path())!);
  expect([gz[0], gz[1]]).toEqual([0x1f, 0x8b]);
  const bundleText = gunzipSync(gz).toString('utf8');
  const bundle = JSON.parse(bundleText);
  expect(bundle.format).toBe('lakeledger.bundle/1');
  expect(bundle.runs.map((r: { id: string }) => r.id)).toContain(runId);
  expect(bundle.runs).toHaveLength(2);
  expect(verifyBundle(bundle)).toEqual([]);
  expect(bundle.log.some((e: { action: string }) => e.action === 'note')).toBe(true);

  // A run changed behind the app's back is named.
  await page.evaluate(
    (id) =>
      new Promise<void>((resolve, reject) => {
        const open = indexedDB.open('lakeledger');
        open.onsuccess = () => {
          const tx = open.result.transaction('runData', 'readwrite');
          const store = tx.objectStore('runData');
          const get = store.get(id);
          get.onsuccess = () => {
            const row = get.result;
            row.columns[0][100] = row.columns[0][100] * 1.01;
            store.put(row);
          };
          tx.oncomplete = () => {
            open.result.close();
            resolve();
          };
          tx.onerror = () => reject(tx.error);
        };
      }),
    runId
  );
  await page.getByTestId('verify').click();
  await expect(page.getByTestId('verify-result')).toHaveAttribute('data-ok', 'false');
  await expect(page.locator('[data-testid="verify-finding"][data-code="record_digest"]')).toContainText(runId);

  // A fresh profile: the bundle imports, then is skipped, and a tampered copy is refused.
  const fresh = await browser.newContext();
  const other = await fresh.newPage();
  const otherErrors = watchErrors(other);
  await openDemo(other, 'Archive');
  const choose = async (name: string, buffer: Buffer) => {
    await other.getByTestId('import-bundle').setInputFiles({ name, mimeType: 'application/gzip', buffer });
  };
  await choose('advice.lakeledger.json.gz', gz);
  await expect(other.getByTestId('import-result')).toContainText(`Imported`);
  await expect(other.getByTestId('import-result')).toContainText(`run ${runId}`);
  await expect(other.locator(`[data-testid="record"][data-run-id="${runId}"]`)).toBeVisible();
  await choose('advice.lakeledger.json.gz', gz);
  await expect(other.getByTestId('import-result')).toContainText('Nothing new');
  const tampered = JSON.parse(bundleText);
  tampered.runs[0].closure.relativeResidual = 0;
  await choose('tampered.lakeledger.json.gz', gzipSync(Buffer.from(JSON.stringify(tampered))));
  await expect(other.getByTestId('import-result')).toContainText('Refused, nothing was written: the bundle fails its checks');
  await choose('truncated.lakeledger.json.gz', gz.subarray(0, Math.floor(gz.length / 2)));
  await expect(other.getByTestId('import-result')).toContainText('could not be read');
  await other.getByTestId('verify').click();
  await expect(other.getByTestId('verify-result')).toHaveAttribute('data-ok', 'true');
  await fresh.close();
  expect(errors).toEqual([]);
  expect(otherErrors).toEqual([]);
});
