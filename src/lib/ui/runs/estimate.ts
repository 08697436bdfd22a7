/**
 * How long a set of runs will take, said before they start: from the engine's own time per
 * simulated day in this model's stored runs (the median), or, with none stored, from a short
 * probe run of the first scenario's first year. Runs share the pool's workers, so the
 * estimate is the total engine time divided by the number of workers, rounded up to runs.
 */
import type { ScenarioDoc } from '$lib/engine/document/types';
import type { StoredRunSummary } from '$lib/storage/types';

/** Runs expected to take longer than this (seconds) ask before they start. */
export const LONG_RUN_SECONDS = 10;

/** Days of the probe run. */
export const PROBE_DAYS = 365;

export function periodDays(scenario: ScenarioDoc): number {
  return Math.max(0, Math.round((Date.parse(`${scenario.period.end}T00:00:00Z`) - Date.parse(`${scenario.period.start}T00:00:00Z`)) / 86400000));
}

/** Engine milliseconds per simulated day in the stored finished runs (median), or null. */
export function msPerDayFromHistory(stored: readonly StoredRunSummary[]): number | null {
  const rates = stored
    .filter((s) => s.status === 'ok' && s.points > 1 && s.wallMs > 0)
    .map((s) => s.wallMs / Math.max(1, s.points - 1))
    .sort((a, b) => a - b);
  if (!rates.length) return null;
  const n = rates.length;
  return n % 2 ? rates[(n - 1) / 2] : 0.5 * (rates[n / 2 - 1] + rates[n / 2]);
}

/** The first year of a scenario, for the probe (measures beyond it are left as they are). */
export function probeScenario(scenario: ScenarioDoc): ScenarioDoc {
  const start = Date.parse(`${scenario.period.start}T00:00:00Z`);
  const end = Math.min(Date.parse(`${scenario.period.end}T00:00:00Z`), start + PROBE_DAYS * 86400000);
  return { ...scenario, period: { ...scenario.period, end: new Date(end).toISOString().slice(0, 10) } };
}

export interface Estimate {
  /** Seconds until the last run is done. */
  seconds: number;
  /** Where the figure comes from, in words. */
  basis: string;
}

/**
 * The estimate for runs of `days` simulated days each, at `msPerDay`, over `workers`
 * workers: whole runs go to the workers in turn, so the slowest worker sets the time.
 */
export function estimate(days: readonly number[], msPerDay: number, workers: number, basis: string): Estimate {
  const w = Math.max(1, Math.floor(workers));
  const loads = new Array<number>(w).fill(0);
  for (const d of [...days].sort((a, b) => b - a)) {
    let k = 0;
    for (let i = 1; i < w; i++) if (loads[i] < loads[k]) k = i;
    loads[k] += d * msPerDay;
  }
  return { seconds: Math.max(...loads) / 1000, basis };
}

/** "about 40 s", "about 3 min", "about 1 h 20 min". */
export function formatSeconds(s: number): string {
  if (!Number.isFinite(s)) return 'an unknown time';
  if (s < 90) return `about ${Math.max(1, Math.round(s))} s`;
  const min = Math.round(s / 60);
  if (min < 90) return `about ${min} min`;
  return `about ${Math.floor(min / 60)} h ${min % 60} min`;
}
