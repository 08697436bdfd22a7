import { describe, expect, it } from 'vitest';
import type { CalibrationResult } from '$lib/engine/fit/calibrate';
import type { VariableStatistics } from '$lib/engine/fit/statistics';
import { checkRecord, sealRecord, type CalibrationRecord } from '$lib/archive/records';
import { OBJECTIVE_KIND, acceptable, calibrationLine, calibrationRecord, storedWords } from './calibration-record';

const result = (over: Partial<CalibrationResult> = {}): CalibrationResult =>
  ({
    status: 'ok',
    error: null,
    parameters: { muPhy: 1.4321234, kDIP: 2.5 },
    initial: { muPhy: 1.6, kDIP: 3 },
    ranges: { muPhy: { min: 0.8, max: 2.4, space: 'linear' }, kDIP: { min: 0.5, max: 10, space: 'log' } },
    variables: { Chl: { weight: 1, residual: 'log', n: 40, variance: 0.1 }, TP: { weight: 0.5, residual: 'linear', n: 40, variance: 9 } },
    objective: { before: 0.8, after: 0.4 },
    path: [0.8, 0.5, 0.4],
    iterations: 2,
    evaluations: 9,
    converged: true,
    warnings: [{ code: 'at_range_edge', id: 'kDIP', message: 'kDIP sits on the edge' }],
    run: null,
    ...over
  }) as CalibrationResult;

const stat = (nse: number | null, log = false) => {
  const s = { n: 30, pairs: 40, consistent: 0, rmse: 1.5, bias: -0.2, nse, meanObs: 1, meanSim: 1, ...(log ? { log10: { n: 30, rmse: 0.1, bias: 0, nse: 0.6, nonPositive: 0 } } : {}) };
  return { all: s, growing: s, rest: s, outside: 0 } as unknown as VariableStatistics;
};

const input = (r = result()) => ({
  modelId: 'demo_lake',
  modelDigestBefore: 'sha256:before',
  modelDigestAfter: 'sha256:after',
  revisionAfter: 3,
  scenario: { id: 'baseline', digest: 'sha256:scn' },
  observations: { id: 'obs_0123456789abcdef', name: 'lake.csv', textDigest: 'sha256:txt' },
  result: r,
  written: { muPhy: 1.43212, kDIP: 2.5 },
  statistics: { Chl: stat(0.7, true), TP: stat(null) },
  acceptedAt: '2027-06-01T10:00:00.000Z',
  wallMs: 1234.6
});

describe('calibrationRecord(input)', () => {
  it('holds what the accept knew: digests, revision, set, objective, values written with their ranges, statistics', () => {
    const rec = calibrationRecord(input());
    expect(rec).toMatchObject({
      format: 'lakeledger.calibration-record/1',
      model: 'demo_lake',
      modelDigestBefore: 'sha256:before',
      modelDigestAfter: 'sha256:after',
      revisionAfter: 3,
      scenario: { id: 'baseline', digest: 'sha256:scn' },
      observations: { id: 'obs_0123456789abcdef', name: 'lake.csv', textDigest: 'sha256:txt' },
      objective: { kind: OBJECTIVE_KIND, before: 0.8, after: 0.4 },
      variables: { Chl: { weight: 1 }, TP: { weight: 0.5 } },
      iterations: 2,
      evaluations: 9,
      converged: true,
      cancelled: false,
      path: [0.8, 0.5, 0.4],
      warnings: [{ code: 'at_range_edge', message: 'kDIP sits on the edge' }],
      acceptedAt: '2027-06-01T10:00:00.000Z',
      wallMs: 1235
    });
    expect(rec.params.muPhy).toEqual({ before: 1.6, after: 1.43212, min: 0.8, max: 2.4, space: 'linear' });
    expect(rec.params.kDIP.space).toBe('log');
    expect(rec.statistics.Chl).toEqual({ n: 30, rmse: 1.5, bias: -0.2, nse: 0.7, logNse: 0.6 });
    expect(rec.statistics.TP).toEqual({ n: 30, rmse: 1.5, bias: -0.2, nse: null, logNse: null });
  });
  it('keeps the linearised intervals of the fitted values, without the standard errors', () => {
    const rec = calibrationRecord(input(result({ intervals: { muPhy: { low: 1.3, high: 1.55, seU: 0.04, bounded: true }, kDIP: { low: 0.5, high: 10, seU: null, bounded: false } } })));
    expect(rec.intervals).toEqual({ muPhy: { low: 1.3, high: 1.55, bounded: true }, kDIP: { low: 0.5, high: 10, bounded: false } });
    expect(calibrationRecord(input()).intervals).toBeUndefined();
  });

  it('seals into a record that checks, and marks a fit cancelled early', () => {
    const rec = calibrationRecord(input(result({ status: 'cancelled', converged: false, warnings: [] })));
    expect(rec.cancelled).toBe(true);
    const { record } = sealRecord<CalibrationRecord>('calibration', rec);
    expect(record.id).toMatch(/^cal_[0-9a-f]{16}$/);
    expect(checkRecord('calibration', record)).toEqual([]);
  });
});

describe('acceptable(result)', () => {
  it('takes a finished fit, and a cancelled one only with a best point', () => {
    expect(acceptable(result())).toBe(true);
    expect(acceptable(result({ status: 'cancelled' }))).toBe(true);
    expect(acceptable(result({ status: 'cancelled', objective: { before: NaN, after: Infinity } }))).toBe(false);
    expect(acceptable(result({ status: 'failed' }))).toBe(false);
    expect(acceptable(null)).toBe(false);
  });
});

describe('storedWords / calibrationLine', () => {
  it('words the stored record and a line of the list', () => {
    expect(storedWords('cal_01', 4, true)).toBe('Calibration cal_01 stored; revision 4.');
    const rec = calibrationRecord(input(result({ status: 'cancelled' })));
    expect(calibrationLine(rec)).toBe('muPhy 1.6 → 1.43, kDIP 3 → 2.5; objective 0.8 → 0.4 in 2 iterations (cancelled early); against lake.csv; revision 3');
  });
});
