/**
 * The Balances screen in Chromium: from the Models page (which adds the examples on first
 * start) to the demo lake, then to Balances: one KaTeX-typeset equation per state (nine
 * for the demo lake), each with its plain-text alternative, the whole-system identity and
 * its numerical check in words, and the structural findings. Keyboard only for the
 * controls; screenshots at 1280×800 and 390×844.
 */
import { expect, test, type Page } from '@playwright/test';
import { watchErrors } from './support';

const DEMO_TITLE = /Lake Wendmoor/;
const DEMO_STATES = ['DIP', 'PHY', 'ZOO', 'DET', 'BFI', 'PFI', 'VEG', 'SED', 'SEDinert'];

async function openDemoBalances(page: Page) {
  await page.goto('/');
  const open = page.getByRole('link', { name: new RegExp(`^Open ${DEMO_TITLE.source}`) }).first();
  await expect(open).toBeVisible({ timeout: 20_000 });
  // The Models page opens a model on Build; Balances is the next screen of the same model.
  const href = await open.getAttribute('href');
  expect(href).toMatch(/\/models\/[^/]+\/build$/);
  await page.goto(href!.replace(/\/build$/, '/balances'));
  await expect(page.getByRole('heading', { name: 'Balances', level: 2 })).toBeVisible();
  await expect(page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Balances' })).toHaveAttribute(
    'aria-current',
    'page'
  );
}

test('Balances shows one typeset equation per state of the demo lake, the identity holding, and the findings', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoBalances(page);

  const cards = page.getByTestId('state-balance');
  await expect(cards).toHaveCount(DEMO_STATES.length);
  expect(await cards.evaluateAll((els) => els.map((e) => e.getAttribute('data-state')))).toEqual(DEMO_STATES);

  // Each equation is KaTeX output, with the engine's plain-text equation as its accessible name.
  const equations = page.locator('[data-testid="equation"] .katex');
  await expect(equations).toHaveCount(DEMO_STATES.length);
  await expect(page.locator('[data-state="SED"] [data-testid="equation"] [role="img"]')).toHaveAttribute(
    'aria-label',
    /^dSED\/dt = .*detSettle · zMean · 0\.001.*, in g\/m\^2\/d$/
  );
  // KaTeX's fonts came with the build: the equations are not drawn in a fallback font.
  const fontsLoaded = await page.evaluate(async () => {
    await document.fonts.ready;
    return document.fonts.check('16px KaTeX_Main') && document.fonts.check('italic 16px KaTeX_Math');
  });
  expect(fontsLoaded).toBe(true);

  // Zones group the states, said in words.
  await expect(page.getByRole('heading', { name: /^Zone: water/ })).toBeVisible();
  await expect(page.getByRole('heading', { name: /^Zone: sediment/ })).toBeVisible();

  // The whole-system identity and its numerical check.
  await expect(page.locator('[data-testid="identity-equation"] .katex')).toHaveCount(1);
  await expect(page.getByTestId('identity-check')).toContainText(/Holds\s*The identity holds (exactly )?at 5 random states/);
  await expect(page.getByText(/Internal flows, which cancel \(\d+\)/)).toBeVisible();

  // The demo lake has no structural warning.
  await expect(page.getByTestId('findings-none')).toBeVisible();

  await page.screenshot({ path: 'test-results/balances.png', fullPage: false });
  await page.screenshot({ path: 'test-results/balances-full.png', fullPage: true });

  // "show rates", by keyboard: each term's rate appears, typeset, with its unit.
  const show = page.getByLabel('show rates');
  await show.focus();
  await page.keyboard.press('Space');
  await expect(show).toBeChecked();
  const sedRates = page.locator('[data-state="SED"] .rates li');
  await expect(sedRates.first()).toBeVisible();
  expect(await sedRates.count()).toBeGreaterThan(3);
  await expect(page.locator('[data-state="SED"] .rates [role="img"][aria-label^="detSettle = "]')).toHaveAttribute(
    'aria-label',
    'detSettle = vsDet / zMean * DET'
  );
  await expect(page.locator('[data-state="SED"] .rates').getByText('arrives multiplied by').first()).toBeVisible();
  await page.screenshot({ path: 'test-results/balances-rates.png', fullPage: false });

  // Terms named by label instead of id.
  await page.getByLabel('label', { exact: true }).check();
  await expect(page.locator('[data-state="DIP"] [data-testid="equation"] .katex').first()).toContainText('External load, dissolved');
  await page.screenshot({ path: 'test-results/balances-labels.png', fullPage: false });

  expect(errors).toEqual([]);
});

test('Balances at 390×844: equations wrap or scroll inside their card, the page does not scroll sideways', async ({ page }) => {
  const errors = watchErrors(page);
  await page.setViewportSize({ width: 390, height: 844 });
  await openDemoBalances(page);
  await expect(page.locator('[data-testid="equation"] .katex')).toHaveCount(DEMO_STATES.length);
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/balances-mobile.png', fullPage: false });
  await page.screenshot({ path: 'test-results/balances-mobile-full.png', fullPage: true });
  await page.getByRole('heading', { name: 'The whole system' }).scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/balances-mobile-identity.png', fullPage: false });
  await page.getByLabel('show rates').check();
  const overflowRates = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflowRates).toBeLessThanOrEqual(0);
  await page.locator('[data-state="SED"]').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/balances-mobile-rates.png', fullPage: false });
  expect(errors).toEqual([]);
});
