#!/usr/bin/env node
/**
 * `npm start`: install dependencies if they are missing or older than the lock file,
 * build the app, and serve build/ on http://127.0.0.1:4173 (PORT overrides) until Ctrl-C.
 * The demo lake is bundled into the app, so it is ready on the first page.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { dependenciesNeedInstall } from './deps.mjs';
import { DEFAULT_PORT, HOST, serveBuild } from './serve-build.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);

function sh(command, args) {
  const r = spawnSync(command, args, { stdio: 'inherit', shell: process.platform === 'win32' });
  if (r.error) throw r.error;
  return r.status ?? 1;
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
