#!/usr/bin/env node
/**
 * Draws the PNG icons of the web app manifest from static/icons/icon.svg with Chromium
 * (LAKELEDGER_CHROMIUM, else the `chromium` on the PATH). Run again after changing the SVG:
 *
 *   node scripts/make-icons.mjs
 */
import { execSync } from 'node:child_process';
import { readFile } from 'node:fs/promises';
import { chromium } from 'playwright-core';

const SIZES = [192, 512];
const executablePath =
  process.env.LAKELEDGER_CHROMIUM || execSync('command -v chromium', { shell: '/bin/sh', encoding: 'utf8' }).trim();

const svg = await readFile('static/icons/icon.svg', 'utf8');
const browser = await chromium.launch({ executablePath, args: ['--disable-gpu', '--no-sandbox'] });
try {
  for (const size of SIZES) {
    const page = await browser.newPage({ viewport: { width: size, height: size } });
    const sized = svg.replace(/width="\d+" height="\d+"/, `width="${size}" height="${size}"`);
    await page.setContent(`<html><body style="margin:0">${sized}</body></html>`);
    await page.screenshot({ path: `static/icons/icon-${size}.png`, omitBackground: true, clip: { x: 0, y: 0, width: size, height: size } });
    await page.close();
    console.log(`static/icons/icon-${size}.png`);
  }
} finally {
  await browser.close();
}
