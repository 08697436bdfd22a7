/**
 * The value an ensemble member contributes to a summary: the time mean of a series over
 * the last five years of the scenario's period, i.e. from the date five calendar years
 * before the period's end (UTC) to the end. The mean is the trapezoidal integral over the
 * output times inside that window divided by its length, so an uneven last output step
 * weighs what it covers. A period of five years or less is averaged whole.
 */
import type { ModelDoc, ScenarioDoc } from '../document/types';

export const LAST_YEARS = 5;

const dayOf = (iso: string) => Date.UTC(Number(iso.slice(0, 4)), Number(iso.slice(5, 7)) - 1, Number(iso.slice(8, 10))) / 86400000;

/** Day (since the period's start) where the last `years` calendar years begin; 0 when the period is shorter. */
export function windowStartDay(scenario: Pick<ScenarioDoc, 'period'>, years = LAST_YEARS): number {
  const { start, end } = scenario.period;
  const from = `${String(Number(end.slice(0, 4)) - years).padStart(4, '0')}${end.slice(4)}`;
  // 29 February five years back falls on 1 March (Date.UTC rolls it over)
  return Math.max(0, dayOf(from) - dayOf(start));
}

/** Trapezoidal time mean of `values` over the outputs at or after `from`. NaN when none. */
export function timeMeanFrom(times: readonly number[], values: readonly number[], from: number): number {
  let k = 0;
  while (k < times.length && times[k] < from) k++;
  const n = times.length - k;
  if (n <= 0) return NaN;
  if (n === 1) return values[k];
  let area = 0;
  for (let i = k + 1; i < times.length; i++) area += 0.5 * (values[i] + values[i - 1]) * (times[i] - times[i - 1]);
  return area / (times[times.length - 1] - times[k]);
}

/** The series an ensemble or screening summarises: every state, then every reported derived quantity, in model order. */
export function summarisedSeriesIds(model: Pick<ModelDoc, 'states' | 'derived'>): string[] {
  return [...model.states.map((s) => s.id), ...(model.derived ?? []).filter((d) => d.report).map((d) => d.id)];
}
