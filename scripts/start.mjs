#!/usr/bin/env node
/**
 * `npm start`: install dependencies if they are missing or older than the lock file,
 * build the app, and serve build/ on http://127.0.0.1:4173 (PORT overrides) until Ctrl-C.
 * The demo lake is bundled into the app, so it is ready on the first page.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEFAULT_PORT, HOST, serveBuild } from './serve-build.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);

function sh(command, args) {
  const r = spawnSync(command, args, { stdio: 'inherit', shell: process.platform === 'win32' });
  if (r.error) throw r.error;
  return r.status ?? 1;
}

// Same rule as scripts/test.mjs: npm writes node_modules/.package-lock.json on every
// install, so a lock file clearly newer than it means the installed tree may be stale
// (a second of slack: one install writes both files, in either order).
function dependenciesNeedInstall() {
  const marker = join('node_modules', '.package-lock.json');
  if (!existsSync(marker)) return true;
  if (!existsSync('package-lock.json')) return false;
  return statSync('package-lock.json').mtimeMs > statSync(marker).mtimeMs + 1000;
}

if (dependenciesNeedInstall()) {
  const args = existsSync('package-lock.json') ? ['ci'] : ['install'];
  console.log(`start: installing dependencies (npm ${args[0]})`);
  if (sh('npm', args) !== 0) {
    console.error('start: installing dependencies failed');
    process.exit(1);
  }
}

console.log('start: building the app');
if (sh(join('node_modules', '.bin', 'vite'), ['build']) !== 0) {
  console.error('start: the build failed');
  process.exit(1);
}

const port = Number(process.env.PORT ?? DEFAULT_PORT);
try {
  await serveBuild({ root: 'build', port });
} catch (err) {
  console.error(
    err.code === 'EADDRINUSE'
      ? `start: port ${port} on ${HOST} is already in use; stop what uses it or set PORT.`
      : `start: ${err.message}`
  );
  process.exit(1);
}
console.log(`\nLake Ledger is ready at http://${HOST}:${port}/  (Ctrl-C stops it)`);
const stop = () => process.exit(0);
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
