/**
 * Calibration: parameter values within their ranges that bring a model's series closest to
 * an observation set, by Levenberg–Marquardt (ml-levenberg-marquardt) with bounds.
 *
 * Objective: J = Σ_v w_v · (1/n_v) · Σ_i e_vi² / σ_v², the weighted mean squared residual of
 * each chosen series v (n_v its observations in the period), with e = sim − obs in the
 * series' unit (`linear`) or log10 sim − log10 obs (`log`, the default for a chlorophyll-role
 * series; the simulation is floored at 1e-6 of its unit there), divided by the variance σ_v²
 * of that series' (transformed) observations, so that series in mg/m³ and in m weigh alike
 * and, for one series without censoring, J = 1 − NSE (σ_v² = 1 when the observations do not
 * vary). Censored observations contribute as
 * in statistics.ts: a below-limit value only when the simulation is above the limit, a
 * Secchi on the bottom only when the simulation is shallower; else e = 0.
 *
 * Search space: each parameter is mapped onto u ∈ [0, 1] over its range — linearly, or on
 * the logarithm of the value when the range spans a factor of ten or more (min > 0). The
 * optimiser's finite-difference step and its damping then mean the same for every parameter:
 * in raw units a rate of 0.002 /d would be swamped by the library's default step of 0.1, and a
 * volume of 1e6 m³ would not notice it. The Jacobian is ours (forward differences, step 1e-3
 * in u, backward at the upper edge), so each iteration costs one run per parameter plus one.
 * Residuals are scaled by the first objective so that J starts at 1 inside the search.
 *
 * The library takes every step (it keeps the best point seen), so we keep the best point
 * ourselves and stop when it improved by less than `tolerance` (relative) over the last
 * three iterations, when `maxIterations` is reached, or when the caller cancels.
 *
 * Intervals (`intervals`, when the fit ends ok): the linearised 95 % interval of each fitted
 * parameter, from the Jacobian of the residuals at the best point (Gauss–Newton): cov(u) ≈
 * s² (JᵀJ)⁻¹ with s² = RSS/(m − p) (Bates & Watts 1988, Nonlinear Regression Analysis,
 * Sect. 2.3; Seber & Wild 1989, Sect. 5.1), u ± 1.96 √cov_kk (the normal approximation, no
 * t correction), clipped to [0, 1] and mapped back (multiplicative in a log space). With
 * s² from the residuals, the series' weights act as relative weights only. A singular or
 * nearly singular JᵀJ (a parameter the data do not see) gives the whole range, marked
 * `bounded: false`. They are approximate: residuals of censored points and of the log
 * transform are treated as ordinary residuals. A calibration's intervals may become the
 * parameters' ranges of an ensemble (Fit screen, on accept).
 *
 * Warnings: `at_range_edge` (fitted u within 1e-3 of 0 or 1), `poorly_identifiable` (moving
 * the parameter ±10 % of its range, others fixed, changes J by less than 1 %),
 * `not_converged`, `log_nonpositive` (observations ≤ 0 left out of a log residual),
 * `outside_period` (observations outside the scenario's period, not used).
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import type { ModelDoc, RunDoc, ScenarioDoc } from '../document/types';
import { prepareRuns, type Runner } from '../simulate';
import type { CancelSignal } from '../solve/integrate';
import { toDaily } from '../indicators/daily';
import { dayOf } from './match';
import { censoredResidual } from './statistics';
import type { ObservationSet } from './observations';
import { seriesOfModel } from './observations';
import { FitInputError } from './errors';

export const FIT_STEP = 1e-3;
export const LOG_FLOOR = 1e-6;

export interface FitParameter {
  id: string;
  /** Overrides the model's range. */
  min?: number;
  max?: number;
  /** Default: `log` when min > 0 and max/min ≥ 10, else `linear`. */
  space?: 'linear' | 'log';
}

export interface FitVariable {
  id: string;
  /** Default 1. */
  weight?: number;
  /** Default `log` for the chlorophyll-role series, `linear` otherwise. */
  residual?: 'linear' | 'log';
}

export interface CalibrateOptions {
  parameters: readonly (string | FitParameter)[];
  /** Default: every series of the observation set, weight 1. */
  variables?: readonly (string | FitVariable)[];
  maxIterations?: number;
  /** Relative improvement of the best objective over three iterations below which the fit stops (default 1e-6). */
  tolerance?: number;
  signal?: CancelSignal;
  onProgress?: (p: { iteration: number; evaluations: number; objective: number }) => void;
}

export interface FitWarning {
  code: 'at_range_edge' | 'poorly_identifiable' | 'not_converged' | 'log_nonpositive' | 'outside_period';
  id?: string;
  message: string;
}

export interface CalibrationResult {
  status: 'ok' | 'failed' | 'cancelled';
  error: { code: string; message: string } | null;
  parameters: Record<string, number>;
  initial: Record<string, number>;
  ranges: Record<string, { min: number; max: number; space: 'linear' | 'log' }>;
  /** Per series: its weight, residual scale, observations used and the variance σ² that divides its term. */
  variables: Record<string, { weight: number; residual: 'linear' | 'log'; n: number; variance?: number }>;
  objective: { before: number; after: number };
  /** Best objective before the first iteration and after each one. */
  path: number[];
  iterations: number;
  evaluations: number;
  converged: boolean;
  warnings: FitWarning[];
  /** The run at the fitted values (null when the fit failed before any run). */
  run: RunDoc | null;
  /** Linearised 95 % intervals of the fitted values (present when status is ok). */
  intervals?: Record<string, ParameterInterval>;
}

export interface ParameterInterval {
  low: number;
  high: number;
  /** Standard error in the search space u ∈ [0, 1] (null when not bounded). */
  seU: number | null;
  /** False when JᵀJ is singular for it: the interval is the whole range. */
  bounded: boolean;
}

/** z of the two-sided 95 % normal interval. */
export const INTERVAL_Z = 1.959963984540054;

class Stop extends Error {
  constructor(readonly why: 'converged' | 'cancelled' | 'failed', readonly detail = '') {
    super(why);
  }
}

export function calibrate(model: ModelDoc, scenario: ScenarioDoc | undefined, set: ObservationSet, options: CalibrateOptions): CalibrationResult {
  const params = resolveParameters(model, options.parameters);
  const vars = resolveVariables(model, set, options.variables);
  const maxIterations = options.maxIterations ?? 30;
  const tolerance = options.tolerance ?? 1e-6;
  if (!(Number.isInteger(maxIterations) && maxIterations >= 1)) throw new FitInputError('invalid_settings', `maxIterations must be a whole number ≥ 1, got ${maxIterations}`);

  const result: CalibrationResult = {
    status: 'failed',
    error: null,
    parameters: {},
    initial: Object.fromEntries(params.map((p) => [p.id, p.value0])),
    ranges: Object.fromEntries(params.map((p) => [p.id, { min: p.min, max: p.max, space: p.space }])),
    variables: {},
    objective: { before: NaN, after: NaN },
    path: [],
    iterations: 0,
    evaluations: 0,
    converged: false,
    warnings: [],
    run: null
  };

  const prepared = prepareRuns(model, scenario);
  if (!prepared.ok) {
    result.error = { code: prepared.run.error?.code ?? 'invalid_model', message: prepared.run.error?.message ?? 'the model or scenario has errors' };
    return result;
  }
  const runner: Runner = prepared.runner;
  const start = scenario?.period.start ?? model.timeOrigin ?? '2027-01-01';
  const endDay = scenario ? dayOf(start, scenario.period.end) : dayOf(start, `${Number(start.slice(0, 4)) + 20}${start.slice(4)}`);

  // the points each series contributes: day, observation, censoring
  interface Point { v: number; day: number; obs: number; censored: 'below' | 'above' | null }
  const points: Point[] = [];
  vars.forEach((v, vi) => {
    let outside = 0;
    let nonPositive = 0;
    for (const p of set.points) {
      if (p.variable !== v.id) continue;
      const day = dayOf(start, p.date);
      if (day < 0 || day > endDay) {
        outside++;
        continue;
      }
      if (v.residual === 'log' && !(p.value > 0)) {
        nonPositive++;
        continue;
      }
      points.push({ v: vi, day, obs: p.value, censored: p.censored });
      v.n++;
    }
    if (outside) result.warnings.push({ code: 'outside_period', id: v.id, message: `${outside} observations of ${v.id} lie outside the scenario's period and were not used` });
    if (nonPositive) result.warnings.push({ code: 'log_nonpositive', id: v.id, message: `${nonPositive} observations of ${v.id} are ≤ 0 and were left out of its log residuals` });
  });
  result.variables = Object.fromEntries(vars.map((v) => [v.id, { weight: v.weight, residual: v.residual, n: v.n }]));
  if (points.length === 0) throw new FitInputError('no_observations', `no observations of ${vars.map((v) => v.id).join(', ')} fall within the scenario's period ${start} to day ${endDay}`);

  const toValue = (u: number[]) => Object.fromEntries(params.map((p, k) => [p.id, fromUnit(p, u[k])]));
  const transform = vars.map((v) => (v.residual === 'log' ? (x: number) => Math.log10(Math.max(x, LOG_FLOOR)) : (x: number) => x));
  const variance = vars.map((_, vi) => {
    const xs = points.filter((p) => p.v === vi).map((p) => transform[vi](p.obs));
    const m = xs.reduce((a, b) => a + b, 0) / Math.max(xs.length, 1);
    const s2 = xs.reduce((a, b) => a + (b - m) ** 2, 0) / Math.max(xs.length, 1);
    return xs.length >= 2 && s2 > 0 ? s2 : 1;
  });
  vars.forEach((v, vi) => (result.variables[v.id].variance = variance[vi]));
  const coef = vars.map((v, vi) => (v.n ? Math.sqrt(v.weight / v.n / variance[vi]) : 0));
  let scale = 1;
  let penalty = 1e3;

  // one evaluation: a run, then the residual vector (cached by the point in u)
  const cache = new Map<string, { f: Float64Array; J: number; run: RunDoc | null }>();
  const evaluate = (u: number[]): { f: Float64Array; J: number; run: RunDoc | null } => {
    const key = u.join(',');
    const hit = cache.get(key);
    if (hit) return hit;
    if (options.signal?.aborted) throw new Stop('cancelled');
    const run = runner.run({ parameters: toValue(u) }, { skipRunId: true, signal: options.signal });
    result.evaluations++;
    if (run.status === 'cancelled') throw new Stop('cancelled');
    const f = new Float64Array(Math.max(points.length, 2));
    let J = 0;
    if (run.status !== 'ok') {
      f.fill(penalty);
      J = Infinity;
    } else {
      const daily = vars.map((v) => toDaily(run.start, run.times, run.series[v.id] ?? []).values);
      points.forEach((p, i) => {
        const sim = daily[p.v][p.day];
        const e = censoredResidual({ date: '', month: 0, obs: p.obs, sim, censored: p.censored }, transform[p.v]) ?? 0;
        const r = coef[p.v] * e;
        f[i] = Number.isFinite(r) ? r * scale : penalty;
        J += Number.isFinite(r) ? r * r : Infinity;
      });
    }
    const out = { f, J, run: run.status === 'ok' ? run : null };
    if (cache.size > 500) cache.clear();
    cache.set(key, out);
    return out;
  };

  const u0 = params.map((p) => toUnit(p, p.value0));
  let best = { u: u0, J: Infinity, run: null as RunDoc | null };
  const note = (u: number[], e: { J: number; run: RunDoc | null }) => {
    if (e.J < best.J) best = { u: u.slice(), J: e.J, run: e.run };
  };

  try {
    const first = evaluate(u0);
    if (!first.run) {
      const bad = runner.run({ parameters: toValue(u0) }, { skipRunId: true });
      result.error = { code: bad.error?.code ?? 'run_failed', message: `the run at the starting values failed: ${bad.error?.message ?? bad.status}` };
      return result;
    }
    result.objective.before = first.J;
    note(u0, first);
    result.path.push(first.J);
    if (first.J > 0 && Number.isFinite(first.J)) scale = 1 / Math.sqrt(first.J);
    penalty = 1e3 / Math.sqrt(points.length);
    cache.clear();
    if (first.J === 0) throw new Stop('converged');

    const paramFunction = (u: number[]) => {
      const e = evaluate(u);
      note(u, e);
      return (i: number) => e.f[i];
    };
    const jacobianFunction = (u: number[]) => {
      // the library asks for the Jacobian once per iteration: the place to record, report, stop
      if (result.iterations > 0) result.path.push(best.J);
      options.onProgress?.({ iteration: result.iterations, evaluations: result.evaluations, objective: best.J });
      const m = result.path.length;
      if (m >= 4 && result.path[m - 4] - result.path[m - 1] <= tolerance * result.path[m - 4]) throw new Stop('converged');
      if (best.J <= 1e-14 * result.objective.before) throw new Stop('converged');
      if (result.iterations >= maxIterations) throw new Stop('failed', 'max');
      result.iterations++;
      const f0 = evaluate(u).f;
      const cols = params.map((_, k) => {
        const h = u[k] + FIT_STEP <= 1 ? FIT_STEP : -FIT_STEP;
        const uk = u.slice();
        uk[k] += h;
        const fk = evaluate(uk);
        note(uk, fk);
        return Array.from(fk.f, (x, i) => (x - f0[i]) / h);
      });
      return (i: number) => cols.map((c) => c[i]);
    };
    const n = Math.max(points.length, 2);
    levenbergMarquardt(
      { x: Array.from({ length: n }, (_, i) => i), y: new Array(n).fill(0) },
      paramFunction,
      {
        initialValues: u0,
        minValues: params.map(() => 0),
        maxValues: params.map(() => 1),
        jacobianFunction,
        maxIterations: maxIterations + 1,
        errorTolerance: 0,
        damping: 1e-2
      }
    );
    // the library ran out of iterations without our stop
    result.path.push(best.J);
    result.warnings.push({ code: 'not_converged', message: `the fit stopped after ${result.iterations} iterations without settling (objective ${fmt(best.J)})` });
  } catch (e) {
    if (!(e instanceof Stop)) throw e;
    if (e.why === 'cancelled') {
      result.status = 'cancelled';
      result.error = { code: 'cancelled', message: 'the fit was cancelled' };
      result.parameters = toValue(best.u);
      result.objective.after = best.J;
      // the range-edge check needs no run; identifiability (more runs) is left to a finished fit
      result.warnings.push(...rangeEdgeWarnings(params, best.u));
      return result;
    }
    if (e.why === 'converged') result.converged = true;
    else result.warnings.push({ code: 'not_converged', message: `the fit reached ${maxIterations} iterations without settling (objective ${fmt(best.J)})` });
  }

  result.parameters = toValue(best.u);
  result.objective.after = best.J;
  if (result.path[result.path.length - 1] !== best.J) result.path.push(best.J);

  // warnings on the fitted values
  result.warnings.push(...rangeEdgeWarnings(params, best.u));
  params.forEach((p, k) => {
    const u = best.u[k];
    let change = 0;
    for (const du of [-0.1, 0.1]) {
      const uk = best.u.slice();
      uk[k] = Math.min(1, Math.max(0, u + du));
      if (uk[k] === u) continue;
      const e = evaluate(uk);
      change = Math.max(change, Math.abs(e.J - best.J));
    }
    if (change < 0.01 * best.J + 1e-12 * result.objective.before) {
      result.warnings.push({ code: 'poorly_identifiable', id: p.id, message: `${p.id} is poorly identifiable from these data: moving it by 10 % of its range changes the objective by ${best.J > 0 ? `${fmt((100 * change) / best.J)} %` : fmt(change)} (less than 1 %)` });
    }
  });

  result.intervals = intervalsAt(best.u, params, points.length, (u) => {
    const e = evaluate(u);
    // unscaled residuals: f holds r · scale
    return Array.from(e.f.subarray(0, points.length), (x) => x / scale);
  });

  result.run = best.run ?? runner.run({ parameters: result.parameters }, { skipRunId: true });
  result.status = 'ok';
  return result;
}

/** Linearised 95 % intervals at u (see the header): p + 1 evaluations of the residuals. */
function intervalsAt(u: number[], params: ResolvedParameter[], m: number, residuals: (u: number[]) => number[]): Record<string, ParameterInterval> {
  const p = params.length;
  const r0 = residuals(u);
  const rss = r0.reduce((a, x) => a + x * x, 0);
  const cols = params.map((_, k) => {
    const h = u[k] + FIT_STEP <= 1 ? FIT_STEP : -FIT_STEP;
    const uk = u.slice();
    uk[k] += h;
    const rk = residuals(uk);
    return rk.map((x, i) => (x - r0[i]) / h);
  });
  const JtJ = new Float64Array(p * p);
  for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) JtJ[a * p + b] = cols[a].reduce((acc, x, i) => acc + x * cols[b][i], 0);
  const dof = m - p;
  const s2 = dof > 0 ? rss / dof : NaN;
  const inv = invertSymmetric(JtJ, p);
  const out: Record<string, ParameterInterval> = {};
  params.forEach((par, k) => {
    const v = inv ? inv[k * p + k] * s2 : NaN;
    if (!(Number.isFinite(v) && v >= 0) || Math.sqrt(v) > 1) {
      out[par.id] = { low: par.min, high: par.max, seU: null, bounded: false };
      return;
    }
    const se = Math.sqrt(v);
    const lo = Math.max(0, u[k] - INTERVAL_Z * se);
    const hi = Math.min(1, u[k] + INTERVAL_Z * se);
    out[par.id] = { low: fromUnit(par, lo), high: fromUnit(par, hi), seU: se, bounded: true };
  });
  return out;
}

/** The inverse of a small symmetric positive matrix by Gauss–Jordan with pivoting; null when (nearly) singular. */
function invertSymmetric(A: Float64Array, n: number): Float64Array | null {
  const a = Float64Array.from(A);
  const inv = new Float64Array(n * n);
  for (let i = 0; i < n; i++) inv[i * n + i] = 1;
  let maxDiag = 0;
  for (let i = 0; i < n; i++) maxDiag = Math.max(maxDiag, Math.abs(a[i * n + i]));
  if (!(maxDiag > 0)) return null;
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r * n + c]) > Math.abs(a[piv * n + c])) piv = r;
    if (Math.abs(a[piv * n + c]) <= 1e-12 * maxDiag) return null;
    if (piv !== c) {
      for (let j = 0; j < n; j++) {
        [a[c * n + j], a[piv * n + j]] = [a[piv * n + j], a[c * n + j]];
        [inv[c * n + j], inv[piv * n + j]] = [inv[piv * n + j], inv[c * n + j]];
      }
    }
    const d = a[c * n + c];
    for (let j = 0; j < n; j++) {
      a[c * n + j] /= d;
      inv[c * n + j] /= d;
    }
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r * n + c];
      if (f === 0) continue;
      for (let j = 0; j < n; j++) {
        a[r * n + j] -= f * a[c * n + j];
        inv[r * n + j] -= f * inv[c * n + j];
      }
    }
  }
  return inv;
}

interface ResolvedParameter { id: string; min: number; max: number; space: 'linear' | 'log'; value0: number }

/** `at_range_edge` for every parameter whose u lies within 1e-3 of 0 or 1. */
function rangeEdgeWarnings(params: ResolvedParameter[], u: number[]): FitWarning[] {
  const out: FitWarning[] = [];
  params.forEach((p, k) => {
    if (u[k] <= 1e-3 || u[k] >= 1 - 1e-3) {
      out.push({ code: 'at_range_edge', id: p.id, message: `${p.id} = ${fmt(fromUnit(p, u[k]))} sits on the ${u[k] <= 1e-3 ? 'lower' : 'upper'} edge of its range [${fmt(p.min)}, ${fmt(p.max)}]: the data may want a value outside it` });
    }
  });
  return out;
}

function toUnit(p: ResolvedParameter, x: number): number {
  const u = p.space === 'log' ? (Math.log(x) - Math.log(p.min)) / (Math.log(p.max) - Math.log(p.min)) : (x - p.min) / (p.max - p.min);
  return Math.min(1, Math.max(0, u));
}

function fromUnit(p: ResolvedParameter, u: number): number {
  return p.space === 'log' ? Math.exp(Math.log(p.min) + u * (Math.log(p.max) - Math.log(p.min))) : p.min + u * (p.max - p.min);
}

export function resolveParameters(model: ModelDoc, list: readonly (string | FitParameter)[]): ResolvedParameter[] {
  if (!list.length) throw new FitInputError('no_parameters', 'no parameters to fit');
  const seen = new Set<string>();
  return list.map((item) => {
    const spec: FitParameter = typeof item === 'string' ? { id: item } : item;
    const doc = model.parameters.find((p) => p.id === spec.id);
    if (!doc) throw new FitInputError('unknown_parameter', `unknown parameter '${spec.id}' (the model's parameters: ${model.parameters.map((p) => p.id).join(', ')})`, spec.id);
    if (seen.has(spec.id)) throw new FitInputError('invalid_settings', `parameter '${spec.id}' is named twice`, spec.id);
    seen.add(spec.id);
    const min = spec.min ?? doc.range?.min;
    const max = spec.max ?? doc.range?.max;
    if (min === undefined || max === undefined) throw new FitInputError('parameter_without_range', `parameter '${spec.id}' has no range to fit within (give it a range in the model)`, spec.id);
    if (!(Number.isFinite(min) && Number.isFinite(max) && min < max)) throw new FitInputError('invalid_range', `parameter '${spec.id}': range [${min}, ${max}] is not an interval`, spec.id);
    const space = spec.space ?? (min > 0 && max / min >= 10 ? 'log' : 'linear');
    if (space === 'log' && !(min > 0)) throw new FitInputError('invalid_range', `parameter '${spec.id}': a log search space needs a range above zero`, spec.id);
    return { id: spec.id, min, max, space, value0: Math.min(max, Math.max(min, doc.value)) };
  });
}

function resolveVariables(model: ModelDoc, set: ObservationSet, list?: readonly (string | FitVariable)[]) {
  const series = seriesOfModel(model);
  const chosen = list ?? Object.keys(set.variables);
  if (!chosen.length) throw new FitInputError('no_observations', 'the observation set has no observations');
  return chosen.map((item) => {
    const spec: FitVariable = typeof item === 'string' ? { id: item } : item;
    const s = series.find((x) => x.id === spec.id);
    if (!s) throw new FitInputError('unknown_variable', `unknown variable '${spec.id}': not a state or reported quantity of ${model.id}`, spec.id);
    if (!set.variables[spec.id]) throw new FitInputError('no_observations', `no observations of '${spec.id}'`, spec.id);
    const weight = spec.weight ?? 1;
    if (!(Number.isFinite(weight) && weight >= 0)) throw new FitInputError('invalid_weight', `weight of '${spec.id}' must be a number ≥ 0, got ${weight}`, spec.id);
    return { id: spec.id, weight, residual: spec.residual ?? (s.role === 'chlorophyll' ? 'log' : 'linear'), n: 0 } as { id: string; weight: number; residual: 'linear' | 'log'; n: number };
  });
}

const fmt = (x: number) => String(Number(x.toPrecision(4)));
