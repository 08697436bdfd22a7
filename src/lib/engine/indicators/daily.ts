/**
 * Indicators are computed from daily values whatever the run's output step: a series on
 * another grid is interpolated linearly to every day (UTC midnight) of the period. With
 * the default output step of 1 day this is the series itself.
 */
export interface DailySeries {
  /** ISO date of day 0. */
  start: string;
  /** Value on each day 0, 1, 2, … (NaN where the run did not reach). */
  values: Float64Array;
}

export function toDaily(start: string, times: readonly number[], values: readonly number[]): DailySeries {
  const n = times.length;
  if (n === 0) return { start, values: new Float64Array(0) };
  const last = Math.floor(times[n - 1] + 1e-9);
  const out = new Float64Array(last + 1);
  let k = 0;
  for (let d = 0; d <= last; d++) {
    while (k < n - 1 && times[k + 1] < d - 1e-9) k++;
    if (Math.abs(times[k] - d) < 1e-9) out[d] = values[k];
    else if (k < n - 1) {
      const w = (d - times[k]) / (times[k + 1] - times[k]);
      out[d] = values[k] + w * (values[k + 1] - values[k]);
    } else out[d] = values[n - 1];
  }
  return { start, values: out };
}

/** The UTC calendar date of day `d` of a series starting at `start`. */
export function dateOfDay(start: string, d: number): Date {
  return new Date(Date.parse(`${start}T00:00:00Z`) + d * 86400000);
}
