/**
 * Summaries of an ensemble's values (one number per member).
 *
 * Percentiles are Hyndman & Fan (1996, The American Statistician 50: 361–365) type 7, the
 * linear interpolation between order statistics: with the values sorted x₁ ≤ … ≤ xₙ and
 * h = (n − 1)·p, Q(p) = x_{⌊h⌋+1} + (h − ⌊h⌋)·(x_{⌊h⌋+2} − x_{⌊h⌋+1}) (1-based; Q(p) = xₙ at
 * p = 1). The mean is summed with Neumaier's compensation so that the order of members
 * changes nothing beyond the last bit.
 */
import { compensatedSum } from '../compare/budget-by-role';

export interface Summary {
  mean: number;
  p05: number;
  p25: number;
  p50: number;
  p75: number;
  p95: number;
}

/** Type-7 percentile of values sorted ascending; p in [0, 1]. NaN for no values. */
export function percentileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  if (lo >= n - 1) return sorted[n - 1];
  return sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]);
}

export function percentile(values: readonly number[], p: number): number {
  return percentileSorted([...values].sort((a, b) => a - b), p);
}

export function mean(values: readonly number[]): number {
  return values.length ? compensatedSum(values) / values.length : NaN;
}

/** mean, p05, p25, p50, p75, p95 of finite values (non-finite values are the caller's to report). */
export function summarize(values: readonly number[]): Summary {
  const s = [...values].sort((a, b) => a - b);
  return {
    mean: mean(values),
    p05: percentileSorted(s, 0.05),
    p25: percentileSorted(s, 0.25),
    p50: percentileSorted(s, 0.5),
    p75: percentileSorted(s, 0.75),
    p95: percentileSorted(s, 0.95)
  };
}
