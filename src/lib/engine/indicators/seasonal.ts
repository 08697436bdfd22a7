/**
 * Seasonal and annual statistics of a daily series: the growing-season mean for each
 * calendar year (April–September by default, a common choice for shallow temperate
 * lakes; configurable), the annual mean, days above a target, and the first year from
 * which a target is met every year to the end.
 * A year counts only when the whole season lies inside the series; missing (NaN) days
 * are skipped, and a season with no valid day gives NaN.
 */
import { dateOfDay, type DailySeries } from './daily';

export interface Season {
  /** First month, 1–12 (default 4, April). */
  fromMonth: number;
  /** Last month, 1–12, inclusive (default 9, September). */
  toMonth: number;
}

export const GROWING_SEASON: Readonly<Season> = Object.freeze({ fromMonth: 4, toMonth: 9 });

export interface YearValue {
  year: number;
  value: number;
  /** Days that entered the value. */
  days: number;
}

function inSeason(month1: number, s: Season): boolean {
  return s.fromMonth <= s.toMonth ? month1 >= s.fromMonth && month1 <= s.toMonth : month1 >= s.fromMonth || month1 <= s.toMonth;
}

/** Per calendar year, what `pick` does with the days of `season` in that year. */
function perYear(series: DailySeries, season: Season | null, reduce: (vals: number[]) => number): YearValue[] {
  const groups = new Map<number, number[]>();
  const complete = new Map<number, boolean>();
  const n = series.values.length;
  const first = dateOfDay(series.start, 0);
  const lastDate = dateOfDay(series.start, n - 1);
  for (let d = 0; d < n; d++) {
    const date = dateOfDay(series.start, d);
    const m = date.getUTCMonth() + 1;
    if (season && !inSeason(m, season)) continue;
    const y = date.getUTCFullYear();
    const list = groups.get(y) ?? [];
    list.push(series.values[d]);
    groups.set(y, list);
  }
  for (const y of groups.keys()) {
    // the season (or year) must lie wholly inside the series
    const from = season ? new Date(Date.UTC(y, season.fromMonth - 1, 1)) : new Date(Date.UTC(y, 0, 1));
    const to = season ? new Date(Date.UTC(y, season.toMonth, 0)) : new Date(Date.UTC(y, 11, 31));
    complete.set(y, from >= first && to <= lastDate);
  }
  return [...groups.entries()]
    .filter(([y]) => complete.get(y))
    .map(([year, vals]) => {
      const ok = vals.filter((v) => Number.isFinite(v));
      return { year, value: ok.length ? reduce(ok) : NaN, days: ok.length };
    });
}

const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;

export function seasonalMeans(series: DailySeries, season: Season = GROWING_SEASON): YearValue[] {
  return perYear(series, season, mean);
}

export function annualMeans(series: DailySeries): YearValue[] {
  return perYear(series, null, mean);
}

/** Days per year (within `season` when given) on which the value exceeds `target`. */
export function daysAbove(series: DailySeries, target: number, season: Season | null = null): YearValue[] {
  return perYear(series, season, (v) => v.filter((x) => x > target).length);
}

/** Mean of the last `years` yearly values (NaN when there are fewer). */
export function meanOfLast(values: YearValue[], years: number): number {
  if (values.length < years) return NaN;
  return mean(values.slice(-years).map((v) => v.value));
}

/**
 * The first year from which `meets(value)` holds in every later year to the end of the
 * series, or null when the last year does not meet it.
 */
export function firstYearMetAndStays(values: YearValue[], meets: (v: number) => boolean): number | null {
  let year: number | null = null;
  for (let i = values.length - 1; i >= 0; i--) {
    if (!Number.isFinite(values[i].value) || !meets(values[i].value)) break;
    year = values[i].year;
  }
  return year;
}
