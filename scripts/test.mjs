#!/usr/bin/env node
/**
 * `npm test`: every test, unit and browser, with one closing line `N passed, N failed`.
 *
 *   1. install dependencies if they are missing or older than the lock file;
 *   2. `svelte-kit sync`, then the unit tests (Vitest, JSON report in .reports/unit.json),
 *      then the type checks (`npm run check`, counted as one test);
 *   3. make sure a Chromium is there (LAKELEDGER_CHROMIUM, CHROMIUM_PATH, or `chromium`
 *      on PATH; installed with apt-get when running as root), and pdftotext (poppler-utils)
 *      for reading the printed report;
 *   4. `vite build`;
 *   5. the browser tests (Playwright against build/, JSON report in .reports/e2e.json);
 *   6. sum both reports.
 *
 * A failing step does not skip the later ones: unit failures still run the browser tests.
 * Browser tests that cannot run (no Chromium, failed build) count as failed.
 * Exits non-zero when anything failed or when no test ran at all.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { dependenciesNeedInstall } from './deps.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);

const REPORTS = '.reports';
const UNIT_REPORT = join(REPORTS, 'unit.json');
const E2E_REPORT = join(REPORTS, 'e2e.json');
const bin = (name) => join('node_modules', '.bin', name);

function step(title) {
  console.log(`\n── test: ${title}`);
}

/** Runs a command with its output streaming through; returns its exit status. */
function run(command, args, env = {}) {
  const r = spawnSync(command, args, { stdio: 'inherit', env: { ...process.env, ...env } });
  if (r.error) {
    console.error(`test: could not run ${command}: ${r.error.message}`);
    return 1;
  }
  return r.status ?? 1;
}

function readJson(path) {
  try {
    return JSON.parse(readFileSync(path, 'utf8'));
  } catch {
    return null;
  }
}


function commandPath(name) {
  const r = spawnSync('sh', ['-c', `command -v ${name}`], { encoding: 'utf8' });
  const path = r.status === 0 ? r.stdout.trim() : '';
  return path || null;
}

/** The Chromium to drive: from the environment, else on PATH; null when there is none. */
function findChromium() {
  for (const name of ['LAKELEDGER_CHROMIUM', 'CHROMIUM_PATH']) {
    const path = process.env[name];
    if (!path) continue;
    if (existsSync(path)) return path;
    console.error(`test: ${name}=${path} does not exist, so the browser tests cannot run (they count as failed)`);
    return null;
  }
  return commandPath('chromium') ?? commandPath('chromium-browser');
}

function ensureChromium() {
  let path = findChromium();
  if (path || process.env.LAKELEDGER_CHROMIUM || process.env.CHROMIUM_PATH) return path;
  if (typeof process.getuid === 'function' && process.getuid() === 0) {
    console.log('test: no Chromium found; installing it with apt-get');
    run('sh', ['-c', 'apt-get update && apt-get install -y --no-install-recommends chromium']);
    path = findChromium();
  }
  if (!path) {
    console.error(
      [
        'test: no Chromium found, so the browser tests cannot run (they count as failed).',
        '  Install it, e.g. `sudo apt-get install --no-install-recommends chromium` on Debian or Ubuntu,',
        '  or point LAKELEDGER_CHROMIUM at a Chromium or Chrome executable.',
        '  (Playwright must not download a browser of its own for this project.)'
      ].join('\n')
    );
  }
  return path;
}

/** pdftotext (poppler-utils) reads the printed report in the browser tests; installed when root. */
function ensurePdfText() {
  if (commandPath('pdftotext')) return;
  if (typeof process.getuid === 'function' && process.getuid() === 0) {
    console.log('test: no pdftotext found; installing poppler-utils with apt-get');
    run('sh', ['-c', 'apt-get update && apt-get install -y --no-install-recommends poppler-utils']);
  }
  if (!commandPath('pdftotext')) console.error('test: no pdftotext (poppler-utils), so the printed-report test will fail; install poppler-utils');
}

/** Counts of one Vitest JSON report; null when there is none. */
function unitCounts(report) {
  if (!report) return null;
  // A test file that fails to load has no test results but is a failure all the same.
  const brokenFiles = (report.testResults ?? []).filter(
    (f) => f.status === 'failed' && (f.assertionResults ?? []).length === 0
  ).length;
  return {
    passed: report.numPassedTests ?? 0,
    failed: (report.numFailedTests ?? 0) + brokenFiles,
    skipped: (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0)
  };
}

/** Counts of one Playwright JSON report; null when there is none. */
function browserCounts(report) {
  if (!report?.stats) return null;
  const { expected = 0, unexpected = 0, flaky = 0, skipped = 0 } = report.stats;
  // Errors outside any test (a web server that did not start, a file that does not load).
  const globalErrors = (report.errors ?? []).length;
  return {
    passed: expected + flaky,
    failed: unexpected + globalErrors,
    skipped,
    ranNone: expected + unexpected + flaky + skipped === 0
  };
}

/** How many browser tests there are, for counting them as failed when they cannot run. */
function listedBrowserTests(env) {
  const r = spawnSync(bin('playwright'), ['test', '--list'], { encoding: 'utf8', env: { ...process.env, ...env } });
  const m = /Total: (\d+) tests?/.exec(r.stdout ?? '');
  return m ? Number(m[1]) : 1;
}

const format = ({ passed, failed, skipped }) =>
  `${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`;

// 1. Dependencies.
if (dependenciesNeedInstall()) {
  const args = existsSync('package-lock.json') ? ['ci'] : ['install'];
  step(`installing dependencies (npm ${args[0]})`);
  if (run('npm', args) !== 0) {
    console.error('test: installing dependencies failed; nothing can run');
    console.log(format({ passed: 0, failed: 1, skipped: 0 }));
    process.exit(1);
  }
}

rmSync(UNIT_REPORT, { force: true });
rmSync(E2E_REPORT, { force: true });
mkdirSync(REPORTS, { recursive: true });

// 2. Unit tests.
step('unit tests');
run(bin('svelte-kit'), ['sync']);
const unitStatus = run(bin('vitest'), [
  'run',
  '--reporter=default',
  '--reporter=json',
  `--outputFile=${UNIT_REPORT}`
]);
let unit = unitCounts(readJson(UNIT_REPORT));
if (!unit) {
  console.error(`test: the unit tests wrote no report (exit ${unitStatus}); counted as 1 failed`);
  unit = { passed: 0, failed: 1, skipped: 0 };
} else if (unitStatus !== 0 && unit.failed === 0) {
  console.error(`test: vitest exited with ${unitStatus} without a failed test; counted as 1 failed`);
  unit.failed = 1;
}

// 2b. Type checks (svelte-check over the app, tsc over the engine without DOM or Node
// types): counted as one test, passed or failed.
step('type checks (npm run check)');
const checkStatus = run('npm', ['run', '-s', 'check']);
const checks = { passed: checkStatus === 0 ? 1 : 0, failed: checkStatus === 0 ? 0 : 1, skipped: 0 };
if (checkStatus !== 0) console.error('test: the type checks failed (counted as 1 failed)');

// 3. Chromium.
step('Chromium');
const chromium = ensureChromium();
ensurePdfText();
const browserEnv = chromium ? { LAKELEDGER_CHROMIUM: chromium } : {};

// 4. Build; 5. browser tests.
let browser;
if (!chromium) {
  browser = { passed: 0, failed: listedBrowserTests(browserEnv), skipped: 0 };
} else {
  step('build');
  const buildStatus = run(bin('vite'), ['build']);
  if (buildStatus !== 0) {
    console.error('test: the build failed, so the browser tests cannot run (they count as failed)');
    browser = { passed: 0, failed: listedBrowserTests(browserEnv), skipped: 0 };
  } else {
    step('browser tests');
    const e2eStatus = run(bin('playwright'), ['test'], browserEnv);
    browser = browserCounts(readJson(E2E_REPORT));
    if (browser && browser.passed + browser.skipped === 0 && browser.failed > 0 && browser.ranNone) {
      // Nothing ran (say the web server did not start): every browser test counts as failed.
      browser.failed = Math.max(browser.failed, listedBrowserTests(browserEnv));
    }
    if (!browser) {
      console.error(`test: the browser tests wrote no report (exit ${e2eStatus}); counted as failed`);
      browser = { passed: 0, failed: listedBrowserTests(browserEnv), skipped: 0 };
    } else if (e2eStatus !== 0 && browser.failed === 0) {
      console.error(`test: playwright exited with ${e2eStatus} without a failed test; counted as 1 failed`);
      browser.failed = 1;
    }
  }
}

// 6. Sum.
const total = {
  passed: unit.passed + checks.passed + browser.passed,
  failed: unit.failed + checks.failed + browser.failed,
  skipped: unit.skipped + browser.skipped
};
console.log(`\nunit: ${format(unit)}; type checks: ${format(checks)}; browser: ${format(browser)}`);
console.log(format(total));
process.exit(total.failed > 0 || total.passed + total.failed === 0 ? 1 : 0);
