/**
 * Relapse after a measure: the first calendar year after the scenario's last measure whose
 * growing-season mean of an indicator (chlorophyll-a) is within 10 % of the baseline's in
 * the same year; the improvement lasted the years between the last measure and that year.
 * "Within 10 %" is the project's rule (the scenarios issue names it); seasons as in
 * seasonal.ts.
 */
import type { MeasureDoc, RunDoc, ScenarioDoc } from '../document/types';
import { toDaily } from './daily';
import { GROWING_SEASON, seasonalMeans, type Season } from './seasonal';

export interface Relapse {
  /** Year of the scenario's last measure (its last application, or its end/ramp end). */
  lastMeasureYear: number | null;
  /** First year after it within `within` of the baseline, or null (no relapse in the period). */
  relapseYear: number | null;
  /** Whole years from the year after the last measure to the relapse year (or to the end). */
  yearsLasting: number | null;
  /** Per year: the scenario's and the baseline's seasonal means. */
  years: { year: number; scenario: number; baseline: number }[];
}

const addYears = (iso: string, n: number) => `${Number(iso.slice(0, 4)) + n}${iso.slice(4)}`;

/** The date on which a measure last acts (repeats included; ramps end; `until`). */
export function lastActionDate(m: MeasureDoc): string {
  switch (m.kind) {
    case 'remove':
    case 'add':
    case 'transfer': {
      const r = m.repeat;
      if (!r || r.count <= 1) return m.on;
      if (r.everyYears) return addYears(m.on, r.everyYears * (r.count - 1));
      const d = Date.parse(`${m.on}T00:00:00Z`) + (r.everyDays ?? 0) * (r.count - 1) * 86400000;
      return new Date(d).toISOString().slice(0, 10);
    }
    default: {
      if (m.until) return m.until;
      const ramp = 'rampDays' in m && m.rampDays ? m.rampDays : 0;
      return new Date(Date.parse(`${m.from}T00:00:00Z`) + ramp * 86400000).toISOString().slice(0, 10);
    }
  }
}

export function relapseOf(
  run: RunDoc,
  baseline: RunDoc,
  scenario: ScenarioDoc,
  indicator: string,
  opts: { season?: Season; within?: number } = {}
): Relapse {
  const season = opts.season ?? GROWING_SEASON;
  const within = opts.within ?? 0.1;
  const measures = scenario.measures ?? [];
  const last = measures.length ? measures.map(lastActionDate).sort().at(-1)! : null;
  const lastYear = last ? Number(last.slice(0, 4)) : null;
  const a = seasonalMeans(toDaily(run.start, run.times, run.series[indicator] ?? []), season);
  const b = new Map(seasonalMeans(toDaily(baseline.start, baseline.times, baseline.series[indicator] ?? []), season).map((y) => [y.year, y.value]));
  const years = a.filter((y) => b.has(y.year)).map((y) => ({ year: y.year, scenario: y.value, baseline: b.get(y.year)! }));
  if (lastYear === null) return { lastMeasureYear: null, relapseYear: null, yearsLasting: null, years };
  const after = years.filter((y) => y.year > lastYear);
  const hit = after.find((y) => Math.abs(y.scenario - y.baseline) <= within * Math.abs(y.baseline));
  const endYear = after.length ? after[after.length - 1].year : lastYear;
  return {
    lastMeasureYear: lastYear,
    relapseYear: hit?.year ?? null,
    yearsLasting: hit ? hit.year - lastYear - 1 : endYear - lastYear,
    years
  };
}
