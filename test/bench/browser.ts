/**
 * `npm run bench`, part two: the app itself in Debian's Chromium (a benchmark, not a test;
 * it prints what it measured and passes or fails nothing).
 *   4. the four demo scenarios over 20 years through the worker pool of the Runs screen:
 *      from the click to the last finished run, against the sum of the runs' own times;
 *   5. the comparison of 8 runs × 20 years of daily output, as the screen measures itself
 *      (`data-loaded-ms`, `data-drawn-ms`: performance.now() since navigation): the time to
 *      read the runs and compute their indicators, then to the first full render of the charts.
 * Builds the app first unless BENCH_NO_BUILD is set. The machine is noisy: repeat and
 * compare medians.
 */
import { execSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { chromium, type Page } from 'playwright-core';
// @ts-expect-error: a plain ES module script without types
import { serveBuild } from '../../scripts/serve-build.mjs';

const PORT = Number(process.env.BENCH_PORT ?? 4329);
const REPEATS = Number(process.env.BENCH_BROWSER_REPEATS ?? 3);
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const n = s.length;
  return n % 2 ? s[(n - 1) / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
};

function chromiumPath(): string {
  const fromEnv = process.env.LAKELEDGER_CHROMIUM || process.env.CHROMIUM_PATH;
  if (fromEnv) return fromEnv;
  return execSync('command -v chromium || command -v chromium-browser', { shell: '/bin/sh', encoding: 'utf8' }).trim();
}

async function openRuns(page: Page, base: string) {
  await page.goto(`${base}/`);
  await page.getByRole('link', { name: /^Open Lake Wendmoor/ }).click();
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Runs' }).click();
  // The first visit runs the baseline by itself.
  await page.getByTestId('job-status').first().filter({ hasText: 'finished' }).waitFor({ timeout: 120_000 });
}

/** Runs every scenario of the demo and waits for all of them; returns the wall time in ms. */
async function runAll(page: Page): Promise<{ wallMs: number; jobs: number }> {
  const clear = page.getByRole('button', { name: 'Clear finished' });
  if (await clear.count()) await clear.click();
  await page.getByRole('button', { name: 'Pick all' }).click();
  const t0 = Date.now();
  await page.getByRole('button', { name: /^Run the \d+ picked scenarios$/ }).click();
  await page.waitForFunction(
    () => {
      const s = [...document.querySelectorAll('[data-testid="job-status"]')].map((e) => e.textContent);
      return s.length >= 4 && s.every((x) => x === 'finished' || x === 'failed');
    },
    undefined,
    { timeout: 300_000, polling: 50 }
  );
  return { wallMs: Date.now() - t0, jobs: await page.getByTestId('job').count() };
}

async function main() {
  if (!process.env.BENCH_NO_BUILD || !existsSync('build/200.html')) {
    console.log('building the app (vite build)…');
    execSync('npx vite build', { stdio: 'ignore' });
  }
  const server = await serveBuild({ root: 'build', port: PORT });
  const browser = await chromium.launch({ executablePath: chromiumPath() });
  const base = `http://127.0.0.1:${PORT}`;
  try {
    // ------------------------------------------------------------ 4. four scenarios, pool
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    await openRuns(page, base);
    const cores = await page.evaluate(() => navigator.hardwareConcurrency);
    const walls: number[] = [];
    let sums: number[] = [];
    for (let i = 0; i < REPEATS; i++) {
      const { wallMs } = await runAll(page);
      walls.push(wallMs);
      // The runs' own times (engine wall time in the worker), from the stored-runs table.
      sums.push(
        await page.evaluate(() =>
          [...document.querySelectorAll('[data-testid="stored-run"] td:nth-child(6)')]
            .map((td) => td.textContent ?? '')
            .map((t) => (t.endsWith(' ms') ? Number(t.slice(0, -3)) : Number(t.slice(0, -2)) * 1000))
            .reduce((a, b) => a + b, 0)
        )
      );
    }
    sums = sums.filter((x) => Number.isFinite(x));
    console.log(`4. the four demo scenarios, 20 years each, through the Runs screen's worker pool`);
    console.log(`   ${cores} logical cores, so ${Math.max(1, cores - 1)} worker(s); ${REPEATS} repeats`);
    console.log(`   click to the last run finished: median ${(median(walls) / 1000).toFixed(2)} s (${walls.map((w) => (w / 1000).toFixed(2)).join(', ')})`);
    if (sums.length) console.log(`   the four runs' own engine times, summed: ${(median(sums) / 1000).toFixed(2)} s`);

    // ------------------------------------------------------------ 5. comparison of 8 runs
    const compare = await page.evaluate(() => Boolean(document.querySelector('a[href$="/compare"]')));
    if (!compare) {
      console.log('5. comparison: the Compare screen is not in this build');
    } else {
      const drawn = await benchCompare(page);
      if (drawn) {
        console.log(`5. comparison of ${drawn.runs} runs × 20 years of daily output (${drawn.points} points a series)`);
        console.log(`   page opened to all 8 runs read and their indicators computed: median ${median(drawn.loads).toFixed(0)} ms (${drawn.loads.map((m) => m.toFixed(0)).join(', ')})`);
        console.log(`   then to every chart drawn (first full render): median ${median(drawn.ms).toFixed(0)} ms (${drawn.ms.map((m) => m.toFixed(0)).join(', ')})`);
      }
    }
    await context.close();
  } finally {
    await browser.close();
    server.close();
  }
}

/**
 * Eight stored runs: the four demo scenarios under the model as shipped, and the same four
 * under a second revision with the inflow P changed on the Build screen (so every run
 * differs); then Compare with all eight.
 */
async function benchCompare(page: Page): Promise<{ runs: number; points: number; ms: number[]; loads: number[] } | null> {
  const runsUrl = page.url();
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Build' }).click();
  const pin = page.getByLabel('value of parameter Pin', { exact: true });
  await pin.fill('200');
  await pin.press('Tab');
  await page.waitForTimeout(800);
  await page.goto(runsUrl);
  await page.getByRole('button', { name: 'Pick all' }).waitFor();
  await runAll(page);
  const ids = await page.evaluate(() =>
    [...document.querySelectorAll('[data-testid="stored-run"]')].map((r) => r.getAttribute('data-run-id') ?? '')
  );
  const eight = [...new Set(ids)].slice(0, 8);
  if (eight.length < 8) console.log(`   (only ${eight.length} distinct stored runs)`);
  const url = runsUrl.replace(/\/runs$/, `/compare?runs=${eight.join(',')}`);
  const ms: number[] = [];
  const loads: number[] = [];
  for (let i = 0; i < REPEATS; i++) {
    await page.goto(url);
    const handle = await page.waitForSelector('[data-drawn-ms]', { timeout: 60_000 });
    const drawn = Number(await handle.getAttribute('data-drawn-ms'));
    const loadedAt = Number(await handle.getAttribute('data-loaded-ms'));
    ms.push(drawn - loadedAt);
    loads.push(loadedAt);
    if (process.env.BENCH_MARKS) {
      console.log(await page.evaluate(() => performance.getEntriesByType('mark').map((m) => `${m.name} ${m.startTime.toFixed(0)}`).join('; ')));
      console.log(await page.evaluate(() => `domContentLoaded ${(performance.getEntriesByType('navigation')[0] as PerformanceNavigationTiming).domContentLoadedEventEnd.toFixed(0)}`));
    }
  }
  const points = await page.evaluate(() => Number(document.querySelector('[data-points]')?.getAttribute('data-points') ?? NaN));
  return { runs: eight.length, points, ms, loads };
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
