/** What the browser tests share: the demo lake's title and a watch on page errors. */
import type { Page } from '@playwright/test';

/** The title of the shipped demo lake (static/examples/demo-lake.model.json). */
export const DEMO = 'Lake Wendmoor: phosphorus cycle of an invented shallow lake';

/** Collects uncaught page errors and console errors; a test ends with `expect(errors).toEqual([])`. */
export function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (err) => errors.push(`pageerror: ${err.message}`));
  page.on('console', (msg) => {
    if (msg.type() === 'error') errors.push(`console: ${msg.text()}`);
  });
  return errors;
}
