/**
 * The Scheme screen in Chromium: from the Models page (which adds the examples on first
 * start) to the demo lake's Scheme tab; a tile for each of the nine compartments with its
 * zone written on it, the legend and the readout strip; "Show annual masses" runs the
 * baseline and the arrows take widths by mass; hover and focus give a flow's rate, Enter
 * opens it in Build; SVG and PNG exports download. Screenshots at 1280×800 and 390×844.
 */
import { readFile } from 'node:fs/promises';
import { expect, test, type Page } from '@playwright/test';
import { watchErrors } from './support';

const DEMO_TITLE = /Lake Wendmoor/;
const DEMO_STATES = ['DIP', 'PHY', 'ZOO', 'DET', 'BFI', 'PFI', 'VEG', 'SED', 'SEDinert'];
const DEMO_ZONES = ['water', 'biota', 'plants', 'sediment'];

async function openDemoScheme(page: Page) {
  await page.goto('/');
  const open = page.getByRole('link', { name: new RegExp(`^Open ${DEMO_TITLE.source}`) }).first();
  await expect(open).toBeVisible({ timeout: 20_000 });
  await open.click();
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Scheme' }).click();
  await expect(page.getByRole('heading', { name: 'Scheme', level: 2 })).toBeVisible();
  await expect(page.locator('a[data-state]')).toHaveCount(DEMO_STATES.length, { timeout: 20_000 });
}

const shaftWidth = (page: Page, flow: string) =>
  page.locator(`[data-flow-shaft="${flow}"] path`).getAttribute('stroke-width').then(Number);

test('the demo lake is drawn: nine tiles with their zones, the legend, the readout strip', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoScheme(page);
  for (const id of DEMO_STATES) {
    const tile = page.locator(`a[data-state="${id}"]`);
    await expect(tile).toBeVisible();
    await expect(tile.locator('text').nth(1)).toHaveText(id);
  }
  // The zone is written on every tile's band and over its group, never shown by colour alone.
  for (const zone of DEMO_ZONES) {
    await expect(page.locator(`[data-zone="${zone}"] text`)).toHaveText(zone);
  }
  await expect(page.locator('a[data-state="SED"] text').first()).toHaveText('SEDIMENT');
  // 26 internal flows and 6 across the boundary, each with a label.
  await expect(page.locator('a[data-flow]')).toHaveCount(32);
  await expect(page.locator('[data-chip="forcing"]').first()).toBeVisible();
  const legend = page.getByTestId('scheme-legend');
  await expect(legend).toBeVisible();
  await expect(legend).toContainText('Legend');
  await expect(legend).toContainText('a forcing the rate reads');
  const readout = page.getByTestId('readout-strip');
  await expect(readout).toContainText('Reported quantities');
  for (const id of ['Chl', 'TP', 'Secchi']) await expect(readout.locator(`a[data-derived="${id}"]`)).toBeVisible();
  await expect(page.getByText('Lake boundary · P in kg')).toBeVisible();
  await page.screenshot({ path: 'test-results/scheme-1280.png' });

  // Arranged left to right, imports enter on the left of the frame instead of the top.
  const svg = page.getByTestId('scheme-svg');
  const tall = Number(await svg.getAttribute('height')) / Number(await svg.getAttribute('width'));
  expect(tall).toBeGreaterThan(0.8);
  await page.getByLabel('Arrange').selectOption('RIGHT');
  await expect.poll(async () => Number(await svg.getAttribute('height')) / Number(await svg.getAttribute('width'))).toBeLessThan(0.6);
  await expect(page.locator('a[data-state]')).toHaveCount(DEMO_STATES.length);
  await page.screenshot({ path: 'test-results/scheme-1280-right.png' });
  expect(errors).toEqual([]);
});

test('"Show annual masses" runs the baseline and widens the arrows by mass', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoScheme(page);
  const before = await Promise.all(['resuspension', 'vegUptake', 'loadDIP'].map((f) => shaftWidth(page, f)));
  expect(new Set(before).size).toBe(1);

  const show = page.getByTestId('show-masses');
  await show.focus();
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('run-words')).toContainText("Arrow widths: each flow's mean annual mass in kg P/yr", { timeout: 45_000 });
  await expect(page.getByTestId('run-words')).toContainText('Mass balance closed');

  const [resuspension, vegUptake, loadDIP] = await Promise.all(['resuspension', 'vegUptake', 'loadDIP'].map((f) => shaftWidth(page, f)));
  // Resuspension moves tens of tonnes a year, plant uptake well under a kilogram.
  expect(resuspension).toBeGreaterThan(loadDIP);
  expect(loadDIP).toBeGreaterThan(vegUptake);
  expect(resuspension).not.toBe(before[0]);
  // The legend now explains the width scale, and the readout strip shows values.
  await expect(page.getByTestId('scheme-legend')).toContainText('log scale');
  await expect(page.getByTestId('readout-strip')).toContainText("last year's mean");
  // Each tile now carries a small line of its value over the run.
  await expect(page.locator('[data-spark="DIP"]')).toHaveAttribute('d', /^M[\d.]+,[\d.]+ L/);
  await page.screenshot({ path: 'test-results/scheme-1280-masses.png' });
  // Focus brings a tile into view inside the scrolling drawing.
  await page.locator('a[data-state="DIP"]').focus();
  await expect(page.getByTestId('scheme-details')).toContainText('Compartment DIP (Dissolved inorganic P), zone water');
  await expect(page.locator('a[data-state="DIP"]')).toBeInViewport();
  await page.screenshot({ path: 'test-results/scheme-1280-dip.png' });

  // Hover and focus give the rate and the mean annual mass; Enter opens the flow in Build.
  await page.locator('a[data-flow="phyUptake"] text').first().hover();
  await expect(page.getByTestId('scheme-details')).toContainText('muPhy * fTphy * fLphy * monod(DIP, kDIP) * PHY');
  await page.locator('a[data-flow="release"]').focus();
  await expect(page.getByTestId('scheme-details')).toContainText('kRel * fTmin * SED');
  await expect(page.getByTestId('scheme-details')).toContainText(/kg P\/yr on average/);
  await page.keyboard.press('Enter');
  await expect(page).toHaveURL(/\/models\/[^/]+\/build#flow-release$/);
  // Build opens that flow's rate field
  await expect(page.locator(':focus')).toHaveValue('kRel * fTmin * SED');
  expect(errors).toEqual([]);
});

test('the keyboard reaches the drawing, its tiles and flows, and the zoom', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoScheme(page);
  const viewport = page.getByTestId('scheme-viewport');
  await viewport.focus();
  await page.keyboard.press('+');
  await expect(page.getByRole('button', { name: 'Actual size' })).toHaveText('115 %');
  await page.keyboard.press('0');
  await expect(page.getByRole('button', { name: 'Actual size' })).toHaveText('100 %');
  await page.keyboard.press('Tab');
  const first = await page.evaluate(() => document.activeElement?.getAttribute('data-state'));
  expect(first).toBe('DIP');
  await expect(page.getByTestId('scheme-details')).toContainText('Compartment DIP');
  // After the nine tiles come the flows.
  for (let i = 0; i < 9; i++) await page.keyboard.press('Tab');
  expect(await page.evaluate(() => document.activeElement?.getAttribute('data-flow'))).toBeTruthy();
  await expect(page.getByTestId('scheme-details')).toContainText(/^Flow /);
  expect(errors).toEqual([]);
});

test('the scheme exports as SVG and PNG', async ({ page }) => {
  const errors = watchErrors(page);
  await openDemoScheme(page);
  const [svgDownload] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-svg').click()]);
  expect(svgDownload.suggestedFilename()).toBe('demo_lake-scheme.svg');
  const svg = await readFile((await svgDownload.path())!, 'utf8');
  expect(svg).toContain('<svg');
  expect(svg).toContain('Lake boundary · P in kg');
  for (const id of DEMO_STATES) expect(svg).toContain(`>${id}<`);
  expect(svg).toContain('Legend');
  expect(svg).not.toContain('data-state');
  expect(svg).not.toContain('tabindex');
  expect(svg).toContain('style="fill:');

  const [pngDownload] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-png').click()]);
  expect(pngDownload.suggestedFilename()).toBe('demo_lake-scheme.png');
  const png = await readFile((await pngDownload.path())!);
  expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  await pngDownload.saveAs('test-results/scheme-export.png');
  expect(errors).toEqual([]);
});

test('at 390×844 the scheme scrolls inside its box, with the readout and the legend below', async ({ page }) => {
  const errors = watchErrors(page);
  await page.setViewportSize({ width: 390, height: 844 });
  await openDemoScheme(page);
  const viewport = page.getByTestId('scheme-viewport');
  const legend = page.getByTestId('scheme-legend');
  const readout = page.getByTestId('readout-strip');
  const [v, r, l] = await Promise.all([viewport.boundingBox(), readout.boundingBox(), legend.boundingBox()]);
  expect(r!.y).toBeGreaterThanOrEqual(v!.y + v!.height);
  expect(l!.y).toBeGreaterThanOrEqual(r!.y + r!.height);
  // The page itself does not scroll sideways; the drawing does, inside its box.
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
  expect(await viewport.evaluate((el) => el.scrollWidth > el.clientWidth)).toBe(true);
  await page.screenshot({ path: 'test-results/scheme-390.png' });
  await page.screenshot({ path: 'test-results/scheme-390-full.png', fullPage: true });
  await page.getByTestId('show-masses').click();
  await expect(page.getByTestId('run-words')).toContainText('Mass balance closed', { timeout: 45_000 });
  await page.locator('a[data-state="PHY"]').focus();
  await page.screenshot({ path: 'test-results/scheme-390-masses.png' });
  expect(errors).toEqual([]);
});
