/**
 * Observations beside a run's series: each observation date becomes a day of the run
 * (days since the run's `start`, UTC) and the simulated value there is read from the series
 * resampled to days (`indicators/daily.ts`). Observations before the start or after the
 * last output are counted as outside the period, never silently paired.
 */
import type { RunDoc } from '../document/types';
import { toDaily } from '../indicators/daily';
import type { Censoring, ObservationSet } from './observations';

export interface Pair {
  date: string;
  /** Calendar month 1–12 (UTC), for seasons. */
  month: number;
  obs: number;
  sim: number;
  censored: Censoring;
}

export interface Matched {
  /** Pairs per series id, in date order. */
  pairs: Record<string, Pair[]>;
  /** Observations outside the run's period, per series id. */
  outside: Record<string, number>;
}

export function dayOf(start: string, date: string): number {
  return Math.round((Date.parse(`${date}T00:00:00Z`) - Date.parse(`${start}T00:00:00Z`)) / 86400000);
}

/** Day index of every observation point of `set` in a run starting at `start` (null outside 0..lastDay). */
export function observationDays(set: ObservationSet, start: string, lastDay: number): (number | null)[] {
  return set.points.map((p) => {
    const d = dayOf(start, p.date);
    return d >= 0 && d <= lastDay ? d : null;
  });
}

export function matchRun(set: ObservationSet, run: RunDoc): Matched {
  const pairs: Record<string, Pair[]> = Object.create(null);
  const outside: Record<string, number> = Object.create(null);
  const daily = new Map<string, Float64Array>();
  for (const p of set.points) {
    let values = daily.get(p.variable);
    if (!values) {
      const s = run.series[p.variable];
      values = s ? toDaily(run.start, run.times, s).values : new Float64Array(0);
      daily.set(p.variable, values);
    }
    const d = dayOf(run.start, p.date);
    (pairs[p.variable] ??= []);
    if (d < 0 || d >= values.length) {
      outside[p.variable] = (outside[p.variable] ?? 0) + 1;
      continue;
    }
    pairs[p.variable].push({ date: p.date, month: Number(p.date.slice(5, 7)), obs: p.value, sim: values[d], censored: p.censored });
  }
  return { pairs, outside };
}
