import { expect, test, type BrowserContext, type Page } from '@playwright/test';

/**
 * Offline: after one visit the service worker holds the app, so with the network gone the
 * page reloads from it, the demo lake opens, its baseline runs in the engine worker with
 * the closure closed, and a deep link opens. Along the way: the document's
 * Content-Security-Policy is in place and nothing violates it, no request leaves the
 * app's origin, and the manifest is served and parses.
 */

const DEMO_TITLE = 'Lake Wendmoor: phosphorus cycle of an invented shallow lake';
/** A path nothing in the build has: fetching it offline must fail. */
const PROBE = '/offline-probe-not-in-the-build';

/** Console errors, page errors and CSP violations (reported from an init script), across reloads. */
function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (err) => errors.push(`pageerror: ${err.message}`));
  page.on('console', (msg) => {
    if (msg.type() !== 'error') return;
    // The probe's failure is expected (it proves the network is gone).
    if (msg.location().url.includes(PROBE) || msg.text().includes(PROBE)) return;
    errors.push(`console: ${msg.text()}`);
  });
  return errors;
}

async function reportViolations(context: BrowserContext) {
  await context.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      console.error(`CSP violation: ${e.violatedDirective} blocked ${e.blockedURI || '(inline)'} in ${e.sourceFile}:${e.lineNumber}`);
    });
  });
}

/** Every URL any page, worker or service worker of the context asks for. */
function recordRequests(context: BrowserContext): string[] {
  const urls: string[] = [];
  context.on('request', (request) => urls.push(request.url()));
  return urls;
}

async function waitForServiceWorkerControl(page: Page) {
  await page.evaluate(async () => {
    await navigator.serviceWorker.ready;
    if (navigator.serviceWorker.controller) return;
    await new Promise<void>((resolve) =>
      navigator.serviceWorker.addEventListener('controllerchange', () => resolve(), { once: true })
    );
  });
  expect(await page.evaluate(() => navigator.serviceWorker.controller?.scriptURL ?? null)).toMatch(/\/service-worker\.js$/);
}

test('after one visit the app reloads, runs the demo baseline and opens a deep link with the network gone', async ({ page, context, baseURL }) => {
  await reportViolations(context);
  const errors = watchErrors(page);
  const urls = recordRequests(context);

  await page.goto('/');
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lake Ledger');
  await expect(page.getByRole('link', { name: `Open ${DEMO_TITLE}`, exact: true })).toBeVisible();

  // The document carries its policy: nothing from elsewhere, no plug-ins, no eval.
  const policy = await page.locator('meta[http-equiv="content-security-policy"]').getAttribute('content');
  expect(policy).toContain("default-src 'self'");
  expect(policy).toContain("object-src 'none'");
  expect(policy).toContain("base-uri 'self'");
  expect(policy).toContain("worker-src 'self'");
  expect(policy).toMatch(/script-src 'self' 'sha256-[A-Za-z0-9+/=]+'/);
  expect(policy).not.toContain('unsafe-eval');
  expect(policy).not.toMatch(/https?:/);

  await waitForServiceWorkerControl(page);

  // Offline from here on.
  await context.setOffline(true);
  const reloaded = await page.reload();
  expect(reloaded?.fromServiceWorker()).toBe(true);
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Lake Ledger');
  // The network really is gone for the service worker too: a path it has not stored fails.
  const probe = await page.evaluate((path) => fetch(path).then((r) => `status ${r.status}`, () => 'failed'), PROBE);
  expect(probe).toBe('failed');

  // The storage line says how much is kept and whether the browser keeps it.
  await expect(page.getByTestId('storage-status')).toHaveText(
    /^Stored on this computer: \d+(\.\d)? (bytes|kB|MB|GB) of about \d+(\.\d)? (kB|MB|GB|TB) available; (kept persistently|may be cleared by the browser when space runs low)\.$/
  );

  // The demo lake opens and its baseline runs in the engine worker, closure closed.
  await page.getByRole('link', { name: `Open ${DEMO_TITLE}`, exact: true }).click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/build$/);
  const key = new URL(page.url()).pathname.split('/').at(-2)!;
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Runs' }).click();
  await expect(page).toHaveURL(/\/models\/[^/]+\/runs$/);
  await expect(page.getByTestId('job-status').first()).toHaveText('finished', { timeout: 45_000 });
  await expect(page.getByTestId('closure')).toHaveText(/^Mass balance closed: residual \S+ of throughput$/);
  await expect(page.getByTestId('chart')).toHaveCount(2);

  // A second option runs, and the two are compared, all offline.
  await page.getByRole('checkbox', { name: /^Lake Wendmoor: external load cut by half/ }).check();
  await page.getByRole('checkbox', { name: /^Lake Wendmoor, baseline/ }).uncheck();
  await page.getByRole('button', { name: 'Run the picked scenario' }).click();
  await expect(page.getByTestId('stored-run')).toHaveCount(2, { timeout: 45_000 });
  for (const box of await page.getByRole('checkbox', { name: /^Compare / }).all()) await box.check();
  await page.getByTestId('compare-picked').click();
  await expect(page.getByTestId('indicator-table').locator('tbody tr')).toHaveCount(2, { timeout: 30_000 });
  await expect(page.locator('[data-drawn-ms]')).toHaveCount(1, { timeout: 30_000 });

  // An edit on Build is saved offline like any other.
  await page.getByRole('navigation', { name: 'Model screens' }).getByRole('link', { name: 'Build' }).click();
  await page.getByLabel('value of parameter kDIP', { exact: true }).fill('3.3');
  await expect(page.getByTestId('draft-status')).toContainText('draft changed');

  // A deep link, typed or bookmarked, opens offline from the stored fallback page.
  const deep = await page.goto(`/models/${key}/balances`);
  expect(deep?.fromServiceWorker()).toBe(true);
  expect(deep?.status()).toBe(200);
  await expect(page.getByRole('heading', { name: 'Balances', level: 2 })).toBeVisible();
  await expect(page.locator('[data-testid="equation"] .katex').first()).toBeVisible();
  const fontsLoaded = await page.evaluate(async () => {
    await document.fonts.ready;
    return document.fonts.check('16px KaTeX_Main') && document.fonts.check('italic 16px KaTeX_Math');
  });
  expect(fontsLoaded).toBe(true);

  await context.setOffline(false);

  // Nothing went anywhere but this app's own origin.
  const origin = new URL(baseURL!).origin;
  const elsewhere = urls.filter((u) => !u.startsWith('data:') && !u.startsWith('blob:') && new URL(u).origin !== origin);
  expect(urls.length).toBeGreaterThan(10);
  expect(elsewhere).toEqual([]);
  expect(errors).toEqual([]);
});

test('the web app manifest is served, parses, and its icons are there', async ({ page, request }) => {
  await page.goto('/');
  const href = await page.locator('link[rel="manifest"]').getAttribute('href');
  expect(href).toBe('/manifest.webmanifest');

  const response = await request.get(href!);
  expect(response.status()).toBe(200);
  expect(response.headers()['content-type']).toMatch(/^application\/manifest\+json/);
  const manifest = JSON.parse(await response.text());
  expect(manifest).toMatchObject({ name: 'Lake Ledger', start_url: '.', display: 'standalone' });
  expect(manifest.short_name).toEqual(expect.any(String));
  expect(manifest.theme_color).toMatch(/^#[0-9a-f]{6}$/i);

  const sizes = manifest.icons.map((icon: { sizes: string }) => icon.sizes);
  expect(sizes).toEqual(expect.arrayContaining(['192x192', '512x512']));
  for (const icon of manifest.icons as Array<{ src: string; sizes: string; type: string }>) {
    const file = await request.get(new URL(icon.src, new URL(href!, page.url())).pathname);
    expect(file.status(), icon.src).toBe(200);
    expect(file.headers()['content-type']).toBe(icon.type);
    if (icon.type === 'image/png') {
      const [w, h] = icon.sizes.split('x').map(Number);
      const body = await file.body();
      // PNG header: width and height are the big-endian words at bytes 16 and 20.
      expect([body.readUInt32BE(16), body.readUInt32BE(20)]).toEqual([w, h]);
    }
  }
});
