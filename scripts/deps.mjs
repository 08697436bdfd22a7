/** Shared by scripts/start.mjs and scripts/test.mjs: are the npm dependencies installed and current? */
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';

// npm writes node_modules/.package-lock.json on every install, so a lock file clearly
// newer than it means the installed tree may be stale (a second of slack: one install
// writes both files, in either order).
export function dependenciesNeedInstall() {
  const marker = join('node_modules', '.package-lock.json');
  if (!existsSync(marker)) return true;
  if (!existsSync('package-lock.json')) return false;
  return statSync('package-lock.json').mtimeMs > statSync(marker).mtimeMs + 1000;
}
