/**
 * Calibration recovers known parameters of the small synthetic lake (fixtures.ts) from its
 * own simulated data, run through prepareRuns; the data are checked against the hand-solved
 * P(t) first, so the target itself is independent of the engine.
 */
import { describe, expect, it } from 'vitest';
import { calibrate } from '../../../src/lib/engine/fit/calibrate';
import { FitInputError } from '../../../src/lib/engine/fit/errors';
import { parseObservations } from '../../../src/lib/engine/fit/observations';
import { fitStatistics } from '../../../src/lib/engine/fit/statistics';
import { matchRun } from '../../../src/lib/engine/fit/match';
import { prepareRuns } from '../../../src/lib/engine/simulate';
import { smallLake, twoYears, pExact, isoDay } from './fixtures';

const TRUE = { Lin: 0.6, k: 0.005 };

function syntheticCsv(): string {
  const prepared = prepareRuns(smallLake(), twoYears());
  if (!prepared.ok) throw new Error('fixture does not prepare');
  const run = prepared.runner.run({ parameters: TRUE }, { skipRunId: true });
  const lines = ['date,variable,value,unit'];
  for (let d = 15; d <= 720; d += 30) {
    // the engine's P against the hand-solved P(t), to 1e-5 relative (solver rtol 1e-6)
    expect(run.series.P[d]).toBeCloseTo(pExact(d, TRUE.Lin, TRUE.k), 2);
    lines.push(`${isoDay(d)},P,${run.series.P[d]},mg/m^3`);
    lines.push(`${isoDay(d)},Chl,${run.series.Chl[d] / 1000},ug/L`);
  }
  return lines.join('\n');
}

describe('calibrate', () => {
  const model = smallLake();
  const set = parseObservations(syntheticCsv(), model);

  it('recovers Lin and k from the model’s own data, with a falling objective path', () => {
    const progress: number[] = [];
    const r = calibrate(model, twoYears(), set, { parameters: ['Lin', 'k'], onProgress: (p) => progress.push(p.objective) });
    expect(r.status).toBe('ok');
    expect(r.converged).toBe(true);
    expect(r.parameters.Lin).toBeCloseTo(TRUE.Lin, 3);
    expect(r.parameters.k).toBeCloseTo(TRUE.k, 5);
    expect(Math.abs(r.parameters.k / TRUE.k - 1)).toBeLessThan(1e-3);
    expect(r.objective.after).toBeLessThan(1e-6 * r.objective.before);
    expect(r.ranges.k.space).toBe('log'); // 0.001–0.02 spans a factor of 20
    expect(r.variables.Chl.residual).toBe('log');
    for (let i = 1; i < r.path.length; i++) expect(r.path[i]).toBeLessThanOrEqual(r.path[i - 1]);
    expect(progress.length).toBeGreaterThan(0);
    expect(r.warnings.filter((w) => w.code === 'poorly_identifiable' || w.code === 'at_range_edge')).toEqual([]);
  });

  it('warns that kq (a pool no observation sees) is poorly identifiable', () => {
    const r = calibrate(model, twoYears(), set, { parameters: ['k', 'kq'], variables: ['P'], maxIterations: 15 });
    expect(r.status).toBe('ok');
    expect(r.warnings.map((w) => [w.code, w.id])).toContainEqual(['poorly_identifiable', 'kq']);
    expect(r.warnings.some((w) => w.code === 'poorly_identifiable' && w.id === 'k')).toBe(false);
    // one series without censoring: J = Σe²/Σ(obs − mean)² = 1 − NSE (Nash & Sutcliffe 1970)
    const nse = fitStatistics(matchRun(set, r.run!)).P.all.nse!;
    expect(r.objective.after).toBeCloseTo(1 - nse, 10);
    expect(r.objective.after).toBeGreaterThan(0.1); // Lin stays at 1.2: no k fits both the rise and the level
  });

  it('warns when the fitted value sits on its range edge', () => {
    // Lin at its true value, so the data want k = 0.005, below the range given
    const m = smallLake();
    m.parameters.find((p) => p.id === 'Lin')!.value = TRUE.Lin;
    const r = calibrate(m, twoYears(), set, { parameters: [{ id: 'k', min: 0.006, max: 0.02 }], variables: ['P'] });
    expect(r.status).toBe('ok');
    expect(r.parameters.k).toBeCloseTo(0.006, 6);
    expect(r.warnings.map((w) => [w.code, w.id])).toContainEqual(['at_range_edge', 'k']);
  });

  it('stops when cancelled, with the best point so far', () => {
    const signal = { aborted: false };
    const r = calibrate(model, twoYears(), set, { parameters: ['Lin', 'k'], signal, onProgress: () => (signal.aborted = true) });
    expect(r.status).toBe('cancelled');
    expect(r.objective.after).toBeLessThanOrEqual(r.objective.before);
  });

  it('refuses unknown parameters and parameters without a range, by code', () => {
    const code = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return (e as FitInputError).code;
      }
      return 'none';
    };
    expect(code(() => calibrate(model, twoYears(), set, { parameters: ['kX'] }))).toBe('unknown_parameter');
    expect(code(() => calibrate(model, twoYears(), set, { parameters: ['yChl'] }))).toBe('parameter_without_range');
    expect(code(() => calibrate(model, twoYears(), set, { parameters: ['k'], variables: ['Nope'] }))).toBe('unknown_variable');
  });
});
