/**
 * Browser tests: Debian's Chromium (never a browser downloaded by Playwright) against the
 * built app in build/, served by scripts/serve-build.mjs. `npm test` builds first.
 */
import { execSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { defineConfig } from '@playwright/test';

const PORT = Number(process.env.LAKELEDGER_E2E_PORT ?? 4319);

/** LAKELEDGER_CHROMIUM, else CHROMIUM_PATH, else the `chromium` that `command -v` finds. */
function chromiumPath(): string | undefined {
  const fromEnv = process.env.LAKELEDGER_CHROMIUM || process.env.CHROMIUM_PATH;
  if (fromEnv) return fromEnv;
  try {
    return execSync('command -v chromium || command -v chromium-browser', { shell: '/bin/sh', encoding: 'utf8' }).trim() || undefined;
  } catch {
    return undefined;
  }
}

const executablePath = chromiumPath();
const listing = process.argv.includes('--list');
if (!listing && (!executablePath || !existsSync(executablePath))) {
  throw new Error(
    `No Chromium found${executablePath ? ` at ${executablePath}` : ''}. Install Debian's (apt-get install --no-install-recommends chromium) ` +
      'or set LAKELEDGER_CHROMIUM to a Chromium executable. Do not let Playwright download one.'
  );
}

export default defineConfig({
  testDir: 'e2e',
  testMatch: '**/*.test.ts',
  outputDir: 'test-results',
  workers: 1,
  fullyParallel: false,
  forbidOnly: !!process.env.CI,
  retries: 0,
  timeout: 60_000,
  expect: { timeout: 15_000 },
  reporter: [['list'], ['json', { outputFile: '.reports/e2e.json' }]],
  use: {
    baseURL: `http://127.0.0.1:${PORT}`,
    browserName: 'chromium',
    viewport: { width: 1280, height: 800 },
    timezoneId: 'UTC',
    locale: 'en-GB',
    trace: 'off',
    screenshot: 'only-on-failure',
    launchOptions: {
      executablePath,
      args: [
        '--disable-gpu',
        '--disable-quic',
        '--no-sandbox',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--no-first-run'
      ]
    }
  },
  webServer: {
    command: `node scripts/serve-build.mjs --port ${PORT}`,
    url: `http://127.0.0.1:${PORT}/`,
    reuseExistingServer: false,
    timeout: 30_000,
    stdout: 'ignore',
    stderr: 'pipe'
  }
});
