/**
 * The record of an accepted calibration (`lakeledger.calibration-record/1`,
 * archive/records.ts), as a pure function of what the Fit screen holds when the user
 * accepts: the model fitted and the revision the fit created, the scenario revision, the
 * stored observation set, the engine's result and the statistics at the fitted values.
 */
import type { CalibrationResult } from '$lib/engine/fit/calibrate';
import type { VariableStatistics } from '$lib/engine/fit/statistics';
import { CALIBRATION_RECORD_FORMAT, type CalibrationRecord } from '$lib/archive/records';
import { formatValue } from '../chart-config';

/**
 * The engine's objective (engine/fit/calibrate.ts): Σ_v w_v (1/n_v) Σ e²/σ_v², e on log10
 * values for chlorophyll-role series; 1 − NSE for one uncensored series.
 */
export const OBJECTIVE_KIND = 'weighted mean squared residual over the variance of each series';

export interface CalibrationRecordInput {
  modelId: string;
  /** Digest of the draft that was fitted, and of the revision the accept created. */
  modelDigestBefore: string;
  modelDigestAfter: string;
  revisionAfter: number;
  scenario: { id: string; digest: string };
  observations: { id: string; name: string; textDigest: string };
  result: CalibrationResult;
  /** The values written into the revision (rounded as `fittedValues` does). */
  written: Record<string, number>;
  /** Statistics of the run at the fitted values (null: none could be computed). */
  statistics: Record<string, VariableStatistics> | null;
  acceptedAt: string;
  wallMs: number;
}

/** A number the record can hold (canonical JSON has no NaN or Infinity), else null. */
const finite = (x: number | null | undefined): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

export function calibrationRecord(input: CalibrationRecordInput): Omit<CalibrationRecord, 'id'> {
  const { result } = input;
  const params: CalibrationRecord['params'] = {};
  for (const id of Object.keys(result.parameters)) {
    const r = result.ranges[id];
    params[id] = { before: result.initial[id], after: input.written[id] ?? result.parameters[id], min: r.min, max: r.max, space: r.space };
  }
  const statistics: CalibrationRecord['statistics'] = {};
  for (const [id, s] of Object.entries(input.statistics ?? {})) {
    statistics[id] = { n: s.all.n, rmse: finite(s.all.rmse), bias: finite(s.all.bias), nse: finite(s.all.nse), logNse: finite(s.all.log10?.nse) };
  }
  return {
    format: CALIBRATION_RECORD_FORMAT,
    model: input.modelId,
    modelDigestBefore: input.modelDigestBefore,
    modelDigestAfter: input.modelDigestAfter,
    revisionAfter: input.revisionAfter,
    scenario: { ...input.scenario },
    observations: { ...input.observations },
    objective: { kind: OBJECTIVE_KIND, before: result.objective.before, after: result.objective.after },
    params,
    variables: Object.fromEntries(Object.entries(result.variables).map(([id, v]) => [id, { weight: v.weight }])),
    iterations: result.iterations,
    evaluations: result.evaluations,
    converged: result.converged,
    cancelled: result.status === 'cancelled',
    path: result.path.filter((x) => Number.isFinite(x)),
    statistics,
    warnings: result.warnings.map((w) => ({ code: w.code, message: w.message })),
    ...(result.intervals ? { intervals: Object.fromEntries(Object.entries(result.intervals).map(([id, iv]) => [id, { low: iv.low, high: iv.high, bounded: iv.bounded }])) } : {}),
    acceptedAt: input.acceptedAt,
    wallMs: Math.round(input.wallMs)
  };
}

/** Whether a result can be accepted: finished, or cancelled with a best point (a finite objective after at least one run). */
export function acceptable(result: CalibrationResult | null): boolean {
  if (!result) return false;
  if (result.status === 'ok') return true;
  return result.status === 'cancelled' && Number.isFinite(result.objective.after) && Number.isFinite(result.objective.before);
}

/** The line the screen shows once the record is stored. */
export function storedWords(id: string, revision: number, added: boolean): string {
  return `Calibration ${id} ${added ? 'stored' : 'was stored already'}; revision ${revision}.`;
}

/** A stored calibration in one line for the list: parameters, objective, revision. */
export function calibrationLine(r: Pick<CalibrationRecord, 'params' | 'objective' | 'revisionAfter' | 'cancelled' | 'observations' | 'iterations'>): string {
  const values = Object.entries(r.params)
    .map(([id, p]) => `${id} ${formatValue(p.before)} → ${formatValue(p.after)}`)
    .join(', ');
  return `${values}; objective ${formatValue(r.objective.before)} → ${formatValue(r.objective.after)} in ${r.iterations} iteration${r.iterations === 1 ? '' : 's'}${r.cancelled ? ' (cancelled early)' : ''}; against ${r.observations.name}; revision ${r.revisionAfter}`;
}
