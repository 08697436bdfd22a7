import { expect, test, type Page } from '@playwright/test';
import { watchErrors } from './support';

/**
 * A new user's first minutes: the Models page lists the demo lake at once; it opens, and
 * its Runs screen runs the baseline in the worker with closure, progress, cancel and two
 * charts. Every test starts with a fresh browser profile, so the library is seeded anew.
 */

const DEMO_TITLE = 'Lake Wendmoor: phosphorus cycle of an invented shallow lake';

/** Fails the test on any uncaught page error or console error. */

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

/** From the Models page to the Runs screen of the model titled `title`, by its links. */
async function openRuns(page: Page, title = DEMO_TITLE) {
  await page.goto('/');
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lake Ledger');
  await page.getByRole('link', { name: `Open ${title}`, exact: true }).click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/build$/);
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Runs' }).click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/runs$/);
}

async function expectFinishedRun(page: Page, charts: { role: string; unit: string }[]) {
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 45_000 });
  await expect(page.getByTestId('job-closure').first()).toHaveText(/^closed, \S+ of throughput$/);
  await expect(page.getByTestId('stored-run').first()).toBeVisible();
  await expect(page.getByTestId('closure')).toHaveText(/^Mass balance closed: residual \S+ of throughput$/);
  await expect(page.getByTestId('solver')).not.toBeEmpty();
  await expect(page.getByTestId('steps')).toHaveText(/^[\d,]+ steps \([\d,]+ rejected\)/);
  await expect(page.getByTestId('wall-time')).toHaveText(/^\d+(\.\d)? m?s$/);

  const figures = page.getByTestId('chart');
  await expect(figures).toHaveCount(charts.length);
  for (const [i, c] of charts.entries()) {
    if (c.role) await expect(figures.nth(i)).toHaveAttribute('data-role', c.role);
    await expect(figures.nth(i).locator('figcaption')).toContainText(c.unit);
  }
  await expect(page.locator('[data-testid="chart"] canvas')).toHaveCount(charts.length);

  // Chart.js draws once it has a size; poll until every line is on its canvas.
  await expect
    .poll(async () => (await canvasInk(page)).map((c) => c.width > 0 && c.drawn > 500 && c.line > 100))
    .toEqual(charts.map(() => true));
}

const DEMO_CHARTS = [
  { role: 'chlorophyll', unit: 'ug/L' },
  { role: 'totalP', unit: 'mg/m^3' }
];

test('a new user opens the demo lake and its Runs screen runs the baseline with closure and two charts', async ({ page }) => {
  const errors = watchErrors(page);
  await openRuns(page);
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(DEMO_TITLE);
  await expect(page.getByTestId('job').first()).toContainText('Lake Wendmoor, baseline: present load, no measures');
  await expectFinishedRun(page, DEMO_CHARTS);
  // The run refers to revisions: the demo lake's first and its baseline's first, and is stored.
  await expect(page.getByTestId('job').first()).toContainText('model r1, scenario r1');
  await expect(page.getByTestId('stored-run')).toHaveCount(1);
  await expect(page.getByTestId('stored-closure')).toHaveText(/closed, \S+ of throughput/);
  await expect(page.getByTestId('shown-run').getByRole('heading')).toHaveText('Lake Wendmoor, baseline: present load, no measures, 2027-01-01 on');
  await page.screenshot({ path: 'test-results/runs-demo.png', fullPage: true });
  expect(errors).toEqual([]);
});

test('the Runs screen fits a 390×844 phone screen without sideways scrolling', async ({ page }) => {
  const errors = watchErrors(page);
  await page.setViewportSize({ width: 390, height: 844 });
  await openRuns(page);
  await expectFinishedRun(page, DEMO_CHARTS);
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(0);
  await page.screenshot({ path: 'test-results/runs-demo-mobile.png', fullPage: true });
  expect(errors).toEqual([]);
});

test.describe('with the service worker kept out, so the test can hold the engine script', () => {
  // The service worker would serve the engine worker's script from its cache, out of
  // reach of page.route; offline.test.ts tests the service worker itself.
  test.use({ serviceWorkers: 'block' });

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

  await openRuns(page);
  await expect(page.getByTestId('job-status')).toHaveText('running');
  await expect(page.getByRole('progressbar', { name: /^Progress of Lake Wendmoor, baseline/ })).toBeVisible();
  await page.screenshot({ path: 'test-results/runs-running.png' });
  await page.getByRole('button', { name: 'Cancel' }).click();
  await expect(page.getByTestId('job-status')).toHaveText('cancelled');
  await expect(page.getByRole('progressbar')).toHaveCount(0);
  await expect(page.getByTestId('closure')).toHaveCount(0);
  await expect(page.getByTestId('stored-run')).toHaveCount(0);
  // Focus moves to the button that comes next.
  await expect(page.getByRole('button', { name: 'Run again' })).toBeFocused();

  release();
  await page.unroute(/engine\.worker[^/]*\.js(\?.*)?$/);
  await page.keyboard.press('Enter');
  await expectFinishedRun(page, DEMO_CHARTS);
  expect(errors).toEqual([]);
});

});

test('the run can be repeated by keyboard alone', async ({ page }) => {
  const errors = watchErrors(page);
  await openRuns(page);
  await expect(page.getByTestId('job-status')).toHaveText('finished', { timeout: 45_000 });

  // Record every phase the status shows from here on.
  await page.getByTestId('job-status').evaluate((el) => {
    const seen: string[] = [];
    (window as unknown as { phasesSeen: string[] }).phasesSeen = seen;
    new MutationObserver(() => seen.push(el.textContent ?? '')).observe(el, {
      childList: true,
      characterData: true,
      subtree: true
    });
  });

  const runAgain = page.getByRole('button', { name: 'Run again' });
  for (let i = 0; i < 60 && !(await runAgain.evaluate((el) => el === document.activeElement)); i++) {
    await page.keyboard.press('Tab');
  }
  await expect(runAgain).toBeFocused();
  await page.keyboard.press('Enter');
  await expectFinishedRun(page, DEMO_CHARTS);
  const seen = await page.evaluate(() => (window as unknown as { phasesSeen: string[] }).phasesSeen);
  expect(seen).toContain('running');
  expect(seen.at(-1)).toBe('finished');
  expect(errors).toEqual([]);
});

test('a model without a chlorophyll role charts its state instead (the one-box lake)', async ({ page }) => {
  const errors = watchErrors(page);
  await openRuns(page, 'Lake Ambrel: one-box phosphorus model');
  await expect(page.getByTestId('job')).toContainText('Baseline (no measures)');
  await expectFinishedRun(page, [{ role: '', unit: 'mg/m^3' }]);
  await expect(page.getByTestId('chart')).toHaveAttribute('data-series', 'TP');
  expect(errors).toEqual([]);
});

test('a model whose draft has problems says so on Runs, links to Build and runs nothing', async ({ page }) => {
  const errors = watchErrors(page);
  await page.goto('/');
  await expect(page.getByTestId('entry')).toHaveCount(3);
  // Break the one-box lake's draft, as an unfinished edit would leave it.
  const href = await page.getByRole('link', { name: 'Open Lake Ambrel: one-box phosphorus model', exact: true }).getAttribute('href');
  const key = decodeURIComponent(href!.split('/').at(-2)!);
  await page.evaluate(
    (entryKey) =>
      new Promise<void>((resolve, reject) => {
        const open = indexedDB.open('lakeledger');
        open.onerror = () => reject(open.error);
        open.onsuccess = () => {
          const db = open.result;
          const tx = db.transaction(['revisions', 'drafts'], 'readwrite');
          const get = tx.objectStore('revisions').get([entryKey, 1]);
          get.onsuccess = () => {
            const doc = structuredClone(get.result.doc);
            doc.flows[0].rate = 'Q/V * Pinn';
            tx.objectStore('drafts').put({ entryKey, doc, savedAt: new Date().toISOString() });
          };
          tx.oncomplete = () => {
            db.close();
            resolve();
          };
          tx.onerror = () => reject(tx.error);
        };
      }),
    key
  );
  await page.goto(href!.replace(/build$/, 'runs'));
  await expect(page.getByRole('heading', { name: 'This model cannot run yet' })).toBeVisible();
  await expect(page.getByText('Its draft has 1 problem, so the engine cannot run it.')).toBeVisible();
  await expect(page.getByRole('link', { name: 'Fix it in Build' })).toHaveAttribute('href', href!);
  await expect(page.getByTestId('job-status')).toHaveCount(0);
  expect(errors).toEqual([]);
});
