/**
 * Thins the engine's progress reports before they cross to the page: one message per
 * `minIntervalMs` at most, except that the first report and the end (fraction 1) always
 * pass, so the bar starts at once and never stops short.
 */

export interface ProgressThrottleOptions {
  /** Least time between two reports that pass, milliseconds. Default 100. */
  minIntervalMs?: number;
  /** Clock in milliseconds. Default `performance.now`. */
  now?: () => number;
}

export const DEFAULT_PROGRESS_INTERVAL_MS = 100;

/** Returns `shouldSend(fraction)`: true when this report is to be passed on. */
export function createProgressThrottle(
  options: ProgressThrottleOptions = {}
): (fraction: number) => boolean {
  const minInterval = options.minIntervalMs ?? DEFAULT_PROGRESS_INTERVAL_MS;
  const now = options.now ?? (() => performance.now());
  let last = -Infinity;
  let sentEnd = false;
  return (fraction) => {
    if (fraction >= 1) {
      if (sentEnd) return false;
      sentEnd = true;
      last = now();
      return true;
    }
    const t = now();
    if (t - last < minInterval) return false;
    last = t;
    return true;
  };
}
