import { expect, test, type Page } from '@playwright/test';
import { DEMO, watchErrors } from './support';

/**
 * The Build screen on the demo lake, by the page's own controls and the keyboard:
 * problems at their field and in the summary as you type, a fix kept across a reload, a
 * number typed as text, completion of names, a forcing table from pasted rows with dates,
 * remove and undo, Save revision, the history and Restore, and both screen sizes.
 * Every test starts in a fresh browser profile, where the Models page adds the examples.
 */

/** Opens the Models page (which adds the examples on first start) and the demo lake's Build screen. */
async function openDemoBuild(page: Page): Promise<string> {
  await page.goto('/');
  const open = page.getByRole('link', { name: `Open ${DEMO}`, exact: true });
  await expect(open).toBeVisible();
  await open.click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/build$/);
  await expect(page.getByRole('heading', { name: /^Parameters/ })).toBeVisible();
  await expect(summary(page)).toContainText('No problems');
  return page.url();
}

const summary = (page: Page) => page.getByTestId('problem-summary');
const draftStatus = (page: Page) => page.getByTestId('draft-status');

/** The draft of the open model as the library holds it in IndexedDB (null before one is saved). */
async function storedDraft(page: Page): Promise<Record<string, any> | null> {
  const key = decodeURIComponent(new URL(page.url()).pathname.split('/')[2]);
  return page.evaluate(
    (entryKey) =>
      new Promise<Record<string, any> | null>((resolve, reject) => {
        const open = indexedDB.open('lakeledger');
        open.onerror = () => reject(open.error);
        open.onsuccess = () => {
          const get = open.result.transaction('drafts').objectStore('drafts').get(entryKey);
          get.onsuccess = () => {
            resolve(get.result ? get.result.doc : null);
            open.result.close();
          };
          get.onerror = () => reject(get.error);
        };
      }),
    key
  );
}

/** Waits until the library holds the draft with the edit (the session writes it after a short pause). */
async function draftHolds(page: Page, read: (doc: Record<string, any>) => unknown, expected: unknown) {
  await expect.poll(async () => {
    const doc = await storedDraft(page);
    return doc ? read(doc) : undefined;
  }).toEqual(expected);
}

test('a rate with a wrong unit is an error at its field and in the summary; the fix is kept after a reload', async ({ page }) => {
  const errors = watchErrors(page);
  const url = await openDemoBuild(page);

  const rate = page.getByLabel('rate of flow phySettle', { exact: true });
  await expect(rate).toHaveValue('vsPhy / zMean * PHY');
  await expect(rate).not.toHaveAttribute('aria-invalid');

  // Drop the division by the depth: m/d times mg/m^3 is not mg/m^3/d.
  await rate.fill('vsPhy * PHY');
  await expect(rate).toHaveAttribute('aria-invalid', 'true');
  const describedBy = await rate.getAttribute('aria-describedby');
  expect(describedBy).toBeTruthy();
  const message = page.locator(`[id="${describedBy}"]`);
  await expect(message).toContainText('Error:');
  await expect(message).toContainText('the rate of flow phySettle has the unit');
  await expect(message).toContainText('but must be in mg/m^3/d');
  await expect(summary(page)).toContainText('1 error');
  const entry = summary(page).getByRole('button', { name: 'Flow phySettle, rate' });
  await expect(entry).toBeVisible();
  await expect(draftStatus(page)).toContainText('1 problem');

  // The summary entry takes focus to the field.
  await page.getByRole('heading', { name: /^Problems/ }).focus();
  await entry.click();
  await expect(rate).toBeFocused();
  await page.screenshot({ path: 'test-results/build-error-1280.png' });

  // Fix it another way than it was, so the reload shows the edit itself was kept.
  await rate.fill('vsPhy * PHY / zMean');
  await expect(rate).not.toHaveAttribute('aria-invalid');
  await expect(summary(page)).toContainText('No problems');
  await expect(summary(page).getByRole('button')).toHaveCount(0);
  await draftHolds(page, (d) => d.flows[9].rate, 'vsPhy * PHY / zMean');

  await page.goto(url);
  await expect(page.getByLabel('rate of flow phySettle', { exact: true })).toHaveValue('vsPhy * PHY / zMean');
  await expect(summary(page)).toContainText('No problems');
  await expect(draftStatus(page)).toContainText('draft changed');
  expect(errors).toEqual([]);
});

test('a parameter value typed as text keeps the text and shows the engine’s message at that field', async ({ page }) => {
  const errors = watchErrors(page);
  const url = await openDemoBuild(page);

  const value = page.getByLabel('value of parameter kDIP', { exact: true });
  await expect(value).toHaveValue('3');
  await value.fill('abc');
  await expect(value).toHaveAttribute('aria-invalid', 'true');
  await expect(page.locator('#bf-parameters-17-value-msg')).toHaveText("Error: value must be a finite number, got the text 'abc'");
  await expect(value).toHaveAttribute('aria-describedby', 'bf-parameters-17-value-msg');
  await expect(summary(page).getByRole('button', { name: 'Parameter kDIP, value' })).toBeVisible();

  // The text is what the draft holds: it is still there after a reload.
  await draftHolds(page, (d) => d.parameters[17].value, 'abc');
  await page.goto(url);
  await expect(page.getByLabel('value of parameter kDIP', { exact: true })).toHaveValue('abc');
  await expect(page.locator('#bf-parameters-17-value-msg')).toContainText("got the text 'abc'");

  // A value outside its range is a warning, said in words, and not an error.
  await page.getByLabel('value of parameter kDIP', { exact: true }).fill('9');
  await expect(page.locator('#bf-parameters-17-range-min-msg')).toHaveText('Warning: the value 9 lies outside its range [1.5, 5]');
  await expect(page.getByLabel('range minimum of parameter kDIP', { exact: true })).not.toHaveAttribute('aria-invalid');
  await expect(summary(page)).toContainText('1 warning');
  expect(errors).toEqual([]);
});

test('names complete as you type in a rate: kD offers kDIP; Enter and Tab accept, Escape closes', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoBuild(page);

  const rate = page.getByLabel('rate of flow release', { exact: true });
  await expect(rate).toHaveValue('kRel * fTmin * SED');
  await rate.click();
  await rate.press('End');
  await rate.pressSequentially(' * kD');
  const list = page.getByRole('listbox', { name: 'Names for rate of flow release' });
  await expect(list).toBeVisible();
  await expect(rate).toHaveAttribute('aria-expanded', 'true');
  const first = list.getByRole('option').first();
  await expect(first).toContainText('kDIP');
  await expect(first).toContainText('parameter');
  await expect(first).toContainText('mg/m^3');
  await expect(first).toHaveAttribute('aria-selected', 'true');
  await expect(rate).toHaveAttribute('aria-activedescendant', (await first.getAttribute('id'))!);
  await page.screenshot({ path: 'test-results/build-completion-1280.png' });
  await rate.press('Enter');
  await expect(rate).toHaveValue('kRel * fTmin * SED * kDIP');
  await expect(list).toBeHidden();
  await expect(rate).toHaveAttribute('aria-expanded', 'false');

  // Tab accepts too, and a function comes with its parenthesis.
  await rate.pressSequentially(' / mono');
  await expect(list.getByRole('option').first()).toContainText('monod()');
  await rate.press('Tab');
  await expect(rate).toHaveValue('kRel * fTmin * SED * kDIP / monod(');
  await expect(rate).toBeFocused();

  // Escape closes the list and keeps the text as typed.
  await rate.pressSequentially('DI');
  await expect(list).toBeVisible();
  await rate.press('Escape');
  await expect(list).toBeHidden();
  await expect(rate).toHaveValue('kRel * fTmin * SED * kDIP / monod(DI');
  await expect(page.locator('#bf-flows-17-rate-msg')).toContainText('Error:');

  // How long one keystroke takes on the demo lake (edit, validation, redraw), for the record.
  const ms = await rate.evaluate(async (el: HTMLInputElement) => {
    const times: number[] = [];
    for (let i = 0; i < 10; i++) {
      const t0 = performance.now();
      el.value = el.value + (i % 2 === 0 ? ' ' : '');
      el.dispatchEvent(new Event('input', { bubbles: true }));
      await new Promise((r) => requestAnimationFrame(() => setTimeout(r, 0)));
      times.push(performance.now() - t0);
    }
    times.sort((a, b) => a - b);
    return times[5];
  });
  console.log(`one keystroke in a rate of the demo lake, median of 10 to the next frame: ${ms.toFixed(1)} ms`);
  expect(errors).toEqual([]);
});

test('a forcing becomes a table from pasted rows with dates; a bad row is reported by line and nothing is changed', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoBuild(page);

  await page.getByLabel('kind of forcing T', { exact: true }).selectOption('table');
  await expect(page.getByTestId('undo-notice')).toContainText('Forcing T is now a table; its expression was taken away.');
  const editor = page.getByRole('group', { name: 'Table of forcing T' });
  await expect(editor).toBeVisible();

  const paste = editor.getByLabel('Pasted rows');
  await paste.fill('date,T\n2027-01-01,4\n2027-04-01,12\n2027-07-0x,21\n2027-10-01,13\n');
  await editor.getByRole('button', { name: 'Read pasted rows' }).click();
  const alert = editor.getByRole('alert');
  await expect(alert).toContainText('Nothing was changed: 1 problem in the pasted rows.');
  await expect(alert).toContainText("line 4: '2027-07-0x' is not a date (write YYYY-MM-DD, e.g. 2027-03-01)");
  await expect(page.getByLabel('t of row 1, forcing T', { exact: true })).toHaveValue('0');
  await expect(page.getByLabel('t of row 2, forcing T', { exact: true })).toHaveCount(0);

  await paste.fill('date,T\n2027-01-01,4\n2027-04-01,12\n2027-07-01,21\n2027-10-01,13\n');
  await editor.getByRole('button', { name: 'Read pasted rows' }).click();
  await expect(editor.getByRole('status')).toContainText('Read 4 rows from the pasted rows: days 0 to 273 (2027-01-01 to 2027-10-01, counted from 2027-01-01)');
  await editor.getByRole('button', { name: 'Replace the table (4 rows)' }).click();
  await expect(page.getByTestId('undo-notice')).toContainText('Replaced the table of forcing T (1 row) with 4 rows from the pasted rows.');
  const days = await Promise.all([1, 2, 3, 4].map((r) => page.getByLabel(`t of row ${r}, forcing T`, { exact: true }).inputValue()));
  expect(days).toEqual(['0', '90', '181', '273']);
  await expect(page.getByLabel('v of row 3, forcing T', { exact: true })).toHaveValue('21');
  await expect(editor).toContainText('2027-07-01');
  await expect(summary(page)).toContainText('No problems');
  await editor.scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/build-table-1280.png' });

  // A cell typed wrong is an error at that cell and in the summary, naming the row.
  await page.getByLabel('t of row 3, forcing T', { exact: true }).fill('80');
  await expect(page.getByLabel('t of row 3, forcing T', { exact: true })).toHaveAttribute('aria-invalid', 'true');
  await expect(summary(page).getByRole('button', { name: 'Forcing T, table row 3, t' })).toBeVisible();

  // The editor at phone size: no sideways scrolling.
  await page.setViewportSize({ width: 390, height: 844 });
  await editor.scrollIntoViewIfNeeded();
  expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/build-table-390.png' });
  expect(errors).toEqual([]);
});

test('a CSV file with dates for a model without a time origin asks for the origin and sets it with the table', async ({ page }) => {
  const errors = watchErrors(page);
  const url = await openDemoBuild(page);

  // /models/<key> opens the Build screen.
  await page.goto(url.replace(/\/build$/, ''));
  await expect(page).toHaveURL(url);
  await expect(page.getByRole('heading', { name: /^Parameters/ })).toBeVisible();

  const origin = page.getByLabel('Time origin', { exact: true });
  await origin.fill('2027-13-01');
  await expect(origin).toHaveAttribute('aria-invalid', 'true');
  await expect(page.locator('#bf-timeOrigin-msg')).toContainText('timeOrigin must be an ISO date like 2027-01-01');
  await origin.fill('');
  await expect(summary(page)).toContainText('No problems');

  await page.getByLabel('kind of forcing Q', { exact: true }).selectOption('table');
  const editor = page.getByRole('group', { name: 'Table of forcing Q' });
  await expect(editor).toContainText('The model has no time origin, so no dates are shown');
  const csv = 'Datum;Q;note\n2027-03-01;16000,5;wet\n2027-03-11;12000;\n2027-04-01;9000;dry\n';
  await editor.getByLabel('Read a CSV file…').setInputFiles({ name: 'inflow.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(editor.getByRole('status')).toContainText(
    'Read 3 rows from the file inflow.csv: days 0 to 31 (2027-03-01 to 2027-04-01, counted from 2027-03-01), values in column “Q”.'
  );
  const ask = editor.getByLabel(/^The model has no time origin\. Count days from/);
  await expect(ask).toHaveValue('2027-03-01');
  await ask.fill('2027-02-29');
  await expect(editor.getByText("'2027-02-29' is not a date (YYYY-MM-DD)")).toBeVisible();
  await ask.fill('2027-01-01');
  await expect(editor.getByRole('status')).toContainText('days 59 to 90');
  await editor.getByRole('button', { name: 'Replace the table (3 rows)' }).click();
  await expect(page.getByTestId('undo-notice')).toContainText("and set the model's time origin to 2027-01-01");
  await expect(origin).toHaveValue('2027-01-01');
  await expect(page.getByLabel('t of row 2, forcing Q', { exact: true })).toHaveValue('69');
  await expect(page.getByLabel('v of row 1, forcing Q', { exact: true })).toHaveValue('16000.5');
  await expect(editor).toContainText('2027-03-11');

  // Undo takes the table and the origin away again.
  await page.getByRole('button', { name: 'Undo', exact: true }).click();
  await expect(origin).toHaveValue('');
  await expect(page.getByLabel('t of row 2, forcing Q', { exact: true })).toHaveCount(0);
  expect(errors).toEqual([]);
});

test('removing a flow asks nothing and Undo puts it back, by keyboard', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoBuild(page);

  const heading = page.getByRole('heading', { name: /^Flows/ });
  await expect(heading).toContainText('32');
  await page.getByRole('button', { name: 'Remove flow phySettle', exact: true }).click();
  await expect(heading).toContainText('31');
  await expect(page.getByLabel('rate of flow phySettle', { exact: true })).toHaveCount(0);
  await expect(page.getByTestId('undo-notice')).toContainText('Removed flow phySettle.');
  const undo = page.getByRole('button', { name: 'Undo', exact: true });
  await expect(undo).toBeFocused();
  await page.keyboard.press('Enter');
  await expect(heading).toContainText('32');
  await expect(page.getByLabel('rate of flow phySettle', { exact: true })).toHaveValue('vsPhy / zMean * PHY');
  await expect(page.getByLabel('id of flow phySettle', { exact: true })).toBeFocused();
  await expect(page.getByTestId('undo-notice')).toHaveCount(0);
  expect(errors).toEqual([]);
});

test('Save revision refuses a draft with errors, then saves one with its number and digest; History restores an older one', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoBuild(page);

  const value = page.getByLabel('value of parameter kDIP', { exact: true });
  await value.fill('abc');
  await page.getByRole('button', { name: 'Save revision' }).click();
  await expect(page.getByTestId('commit-result')).toContainText('Not saved: the draft has 1 error.');

  await value.fill('3.5');
  await page.getByLabel('Note for the revision').fill('faster uptake');
  await page.getByRole('button', { name: 'Save revision' }).click();
  await expect(page.getByTestId('commit-result')).toHaveText(/Saved as revision 2, digest sha256:[0-9a-f]{12}\./);
  await expect(page.getByTestId('revision-state')).toContainText('Newest revision: 2');
  await expect(page.getByTestId('revision-state')).toContainText('The draft is the same as it.');

  await page.getByRole('button', { name: /^Show history/ }).click();
  const rows = page.getByRole('list', { name: 'Revisions, newest first' }).getByRole('listitem');
  await expect(rows).toHaveCount(2);
  await expect(rows.nth(0)).toContainText('Revision 2 (newest)');
  await expect(rows.nth(0)).toContainText('faster uptake');
  await expect(rows.nth(0)).toContainText(/sha256:[0-9a-f]{12}/);
  await expect(rows.nth(0)).toContainText(/\d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC/);
  await page.screenshot({ path: 'test-results/build-history-1280.png' });

  await page.getByRole('button', { name: 'Restore revision 1 as the draft' }).click();
  await expect(page.getByTestId('commit-result')).toContainText('Revision 1 is now the draft.');
  await expect(value).toHaveValue('3');
  await expect(page.getByTestId('undo-notice')).toContainText('Restored revision 1 as the draft.');
  await expect(draftStatus(page)).toContainText('draft changed');
  expect(errors).toEqual([]);
});

test('the Build screen fits 1280×800 and 390×844 without sideways scrolling, headings stay in view', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoBuild(page);
  await page.getByLabel('rate of flow phySettle', { exact: true }).fill('vsPhy * PHY');
  await page.getByLabel('value of parameter kDIP', { exact: true }).fill('abc');
  await expect(summary(page)).toContainText('2 errors');
  const overflow = () => page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(await overflow()).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/build-1280.png' });

  // Jump to Flows: its sticky heading is at the top of the window.
  await page.getByRole('navigation', { name: 'Parts of the model' }).getByRole('link', { name: /^Flows/ }).click();
  await expect(page.getByRole('heading', { name: /^Flows/ })).toBeFocused();
  await page.mouse.wheel(0, 600);
  await expect.poll(() => page.getByRole('heading', { name: /^Flows/ }).evaluate((el) => Math.round(el.getBoundingClientRect().top))).toBeLessThan(20);
  await page.screenshot({ path: 'test-results/build-flows-1280.png' });

  await page.setViewportSize({ width: 390, height: 844 });
  await page.goto(page.url());
  await expect(summary(page)).toContainText('2 errors');
  expect(await overflow()).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/build-390.png' });
  await summary(page).getByRole('button', { name: 'Flow phySettle, rate' }).click();
  await expect(page.getByLabel('rate of flow phySettle', { exact: true })).toBeFocused();
  await page.screenshot({ path: 'test-results/build-390-field.png' });
  expect(await overflow()).toBeLessThanOrEqual(0);
  expect(errors).toEqual([]);
});
