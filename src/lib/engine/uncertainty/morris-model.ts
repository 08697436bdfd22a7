/**
 * Morris screening of a model under one scenario (`lakeledger.morris/1`, the `morris`
 * command): the inputs are the model's ranged parameters and initial values
 * (uncertainInputs, through their quantile functions), the output is one series' time mean
 * over the last five years of the period (as an ensemble member's value, window.ts). The
 * design is morris.ts's `morrisDesign` from the seed, so the same seed gives the same
 * screening. A run that fails or does not close gives no value: the elementary effects that
 * need it are left out (counted per input in `used`, and the runs in `failedRuns`), never
 * set to zero. Inputs come back ranked by μ*, largest first.
 */
import type { ModelDoc, ScenarioDoc } from '../document/types';
import { prepareRuns } from '../simulate';
import { digestOf } from '../document/digest';
import { ENGINE_VERSION } from '../version';
import { mulberry32 } from '../balance/identity';
import type { CancelSignal } from '../solve/integrate';
import { morrisDesign } from './morris';
import { uncertainInputs, type MemberDraw } from './lhs';
import { quantile } from './distributions';
import { windowStartDay, timeMeanFrom, summarisedSeriesIds, LAST_YEARS } from './window';
import { UncertaintyInputError } from './errors';
import { ENSEMBLE_AUTO_START } from './ensemble';

export const MORRIS_FORMAT = 'lakeledger.morris/1';

export interface MorrisInputResult {
  kind: 'parameter' | 'state';
  id: string;
  mu: number | null;
  muStar: number | null;
  sigma: number | null;
  /** Elementary effects that had both runs (of r). */
  used: number;
}

export interface MorrisDoc {
  format: typeof MORRIS_FORMAT;
  model: string;
  modelDigest: string;
  scenario: string;
  scenarioDigest: string;
  engine: string;
  autoStart: string;
  method: 'Morris (1991) elementary effects; mu* after Campolongo, Cariboni & Saltelli (2007)';
  indicator: { id: string; statistic: string };
  trajectories: number;
  levels: number;
  delta: number;
  seed: number;
  evaluations: number;
  failedRuns: number;
  /** Ranked by μ*, largest first (inputs without any effect last). */
  inputs: MorrisInputResult[];
  /** Trajectories done (fewer than `trajectories` when cancelled). */
  completed: number;
  partial: boolean;
}

export interface ModelMorrisOptions {
  indicator: string;
  trajectories?: number;
  levels?: number;
  seed?: number;
  signal?: CancelSignal;
  onProgress?: (p: { done: number; total: number }) => void;
}

export function morrisOfModel(model: ModelDoc, scenario: ScenarioDoc, options: ModelMorrisOptions): MorrisDoc {
  const r = options.trajectories ?? 10;
  const p = options.levels ?? 4;
  const seed = options.seed ?? 1;
  if (!Number.isInteger(r) || r < 2) throw new UncertaintyInputError('invalid_morris_settings', `Morris screening needs at least 2 trajectories, got ${r}`);
  if (!Number.isInteger(p) || p < 2 || p % 2) throw new UncertaintyInputError('invalid_morris_settings', `Morris levels must be an even whole number ≥ 2, got ${p}`);
  const inputs = uncertainInputs(model);
  if (!inputs.length) throw new UncertaintyInputError('nothing_to_sample', `model '${model.id}' has no parameter with a range and no state with an initialRange: nothing to screen`);
  const series = summarisedSeriesIds(model);
  if (!series.includes(options.indicator)) throw new UncertaintyInputError('invalid_morris_settings', `'${options.indicator}' is not a state or reported series of model '${model.id}' (${series.join(', ')})`);
  const prepared = prepareRuns(model, scenario, { now: () => new Date(0), clock: () => 0 });
  if (!prepared.ok) throw new UncertaintyInputError('invalid_morris_settings', `the scenario cannot run: ${prepared.run.error?.message ?? 'it has errors'}`);
  const from = windowStartDay(scenario);
  const k = inputs.length;
  const { design, moved } = morrisDesign(k, r, p, mulberry32(seed));

  let evaluations = 0;
  let failedRuns = 0;
  let cancelled = false;
  const f = (x: number[]): number | null => {
    const draw: MemberDraw = { parameters: {}, initial: {} };
    inputs.forEach((inp, i) => ((inp.kind === 'parameter' ? draw.parameters : draw.initial)[inp.id] = quantile(inp.marginal, x[i])));
    const run = prepared.runner.run(draw, { skipRunId: true, signal: options.signal, now: () => new Date(0), clock: () => 0, autoStart: ENSEMBLE_AUTO_START });
    evaluations++;
    if (run.status === 'cancelled') {
      cancelled = true;
      return null;
    }
    if (run.status !== 'ok' || !run.closure.ok) {
      failedRuns++;
      return null;
    }
    const v = timeMeanFrom(run.times, run.series[options.indicator], from);
    return Number.isFinite(v) ? v : null;
  };

  const ee: number[][] = Array.from({ length: k }, () => []);
  let completed = 0;
  outer: for (let t = 0; t < r; t++) {
    if (options.signal?.aborted) break;
    const points = design[t];
    const effects: (number | null)[] = new Array(k).fill(null);
    let prev = f(points[0]);
    if (cancelled) break;
    for (let s = 0; s < moved[t].length; s++) {
      const i = moved[t][s];
      const next = f(points[s + 1]);
      if (cancelled) break outer;
      effects[i] = prev !== null && next !== null ? (next - prev) / (points[s + 1][i] - points[s][i]) : null;
      prev = next;
    }
    effects.forEach((e, i) => e !== null && ee[i].push(e));
    completed++;
    options.onProgress?.({ done: completed, total: r });
  }

  const results: MorrisInputResult[] = inputs.map((inp, i) => {
    const e = ee[i];
    if (!e.length) return { kind: inp.kind, id: inp.id, mu: null, muStar: null, sigma: null, used: 0 };
    const mu = e.reduce((a, b) => a + b, 0) / e.length;
    const muStar = e.reduce((a, b) => a + Math.abs(b), 0) / e.length;
    const sigma = e.length > 1 ? Math.sqrt(e.reduce((a, b) => a + (b - mu) ** 2, 0) / (e.length - 1)) : null;
    return { kind: inp.kind, id: inp.id, mu, muStar, sigma, used: e.length };
  });
  // ranked by μ*, largest first; ties keep model order; inputs without effects last
  const order = results.map((x, i) => ({ x, i })).sort((a, b) => (b.x.muStar ?? -1) - (a.x.muStar ?? -1) || a.i - b.i);

  return {
    format: MORRIS_FORMAT,
    model: model.id,
    modelDigest: digestOf(model),
    scenario: scenario.id,
    scenarioDigest: digestOf(scenario),
    engine: ENGINE_VERSION,
    autoStart: ENSEMBLE_AUTO_START,
    method: 'Morris (1991) elementary effects; mu* after Campolongo, Cariboni & Saltelli (2007)',
    indicator: { id: options.indicator, statistic: `time mean over the last ${LAST_YEARS} years of the period` },
    trajectories: r,
    levels: p,
    delta: p / (2 * (p - 1)),
    seed,
    evaluations,
    failedRuns,
    inputs: order.map((o) => o.x),
    completed,
    partial: completed < r
  };
}
