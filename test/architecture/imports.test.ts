/**
 * Imports point one way (DEVELOPERS.md, architecture): the engine imports nothing of the
 * DOM, Svelte, Dexie or Node; only storage imports Dexie; worker and cli import the engine;
 * ui and routes import storage, the worker client and engine types.
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';

const root = process.cwd();

function files(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...files(p));
    else if (/\.(ts|svelte)$/.test(name) && !/\.test\.ts$/.test(name)) out.push(p);
  }
  return out;
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const out: string[] = [];
  for (const m of text.matchAll(/(?:^|\n)\s*(?:import|export)\s[^'"]*?from\s+['"]([^'"]+)['"]/g)) out.push(m[1]);
  for (const m of text.matchAll(/(?:^|\n)\s*import\s+['"]([^'"]+)['"]/g)) out.push(m[1]);
  for (const m of text.matchAll(/import\(\s*['"]([^'"]+)['"]\s*\)/g)) out.push(m[1]);
  return out;
}

const rules: { folder: string; forbidden: RegExp[]; why: string }[] = [
  {
    folder: 'src/lib/engine',
    forbidden: [/^svelte/, /^\$app/, /^\$lib\/(storage|worker|ui)/, /^dexie/, /^node:/, /^(fs|path|os|child_process|crypto)$/, /^chart\.js/, /\.\.\/(storage|worker|ui)\//],
    why: 'the engine is plain TypeScript that runs in a worker and under Node'
  },
  {
    folder: 'src/lib/archive',
    forbidden: [/^svelte/, /^\$app/, /^dexie/, /^node:/, /^(fs|path|os|zlib|crypto)$/, /^chart\.js/, /\.\.\/(storage|worker|ui)\//],
    why: 'records, log and bundles are plain TypeScript over the engine, for the browser and the CLI alike'
  },
  {
    folder: 'src/lib/scenario',
    forbidden: [/^svelte/, /^\$app/, /^\$lib\/(storage|worker|ui)/, /^dexie/, /^node:/, /^chart\.js/],
    why: 'the measure catalogue is data and pure functions over engine types'
  },
  { folder: 'src/lib/worker', forbidden: [/^dexie/, /^svelte/, /^chart\.js/, /\/ui\//, /\/storage\//], why: 'the worker runs the engine only' },
  { folder: 'src/cli', forbidden: [/^dexie/, /^svelte/, /^chart\.js/, /\/ui\//, /\/storage\//], why: 'the CLI is argv → engine → JSON' }
];

describe('import rules', () => {
  for (const rule of rules) {
    it(`${rule.folder} imports nothing it must not (${rule.why})`, () => {
      const bad: string[] = [];
      for (const f of files(join(root, rule.folder))) {
        for (const spec of importsOf(f)) {
          if (rule.forbidden.some((r) => r.test(spec))) bad.push(`${relative(root, f)} imports ${spec}`);
        }
      }
      expect(bad).toEqual([]);
    });
  }

  it('only src/lib/storage imports dexie', () => {
    const bad: string[] = [];
    for (const f of files(join(root, 'src'))) {
      if (relative(root, f).startsWith(join('src', 'lib', 'storage'))) continue;
      if (importsOf(f).some((s) => s === 'dexie' || s.startsWith('dexie/'))) bad.push(relative(root, f));
    }
    expect(bad).toEqual([]);
  });

  it('the import scanner sees imports (a check that can fail)', () => {
    const own = importsOf(join(root, 'test', 'architecture', 'imports.test.ts'));
    expect(own).toContain('vitest');
    expect(own).toContain('node:fs');
  });
});
