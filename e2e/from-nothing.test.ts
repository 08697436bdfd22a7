/**
 * From nothing to a working one-box lake, as a new user would do it in the browser, with
 * the page's own controls (clicks and the keyboard; nothing is written to IndexedDB by the
 * test): an empty model from the Models page, its parameters, state and three flows typed
 * into the Build tables (one bad rate on the way, with its message at the field, then
 * fixed), everything kept across a reload, the balance typeset on Balances, the drawing on
 * Scheme, and the baseline on Runs ending near the steady state.
 *
 * "Lake Smallwater" is invented; its figures are plausible, not measured.
 */
import { expect, test, type Locator, type Page } from '@playwright/test';
import { watchErrors } from './support';

const TITLE = 'Lake Smallwater';

const summary = (page: Page) => page.getByTestId('problem-summary');
const draftStatus = (page: Page) => page.getByTestId('draft-status');
const field = (page: Page, label: string) => page.getByLabel(label, { exact: true });
const screens = (page: Page) => page.getByRole('navigation', { name: 'Model screens' });

/** Replaces the text of the focused control by typing, as a user selects all and types over it. */
async function typeOver(page: Page, text: string) {
  await page.keyboard.press('ControlOrMeta+A');
  await page.keyboard.type(text);
}

/** Clicks into a control and types over its text. */
async function clickAndType(page: Page, control: Locator, text: string) {
  await control.click();
  await typeOver(page, text);
}

/** Clicks into an expression control, types over it, and closes the offered names (if any) with Escape. */
async function typeExpression(page: Page, control: Locator, text: string) {
  await clickAndType(page, control, text);
  if ((await control.getAttribute('aria-expanded')) === 'true') await page.keyboard.press('Escape');
  await expect(control).toHaveValue(text);
}

/** Chooses an option of a (closed) select by typing its first letters, as the keyboard does. */
async function choose(page: Page, select: Locator, option: string, value: string) {
  await select.focus();
  await page.keyboard.type(option);
  await expect(select).toHaveValue(value);
}

/**
 * "Add parameter" (or state, flow): the new row's id takes focus; the id is typed there and
 * the next controls of the row are reached with Tab.
 */
async function addRow(page: Page, what: 'parameter' | 'state' | 'flow', id: string, then: string[] = []) {
  await page.getByRole('button', { name: `Add ${what}`, exact: true }).click();
  const idField = page.locator(':focus');
  await expect(idField).toHaveAttribute('aria-label', new RegExp(`^id of ${what} `));
  await typeOver(page, id);
  await expect(field(page, `id of ${what} ${id}`)).toBeFocused();
  for (const text of then) {
    await page.keyboard.press('Tab');
    await typeOver(page, text);
  }
}

test('a new user builds the one-box lake from nothing, sees its balance and drawing, runs it, and keeps it across reloads', async ({
  page
}) => {
  test.setTimeout(120_000);
  const errors = watchErrors(page);

  // 1. The Models page: an empty model asks for a title.
  await page.goto('/');
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lake Ledger');
  await expect(page.getByTestId('entry')).toHaveCount(3);
  await page.getByLabel('Title', { exact: true }).click();
  await page.keyboard.type(TITLE);
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('entry')).toHaveCount(4);
  const open = page.getByRole('link', { name: `Open ${TITLE}`, exact: true });
  await expect(open).toBeFocused();
  await expect(page.getByTestId('entry').first().getByTestId('entry-model-id')).toHaveText('lake_smallwater');
  await page.keyboard.press('Enter');
  await expect(page).toHaveURL(/\/models\/[^/]+\/build$/);
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(TITLE);
  await expect(page.getByRole('heading', { name: /^Parameters/ })).toBeVisible();

  // 2. Build. The empty model starts with a volume V and one state TP and no flows; the
  // books are kept in kg of P.
  await expect(field(page, 'Conserved element')).toHaveValue('P');
  await expect(field(page, 'Unit of the books')).toHaveValue('kg');
  await expect(field(page, 'id of parameter V')).toHaveValue('V');
  await expect(field(page, 'unit of parameter V')).toHaveValue('m^3');
  await clickAndType(page, field(page, 'value of parameter V'), '2.4e7');

  await addRow(page, 'parameter', 'Q', ['1.5e7', 'm^3/yr', 'Inflow']);
  await addRow(page, 'parameter', 'Pin', ['120', 'mg/m^3', 'Inflow concentration']);
  await addRow(page, 'parameter', 'sigma', ['0.790569', '1/yr', 'Settling rate']);
  await expect(field(page, 'unit of parameter sigma')).toHaveValue('1/yr');

  // The state the empty model brought: total P in the lake's volume, starting from nothing.
  await expect(field(page, 'id of state TP')).toHaveValue('TP');
  await expect(field(page, 'unit of state TP')).toHaveValue('mg/m^3');
  await expect(field(page, 'size of state TP')).toHaveValue('V');
  await clickAndType(page, field(page, 'initial value of state TP'), '0');

  // load: from outside into TP. First typed without the inflow concentration: a rate in 1/yr,
  // not in mg/m^3 per day. The message stands at the rate field.
  await addRow(page, 'flow', 'load');
  await choose(page, field(page, 'from of flow load'), 'outside', '');
  await choose(page, field(page, 'to of flow load'), 'TP', 'TP');
  const loadRate = field(page, 'rate of flow load');
  await typeExpression(page, loadRate, 'Q/V');
  await expect(loadRate).toHaveAttribute('aria-invalid', 'true');
  const describedBy = await loadRate.getAttribute('aria-describedby');
  expect(describedBy).toBe('bf-flows-0-rate-msg');
  const message = page.locator(`[id="${describedBy}"]`);
  await expect(message).toContainText('Error:');
  await expect(message).toContainText('the rate of flow load has the unit');
  await expect(message).toContainText('but must be in mg/m^3/d');
  // The summary names the same place, and choosing it goes back to the field.
  const entry = summary(page).getByRole('button', { name: 'Flow load, rate' });
  await expect(entry).toBeVisible();
  await entry.click();
  await expect(loadRate).toBeFocused();
  // Fixed by typing the rest at the end of the rate.
  await loadRate.press('End');
  await page.keyboard.type(' * Pin');
  if ((await loadRate.getAttribute('aria-expanded')) === 'true') await page.keyboard.press('Escape');
  await expect(loadRate).toHaveValue('Q/V * Pin');
  await expect(loadRate).not.toHaveAttribute('aria-invalid');
  await expect(message).toHaveCount(0);
  await clickAndType(page, field(page, 'role of flow load'), 'externalLoad');

  // outflow and settling: from TP (a new flow leaves the first state) to outside.
  await addRow(page, 'flow', 'outflow');
  await expect(field(page, 'from of flow outflow')).toHaveValue('TP');
  await expect(field(page, 'to of flow outflow')).toHaveValue('');
  await typeExpression(page, field(page, 'rate of flow outflow'), 'Q/V * TP');
  await clickAndType(page, field(page, 'role of flow outflow'), 'outflow');

  await addRow(page, 'flow', 'settling');
  await expect(field(page, 'from of flow settling')).toHaveValue('TP');
  await expect(field(page, 'to of flow settling')).toHaveValue('');
  await typeExpression(page, field(page, 'rate of flow settling'), 'sigma * TP');
  await clickAndType(page, field(page, 'role of flow settling'), 'sedimentation');

  // The role reads whole in its field, not cut at the edge.
  expect(await field(page, 'role of flow settling').evaluate((el: HTMLInputElement) => el.scrollWidth <= el.clientWidth)).toBe(true);
  // The rates are in TP's unit per day, as the row says next to each.
  await expect(page.locator('.bt-flows .bt-unit-note')).toHaveText(['in mg/m^3/d', 'in mg/m^3/d', 'in mg/m^3/d']);
  await expect(summary(page)).toContainText('The draft is a valid model: no errors and no warnings.');
  await expect(summary(page).getByRole('button')).toHaveCount(0);
  await expect(draftStatus(page)).toHaveText(/^\s*No problems\s+· revision 1, draft changed\s*$/);
  // The finished model at 1280×800, by the page's jump links: parameters and state, then the flows.
  const parts = page.getByRole('navigation', { name: 'Parts of the model' });
  await expect(parts).toContainText('Parameters (4)Forcings (0)States (1)Derived (0)Flows (3)');
  await parts.getByRole('link', { name: 'Parameters (4)' }).click();
  await expect(page.getByRole('heading', { name: /^Parameters/ })).toBeFocused();
  await page.screenshot({ path: 'test-results/from-nothing-build.png' });
  await parts.getByRole('link', { name: 'Flows (3)' }).click();
  await expect(page.getByRole('heading', { name: /^Flows/ })).toBeFocused();
  await page.screenshot({ path: 'test-results/from-nothing-build-flows.png' });

  // 3. A reload keeps all of it.
  await page.reload();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(TITLE);
  await expect(field(page, 'value of parameter V')).toHaveValue('24000000');
  await expect(field(page, 'value of parameter sigma')).toHaveValue('0.790569');
  await expect(field(page, 'unit of parameter Q')).toHaveValue('m^3/yr');
  await expect(field(page, 'initial value of state TP')).toHaveValue('0');
  await expect(field(page, 'rate of flow load')).toHaveValue('Q/V * Pin');
  await expect(field(page, 'rate of flow settling')).toHaveValue('sigma * TP');
  await expect(field(page, 'from of flow load')).toHaveValue('');
  await expect(field(page, 'to of flow load')).toHaveValue('TP');
  await expect(summary(page)).toContainText('The draft is a valid model: no errors and no warnings.');
  await expect(draftStatus(page)).toContainText('No problems');

  // 4. Balances: one typeset equation, for TP, with the three flows; the identity holds.
  await screens(page).getByRole('link', { name: 'Balances' }).click();
  await expect(page.getByRole('heading', { name: 'Balances', level: 2 })).toBeVisible();
  const cards = page.getByTestId('state-balance');
  await expect(cards).toHaveCount(1);
  await expect(cards).toHaveAttribute('data-state', 'TP');
  await expect(page.locator('[data-testid="equation"] .katex')).toHaveCount(1);
  const equation = page.locator('[data-state="TP"] [data-testid="equation"] [role="img"]');
  await expect(equation).toHaveAttribute('aria-label', /^dTP\/dt = load − outflow − settling, in mg\/m\^3\/d$/);
  for (const flow of ['load', 'outflow', 'settling']) {
    await expect(page.locator('[data-state="TP"] [data-testid="equation"] .katex-html')).toContainText(flow);
  }
  await expect(page.locator('[data-testid="identity-equation"] .katex')).toHaveCount(1);
  await expect(page.getByTestId('identity-check')).toContainText(/Holds\s*The identity holds (exactly )?at 5 random states/);
  await page.screenshot({ path: 'test-results/from-nothing-balances.png' });

  // 5. Scheme: a tile for TP, and the three flows drawn across the lake's boundary.
  await screens(page).getByRole('link', { name: 'Scheme' }).click();
  await expect(page.getByRole('heading', { name: 'Scheme', level: 2 })).toBeVisible();
  await expect(page.locator('a[data-state]')).toHaveCount(1);
  const tile = page.locator('a[data-state="TP"]');
  await expect(tile).toBeVisible();
  await expect(tile.locator('text').nth(1)).toHaveText('TP');
  await expect(page.getByTestId('scheme-svg')).toHaveAttribute('aria-label', /1 compartments?, 0 internal flows, 3 across the lake boundary$/);
  for (const flow of ['load', 'outflow', 'settling']) {
    await expect(page.locator(`a[data-flow="${flow}"]`)).toBeVisible();
    await expect(page.locator(`[data-flow-shaft="${flow}"] path`)).toHaveAttribute('d', /^M/);
  }
  await page.screenshot({ path: 'test-results/from-nothing-scheme.png' });

  // 6. Runs: the baseline (20 years) is run from a revision saved for it, and closes.
  await screens(page).getByRole('link', { name: 'Runs' }).click();
  await expect(page.getByRole('heading', { name: 'Run scenarios', level: 2 })).toBeVisible();
  await expect(page.getByTestId('job-status')).toHaveText('finished', { timeout: 45_000 });
  // The draft was saved as revision 2 for the run; the baseline made for it is scenario revision 1.
  await expect(page.getByTestId('job')).toContainText('model r2, scenario r1');
  await expect(page.getByTestId('closure')).toHaveText(/^Mass balance closed: residual \S+ of throughput$/);
  const chart = page.getByTestId('chart');
  await expect(chart).toHaveCount(1);
  await expect(chart).toHaveAttribute('data-series', 'TP');

  // The steady state of the one-box lake with settling proportional to the flushing,
  // sigma = 1/sqrt(tau_w), is Pin / (1 + sqrt(tau_w)) (Vollenweider 1976; OECD 1982):
  // tau_w = V/Q = 1.6 yr gives 120 / (1 + 1.2649) = 52.98 mg/m^3. After 20 years (about 35
  // e-foldings at Q/V + sigma = 1.73 per year) the lake is there.
  const V = 2.4e7; // m^3
  const steady = 120 / (1 + Math.sqrt(V / 1.5e7)); // mg/m^3
  // The closure's words give the mass at the end to four digits: TP = final mass / V.
  const books = page.getByText(/^kg P: initial /);
  await expect(books).toHaveText(/^kg P: initial 0, final [\d,.]+, imported [\d,.]+, exported [\d,.]+$/);
  const [, finalKg, importedKg] = /final ([\d,.]+), imported ([\d,.]+)/.exec((await books.textContent()) ?? '')!;
  const tpAtEnd = (Number(finalKg.replace(/,/g, '')) * 1e6) / V; // kg → mg, over the volume
  expect(Math.abs(tpAtEnd - steady)).toBeLessThan(0.03);
  // The load over the 20 years (7,305 days, 20 Julian years): Q × Pin × 20 yr = 36,000 kg.
  expect(Number(importedKg.replace(/,/g, ''))).toBe(36000);
  // The chart says in words what it draws: TP rises from 0 without overshoot, so its
  // maximum (three digits) is its value at the end.
  const description = (await chart.getByRole('img').getAttribute('aria-label')) ?? '';
  const range = /^Total phosphorus from (\S+) to (\S+) mg\/m\^3, mean \S+ mg\/m\^3, 2027-01-01 to 2047-01-01\.$/.exec(description);
  expect(range, description).not.toBeNull();
  expect(Number(range![1])).toBe(0);
  expect(Number(range![2])).toBeCloseTo(steady, 1);
  await page.screenshot({ path: 'test-results/from-nothing-runs.png', fullPage: true });

  // The run's revision is kept too: after a reload the draft is unchanged since revision 2.
  await screens(page).getByRole('link', { name: 'Build' }).click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/build$/);
  await expect(page.getByRole('heading', { name: /^Flows/ })).toBeVisible();
  await page.reload();
  await expect(draftStatus(page)).toHaveText(/^\s*No problems\s+· revision 2\s*$/);
  await expect(field(page, 'rate of flow outflow')).toHaveValue('Q/V * TP');
  expect(errors).toEqual([]);
});
