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
import { mulberry32 } from '../../../src/lib/engine/balance/identity';
import { smallLake, twoYears, pExact, isoDay } from './fixtures';

/** Standard normal draws by Box & Muller (1958) from a seeded uniform generator. */
function normals(seed: number): () => number {
  const u = mulberry32(seed);
  return () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
}

/**
 * Twin data with noise: the hand-solved P(t) at the true values (independent of the engine)
 * every 15 days over two years, plus Gaussian noise of sd `sdP` mg/m^3; chlorophyll 0.3·P
 * with multiplicative noise of sd `sdLogChl` in log10.
 */
function noisyCsv(seed: number, sdP: number, sdLogChl: number | null): string {
  const z = normals(seed);
  const lines = ['date,variable,value,unit'];
  for (let d = 15; d <= 720; d += 15) {
    const P = pExact(d, TRUE.Lin, TRUE.k);
    lines.push(`${isoDay(d)},P,${(P + sdP * z()).toFixed(4)},mg/m^3`);
    if (sdLogChl !== null) lines.push(`${isoDay(d)},Chl,${((0.3 * P * 10 ** (sdLogChl * z())) / 1000).toFixed(6)},ug/L`);
  }
  return lines.join('\n');
}

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

  it('twin experiment with noise (P sd 2 mg/m^3, chlorophyll 0.03 in log10): Lin and k within 5 % of the truth and inside their 95 % intervals', () => {
    const noisy = parseObservations(noisyCsv(7, 2, 0.03), model);
    expect(noisy.problems).toEqual([]);
    const r = calibrate(model, twoYears(), noisy, { parameters: ['Lin', 'k'] });
    expect(r.status).toBe('ok');
    expect(r.converged).toBe(true);
    // tolerance stated for this design (48 dates, noise as above): 5 % of the true values
    expect(Math.abs(r.parameters.Lin / TRUE.Lin - 1)).toBeLessThan(0.05);
    expect(Math.abs(r.parameters.k / TRUE.k - 1)).toBeLessThan(0.05);
    for (const id of ['Lin', 'k'] as const) {
      const iv = r.intervals![id];
      expect(iv.bounded).toBe(true);
      expect(iv.low).toBeLessThan(r.parameters[id]);
      expect(iv.high).toBeGreaterThan(r.parameters[id]);
      expect(iv.low).toBeLessThanOrEqual(TRUE[id]);
      expect(iv.high).toBeGreaterThanOrEqual(TRUE[id]);
      // narrower than the range: the data do say something
      expect(iv.high - iv.low).toBeLessThan(0.5 * (r.ranges[id].max - r.ranges[id].min));
    }
  });

  it('the linearised 95 % intervals cover the truth in most of 20 noisy twins (binomial: ≥ 15 of 20 unless coverage is far below 95 %)', () => {
    // Additive iid Gaussian noise on P only: the textbook case of linearised intervals
    // (Bates & Watts 1988, Sect. 2.3). With true coverage 0.95, P(fewer than 15 of 20) ≈ 3e-4.
    const hits = { Lin: 0, k: 0 };
    let width = 0;
    for (let seed = 1; seed <= 20; seed++) {
      const set20 = parseObservations(noisyCsv(100 + seed, 3, null), model);
      const r = calibrate(model, twoYears(), set20, { parameters: ['Lin', 'k'], variables: ['P'] });
      expect(r.status).toBe('ok');
      for (const id of ['Lin', 'k'] as const) {
        const iv = r.intervals![id];
        if (iv.bounded && iv.low <= TRUE[id] && TRUE[id] <= iv.high) hits[id]++;
      }
      width += r.intervals!.k.high - r.intervals!.k.low;
    }
    expect(hits.Lin).toBeGreaterThanOrEqual(15);
    expect(hits.k).toBeGreaterThanOrEqual(15);
    // and they are not the whole range (which would cover trivially)
    expect(width / 20).toBeLessThan(0.2 * (0.02 - 0.001));
  });

  it('a parameter no observation sees gets the whole range as its interval, marked unbounded', () => {
    const r = calibrate(model, twoYears(), set, { parameters: ['k', 'kq'], variables: ['P'], maxIterations: 15 });
    expect(r.intervals!.kq).toMatchObject({ low: 0.005, high: 0.015, bounded: false, seU: null });
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

  it('a cancelled fit still says when its best point sits on a range edge (a check that needs no run)', () => {
    // k starts on the lower edge of the range given, and the data want less (0.005):
    // cancelled at the first report, the best point is still the start, on the edge
    const m = smallLake();
    m.parameters.find((p) => p.id === 'Lin')!.value = TRUE.Lin;
    m.parameters.find((p) => p.id === 'k')!.value = 0.006;
    const signal = { aborted: false };
    const r = calibrate(m, twoYears(), set, { parameters: [{ id: 'k', min: 0.006, max: 0.02 }], variables: ['P'], signal, onProgress: () => (signal.aborted = true) });
    expect(r.status).toBe('cancelled');
    expect(r.parameters.k).toBeCloseTo(0.006, 9);
    expect(r.warnings.map((w) => [w.code, w.id])).toEqual([['at_range_edge', 'k']]);
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
