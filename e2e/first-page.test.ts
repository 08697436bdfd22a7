import { expect, test, type Page } from '@playwright/test';

/** Fails the test on any uncaught page error or console error. */
function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (err) => errors.push(`pageerror: ${err.message}`));
  page.on('console', (msg) => {
    if (msg.type() === 'error') errors.push(`console: ${msg.text()}`);
  });
  return errors;
}

/**
 * For each chart canvas: how many pixels are drawn at all, and how many are close to
 * the colour of its line (the first run colour, #0072B2), so that axes alone do not pass.
 */
async function canvasInk(page: Page): Promise<Array<{ drawn: number; line: number; width: number }>> {
  return page.locator('[data-testid="chart"] canvas').evaluateAll((canvases) =>
    (canvases as HTMLCanvasElement[]).map((canvas) => {
      const ctx = canvas.getContext('2d')!;
      const { data } = ctx.getImageData(0, 0, canvas.width, canvas.height);
      let drawn = 0;
      let line = 0;
      for (let i = 0; i < data.length; i += 4) {
        if (data[i + 3] === 0) continue;
        drawn += 1;
        const d = Math.abs(data[i] - 0x00) + Math.abs(data[i + 1] - 0x72) + Math.abs(data[i + 2] - 0xb2);
        if (d < 60 && data[i + 3] > 128) line += 1;
      }
      return { drawn, line, width: canvas.width };
    })
  );
}

async function expectFinishedRun(page: Page) {
  await expect(page.getByTestId('run-status')).toHaveText('finished', { timeout: 45_000 });
  await expect(page.getByTestId('closure')).toHaveText(/^Mass balance closed: residual \S+ of throughput$/);
  await expect(page.getByTestId('solver')).not.toBeEmpty();
  await expect(page.getByTestId('steps')).toHaveText(/^[\d,]+ steps \([\d,]+ rejected\)/);
  await expect(page.getByTestId('wall-time')).toHaveText(/^\d+(\.\d)? m?s$/);

  const charts = page.getByTestId('chart');
  await expect(charts).toHaveCount(2);
  await expect(charts.nth(0)).toHaveAttribute('data-role', 'chlorophyll');
  await expect(charts.nth(1)).toHaveAttribute('data-role', 'totalP');
  await expect(charts.nth(0).locator('figcaption')).toContainText('ug/L');
  await expect(charts.nth(1).locator('figcaption')).toContainText('mg/m^3');
  await expect(page.locator('[data-testid="chart"] canvas')).toHaveCount(2);

  // Chart.js draws once it has a size; poll until both lines are on the canvases.
  await expect
    .poll(async () => (await canvasInk(page)).map((c) => c.width > 0 && c.drawn > 500 && c.line > 100))
    .toEqual([true, true]);
}

test('the first page runs the demo lake in the worker and shows closure and two charts', async ({ page }) => {
  const errors = watchErrors(page);
  await page.goto('/');
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lake Ledger');
  await expectFinishedRun(page);
  await expect(page.locator('#invented')).toContainText('invented');
  await page.screenshot({ path: 'test-results/first-page.png', fullPage: true });
  expect(errors).toEqual([]);
});

test('the first page fits a 390×844 phone screen without sideways scrolling', async ({ page }) => {
  const errors = watchErrors(page);
  await page.setViewportSize({ width: 390, height: 844 });
  await page.goto('/');
  await expectFinishedRun(page);
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/first-page-mobile.png', fullPage: true });
  expect(errors).toEqual([]);
});

test('Cancel stops a run in progress, and Run again finishes one', async ({ page }) => {
  const errors = watchErrors(page);
  // Hold the engine worker's script, so the run is certainly still going when Cancel is pressed.
  let release!: () => void;
  const held = new Promise<void>((resolve) => (release = resolve));
  await page.route(/engine\.worker[^/]*\.js(\?.*)?$/, async (route) => {
    await held;
    await route.continue().catch(() => {
      // The worker may be gone by now (terminated on cancel); nothing is waiting for it.
    });
  });

  await page.goto('/');
  await expect(page.getByTestId('run-status')).toHaveText('running');
  await expect(page.getByRole('progressbar', { name: 'Run progress' })).toBeVisible();
  await page.screenshot({ path: 'test-results/first-page-running.png' });
  await page.getByRole('button', { name: 'Cancel' }).click();
  await expect(page.getByTestId('run-status')).toHaveText('cancelled');
  await expect(page.getByRole('progressbar')).toHaveCount(0);
  await expect(page.getByTestId('closure')).toHaveCount(0);
  // Focus moves to the button that comes next.
  await expect(page.getByRole('button', { name: 'Run again' })).toBeFocused();

  release();
  await page.unroute(/engine\.worker[^/]*\.js(\?.*)?$/);
  await page.keyboard.press('Enter');
  await expectFinishedRun(page);
  expect(errors).toEqual([]);
});

test('the run can be repeated by keyboard alone', async ({ page }) => {
  const errors = watchErrors(page);
  await page.goto('/');
  await expect(page.getByTestId('run-status')).toHaveText('finished', { timeout: 45_000 });

  // Record every phase the status shows from here on.
  await page.getByTestId('run-status').evaluate((el) => {
    const seen: string[] = [];
    (window as unknown as { phasesSeen: string[] }).phasesSeen = seen;
    new MutationObserver(() => seen.push(el.textContent ?? '')).observe(el, {
      childList: true,
      characterData: true,
      subtree: true
    });
  });

  const runAgain = page.getByRole('button', { name: 'Run again' });
  for (let i = 0; i < 10 && !(await runAgain.evaluate((el) => el === document.activeElement)); i++) {
    await page.keyboard.press('Tab');
  }
  await expect(runAgain).toBeFocused();
  await page.keyboard.press('Enter');
  await expectFinishedRun(page);
  const seen = await page.evaluate(() => (window as unknown as { phasesSeen: string[] }).phasesSeen);
  expect(seen).toContain('running');
  expect(seen.at(-1)).toBe('finished');
  expect(errors).toEqual([]);
});
