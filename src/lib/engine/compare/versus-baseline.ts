/**
 * A run against the baseline run: the change of each headline indicator in its unit and
 * in per cent of the baseline, the cost of the scenario (its `costs`, summed by currency)
 * and the cost per unit of improvement.
 *
 * Rules (the project's own):
 * - change = run − baseline, in the indicator's unit (years for a first-year-met value);
 *   percent = 100 · change / |baseline|, null when the baseline is 0 or for years;
 * - improvement = the change in the better direction: baseline − run where lower is
 *   better (chlorophyll, P, days not met, TSI), run − baseline where higher is better
 *   (Secchi depth), baseline − run years where earlier is better;
 * - cost per unit of improvement = total cost / improvement, for each currency, only when
 *   the improvement is positive; otherwise null with `no improvement`. Costs are never
 *   converted between currencies.
 */
import type { ScenarioDoc } from '../document/types';
import type { Headline } from './indicators';

export interface IndicatorChange {
  key: string;
  label: string;
  unit: string;
  run: number | null;
  baseline: number | null;
  /** run − baseline (null when either is missing). */
  change: number | null;
  /** 100 · change / |baseline| (null when either is missing, the baseline is 0, or for years). */
  percent: number | null;
  /** The change in the better direction (positive = better than the baseline). */
  improvement: number | null;
}

/** Changes of `run`'s headlines against `baseline`'s, matched by key. */
export function versusBaseline(run: Headline[], baseline: Headline[]): IndicatorChange[] {
  const base = new Map(baseline.map((h) => [h.key, h]));
  return run.map((h) => {
    const b = base.get(h.key);
    const rv = h.value;
    const bv = b ? b.value : null;
    const change = rv !== null && bv !== null ? rv - bv : null;
    const percent = change !== null && bv !== null && bv !== 0 && h.kind !== 'year' ? (100 * change) / Math.abs(bv) : null;
    const improvement = change === null ? null : h.better === 'higher' ? change : -change;
    return { key: h.key, label: h.label, unit: h.unit, run: rv, baseline: bv, change, percent, improvement };
  });
}

export interface Cost {
  currency: string;
  amount: number;
}

/** The scenario's costs summed by currency, in alphabetical order of currency (none: []). */
export function scenarioCost(scenario: Pick<ScenarioDoc, 'costs'>): Cost[] {
  const by = new Map<string, number>();
  for (const c of scenario.costs ?? []) {
    if (!Number.isFinite(c.amount)) continue;
    by.set(c.currency, (by.get(c.currency) ?? 0) + c.amount);
  }
  return [...by.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([currency, amount]) => ({ currency, amount }));
}

export interface CostPerImprovement {
  currency: string;
  cost: number;
  /** Improvement in the indicator's unit (positive = better). */
  improvement: number | null;
  /** The indicator's unit: the result is `currency` per `unit`. */
  unit: string;
  /** cost / improvement, or null with `reason`. */
  perUnit: number | null;
  reason?: 'no improvement' | 'no value';
}

/** Cost per unit of improvement of `change` (one indicator), per currency of `costs`. */
export function costPerImprovement(costs: Cost[], change: IndicatorChange): CostPerImprovement[] {
  return costs.map(({ currency, amount }) => {
    const imp = change.improvement;
    if (imp === null) return { currency, cost: amount, improvement: null, unit: change.unit, perUnit: null, reason: 'no value' as const };
    if (!(imp > 0)) return { currency, cost: amount, improvement: imp, unit: change.unit, perUnit: null, reason: 'no improvement' as const };
    return { currency, cost: amount, improvement: imp, unit: change.unit, perUnit: amount / imp };
  });
}
