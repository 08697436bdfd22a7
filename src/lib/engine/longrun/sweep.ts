/**
 * A sweep: vary one parameter (by value) or one forcing (as a scale factor) over a range,
 * find the long-run state for each value from a low and from a high start, and compare
 * the indicator's long-run mean (over the settled cycle's season) between the two
 * branches. Where they differ two states exist; the ends of such a range are refined by
 * bisection into switch points (critical values). Format `lakeledger.sweep/1`.
 */
import type { ModelDoc } from '../document/types';
import { digestOf } from '../document/digest';
import { ENGINE_VERSION } from '../version';
import { settle, cycleSeasonMean, type SettleOptions, type SettleResult } from './settle';
import { GROWING_SEASON, type Season } from '../indicators/seasonal';

export const SWEEP_FORMAT = 'lakeledger.sweep/1';

export interface SweepOptions {
  target: string;
  from: number;
  to: number;
  /** Number of values, both ends included (≥ 2). */
  steps: number;
  /** Series id of the indicator (a state or a reported derived quantity). */
  indicator: string;
  /** Season of the indicator's mean; null = the whole cycle. Default April–September. */
  season?: Season | null;
  /** Initial values of the low and high starts; default: the long-run states at `from` and at `to`. */
  startLow?: Record<string, number>;
  startHigh?: Record<string, number>;
  /**
   * Two branches differ when |low − high| > this × max(|low|, |high|). Default 0.2: a
   * clear and a turbid state differ by far more, while one state reached from two starts
   * can settle a few per cent apart in a slow, seasonal model (seen on the demo lake).
   */
  separation?: number;
  /** Bisection steps for each switch point. Default 8. */
  refine?: number;
  settle?: Omit<SettleOptions, 'parameters' | 'initial' | 'forcingScale'>;
  onProgress?: (p: { done: number; total: number }) => void;
}

export interface SweepDoc {
  format: typeof SWEEP_FORMAT;
  model: string;
  modelDigest: string;
  engine: string;
  target: string;
  /** `parameter`: swept by value; `forcing`: swept as a scale factor. */
  kind: 'parameter' | 'forcing';
  indicator: string;
  season: Season | null;
  values: number[];
  /** The indicator's long-run mean from the low and from the high start (null: not settled). */
  low: (number | null)[];
  high: (number | null)[];
  /** [from, to] ranges of swept values where the branches differ. */
  bistable: [number, number][];
  /** Refined critical values at the ends of the bistable ranges. */
  switchPoints: number[];
  /** Values at which a start did not settle, with why. */
  notSettled: { value: number; start: 'low' | 'high'; message: string }[];
  startLow: Record<string, number>;
  startHigh: Record<string, number>;
  separation: number;
}

export class SweepInputError extends Error {
  constructor(
    readonly code: 'unknown_target' | 'unknown_indicator' | 'invalid_range' | 'unknown_state',
    message: string
  ) {
    super(message);
  }
}

export function sweep(model: ModelDoc, o: SweepOptions): SweepDoc {
  const kind: SweepDoc['kind'] | null = model.parameters.some((p) => p.id === o.target)
    ? 'parameter'
    : (model.forcings ?? []).some((f) => f.id === o.target)
      ? 'forcing'
      : null;
  if (!kind) {
    throw new SweepInputError('unknown_target', `no parameter or forcing '${o.target}' (parameters: ${model.parameters.map((p) => p.id).join(', ')})`);
  }
  const series = new Set([...model.states.map((s) => s.id), ...(model.derived ?? []).filter((d) => d.report).map((d) => d.id)]);
  if (!series.has(o.indicator)) {
    throw new SweepInputError('unknown_indicator', `the indicator '${o.indicator}' is neither a state nor a reported derived quantity (${[...series].join(', ')})`);
  }
  if (!Number.isFinite(o.from) || !Number.isFinite(o.to) || o.from === o.to) throw new SweepInputError('invalid_range', `--from and --to must be two different numbers, got ${o.from} and ${o.to}`);
  if (!Number.isInteger(o.steps) || o.steps < 2) throw new SweepInputError('invalid_range', `--steps must be a whole number of at least 2, got ${o.steps}`);
  const stateIds = new Set(model.states.map((s) => s.id));
  for (const [k, v] of Object.entries({ ...(o.startLow ?? {}), ...(o.startHigh ?? {}) })) {
    if (!stateIds.has(k)) throw new SweepInputError('unknown_state', `a start names '${k}', which is not a state`);
    if (!Number.isFinite(v)) throw new SweepInputError('unknown_state', `the start value of '${k}' is not a number`);
  }
  const season = o.season === undefined ? GROWING_SEASON : o.season;
  const separation = o.separation ?? 0.2;
  const at = (value: number, initial: Record<string, number>): SettleResult =>
    settle(model, {
      ...o.settle,
      initial,
      ...(kind === 'parameter' ? { parameters: { [o.target]: value } } : { forcingScale: { [o.target]: value } })
    });
  const mean = (r: SettleResult): number | null => (r.outcome === 'settled' && r.cycle ? cycleSeasonMean(r.cycle, o.indicator, season) : null);

  // weighted form keeps the ends exact and the interior free of most rounding residue
  const values = Array.from({ length: o.steps }, (_, i) =>
    i === 0 ? o.from : i === o.steps - 1 ? o.to : ((o.steps - 1 - i) * o.from + i * o.to) / (o.steps - 1)
  );
  const total = 2 * o.steps + (o.startLow ? 0 : 1) + (o.startHigh ? 0 : 1);
  let done = 0;
  const tick = () => o.onProgress?.({ done: ++done, total });
  const lo = Math.min(o.from, o.to);
  const hi = Math.max(o.from, o.to);
  const initial = Object.fromEntries(model.states.map((s) => [s.id, s.initial]));
  const startLow = o.startLow ? { ...initial, ...o.startLow } : (tick(), at(lo, initial).state);
  const startHigh = o.startHigh ? { ...initial, ...o.startHigh } : (tick(), at(hi, initial).state);

  const notSettled: SweepDoc['notSettled'] = [];
  const branch = (start: Record<string, number>, label: 'low' | 'high') =>
    values.map((v) => {
      const r = at(v, start);
      tick();
      if (r.outcome !== 'settled') notSettled.push({ value: v, start: label, message: r.message });
      return mean(r);
    });
  const low = branch(startLow, 'low');
  const high = branch(startHigh, 'high');
  const differs = (a: number | null, b: number | null) =>
    a !== null && b !== null && Math.abs(a - b) > separation * Math.max(Math.abs(a), Math.abs(b));

  // contiguous runs of differing values
  const bistable: [number, number][] = [];
  const edges: [number, number][] = []; // (same, differing) neighbour pairs to refine
  let runStart = -1;
  for (let i = 0; i <= values.length; i++) {
    const d = i < values.length && differs(low[i], high[i]);
    if (d && runStart < 0) runStart = i;
    if (!d && runStart >= 0) {
      bistable.push([values[runStart], values[i - 1]]);
      if (runStart > 0) edges.push([values[runStart - 1], values[runStart]]);
      if (i < values.length) edges.push([values[i], values[i - 1]]);
      runStart = -1;
    }
  }
  const switchPoints = edges.map(([same, diff]) => {
    let a = same;
    let b = diff;
    for (let k = 0; k < (o.refine ?? 8); k++) {
      const mid = 0.5 * (a + b);
      const d = differs(mean(at(mid, startLow)), mean(at(mid, startHigh)));
      if (d) b = mid;
      else a = mid;
    }
    return 0.5 * (a + b);
  });
  return {
    format: SWEEP_FORMAT,
    model: model.id,
    modelDigest: digestOf(model),
    engine: ENGINE_VERSION,
    target: o.target,
    kind,
    indicator: o.indicator,
    season,
    values,
    low,
    high,
    bistable,
    switchPoints: switchPoints.sort((x, y) => x - y),
    notSettled,
    startLow,
    startHigh,
    separation
  };
}
