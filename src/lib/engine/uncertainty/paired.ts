/**
 * Paired difference against a baseline, member by member. Every scenario of an ensemble
 * runs with the same parameter sets (common random numbers), so member j of a scenario and
 * member j of the baseline differ only by the scenario's measures: the spread of
 * d_j = x_j − baseline_j is the uncertainty of the measure's effect, much narrower than the
 * difference of two independent spreads. Members missing or non-finite on either side are
 * left out and named.
 */
import { summarize, type Summary } from './summaries';

export interface PairedDifference {
  /** d_j = value_j − baseline_j, in member order, null where a side is missing. */
  differences: (number | null)[];
  summary: Summary;
  /** Members counted in the summary. */
  n: number;
  /** Indices of members left out. */
  missing: number[];
}

export function pairedDifference(values: readonly (number | null)[], baseline: readonly (number | null)[]): PairedDifference {
  const len = Math.max(values.length, baseline.length);
  const differences: (number | null)[] = [];
  const kept: number[] = [];
  const missing: number[] = [];
  for (let j = 0; j < len; j++) {
    const a = values[j];
    const b = baseline[j];
    if (a === null || a === undefined || b === null || b === undefined || !Number.isFinite(a) || !Number.isFinite(b)) {
      differences.push(null);
      missing.push(j);
    } else {
      differences.push(a - b);
      kept.push(a - b);
    }
  }
  return { differences, summary: summarize(kept), n: kept.length, missing };
}
