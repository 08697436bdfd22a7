import { expect, test, type Page } from '@playwright/test';
import { DEMO, watchErrors } from './support';

/**
 * Never losing work, in the real browser: a save refused because the storage is full is
 * reported, the edit stays on screen and is saved once the storage takes it again; two
 * pages on the same model see each other's saves and never overwrite them blindly.
 * The full storage is simulated: IndexedDB's put and add throw the browser's own
 * QuotaExceededError while the page's flag `__lakeledgerFullDisk` is set.
 */

async function openDemoBuild(page: Page): Promise<string> {
  await page.goto('/');
  await page.getByRole('link', { name: `Open ${DEMO}`, exact: true }).click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/build$/);
  await expect(page.getByTestId('problem-summary')).toContainText('No problems');
  return page.url();
}

/** The stored draft's value of parameter kDIP, read from IndexedDB (null without a draft). */
async function storedKdip(page: Page): Promise<unknown> {
  const key = decodeURIComponent(new URL(page.url()).pathname.split('/')[2]);
  return page.evaluate(
    (entryKey) =>
      new Promise<unknown>((resolve, reject) => {
        const open = indexedDB.open('lakeledger');
        open.onerror = () => reject(open.error);
        open.onsuccess = () => {
          const get = open.result.transaction('drafts').objectStore('drafts').get(entryKey);
          get.onsuccess = () => {
            const doc = get.result?.doc;
            resolve(doc ? doc.parameters.find((p: { id: string }) => p.id === 'kDIP').value : null);
            open.result.close();
          };
          get.onerror = () => reject(get.error);
        };
      }),
    key
  );
}

test('a save refused by a full storage is reported, the edit stays, and it is saved once there is room', async ({ page }) => {
  const errors = watchErrors(page);
  await page.addInitScript(() => {
    const w = window as unknown as { __lakeledgerFullDisk: boolean };
    w.__lakeledgerFullDisk = false;
    for (const name of ['put', 'add'] as const) {
      const original = IDBObjectStore.prototype[name];
      IDBObjectStore.prototype[name] = function (this: IDBObjectStore, ...args: Parameters<typeof original>) {
        if (w.__lakeledgerFullDisk) throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
        return original.apply(this, args);
      } as typeof original;
    }
  });
  const url = await openDemoBuild(page);
  await page.evaluate(() => ((window as unknown as { __lakeledgerFullDisk: boolean }).__lakeledgerFullDisk = true));

  const value = page.getByLabel('value of parameter kDIP', { exact: true });
  await value.fill('4.2');
  const alert = page.getByTestId('save-error');
  await expect(alert).toContainText("Your edit is not saved yet: the browser's storage for this site is full.");
  await expect(alert).toContainText('saving is tried again in');
  await expect(value).toHaveValue('4.2');
  expect(await storedKdip(page)).toBeNull();
  await page.screenshot({ path: 'test-results/save-error.png' });

  // Room again: "Try again now" saves it, the message goes, and a reload shows the edit.
  await page.evaluate(() => ((window as unknown as { __lakeledgerFullDisk: boolean }).__lakeledgerFullDisk = false));
  await alert.getByRole('button', { name: 'Try again now' }).click();
  await expect(alert).toHaveCount(0);
  await expect.poll(() => storedKdip(page)).toBe(4.2);
  await page.goto(url);
  await expect(page.getByLabel('value of parameter kDIP', { exact: true })).toHaveValue('4.2');
  expect(errors).toEqual([]);
});

test('two pages on one model: a save in one shows in the other; edits in both are never overwritten blindly', async ({ page, context }) => {
  const errors = watchErrors(page);
  const url = await openDemoBuild(page);
  const other = await context.newPage();
  const otherErrors = watchErrors(other);
  await other.goto(url);
  await expect(other.getByLabel('value of parameter kDIP', { exact: true })).toHaveValue('3');

  // An edit saved in the first page appears in the second, which had no edits of its own.
  await page.getByLabel('value of parameter kDIP', { exact: true }).fill('3.5');
  await expect.poll(() => storedKdip(page)).toBe(3.5);
  await expect(other.getByLabel('value of parameter kDIP', { exact: true })).toHaveValue('3.5');
  await expect(other.getByTestId('tab-notice')).toContainText('changed in another tab');

  // Now both edit: the second page's save finds the first page's newer draft and asks.
  await other.getByLabel('value of parameter kDIP', { exact: true }).fill('2.5');
  await page.getByLabel('value of parameter kDIP', { exact: true }).fill('4');
  await expect
    .poll(async () => (await page.getByTestId('tab-conflict').count()) + (await other.getByTestId('tab-conflict').count()))
    .toBe(1);
  const stored = await storedKdip(page);
  expect([2.5, 4]).toContain(stored);
  // The page that was asked keeps its own edit on screen until the user chooses.
  const asked = (await page.getByTestId('tab-conflict').count()) ? page : other;
  const mine = asked === page ? '4' : '2.5';
  await expect(asked.getByLabel('value of parameter kDIP', { exact: true })).toHaveValue(mine);
  await asked.getByRole('button', { name: 'Keep mine and save it' }).click();
  await expect.poll(() => storedKdip(page)).toBe(Number(mine));
  await other.close();
  expect(errors).toEqual([]);
  expect(otherErrors).toEqual([]);
});
