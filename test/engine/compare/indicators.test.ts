/**
 * runIndicators / headlines on tiny synthetic runs whose answers are computed by hand in
 * the comments (growing-season and annual means, days beyond a target, first year met;
 * common practice as defined in src/lib/engine/compare/indicators.ts), and Carlson's TSI
 * against shared/reference/check-values.md section 3 (Carlson, R.E. 1977, Limnol. Oceanogr.
 * 22: 361–369, base-2 forms; rounded forms of Carlson & Simpson 1996, NALMS).
 */
import { describe, expect, it } from 'vitest';
import { headlines, lastYearsOf, runIndicators, unitFactor } from '../../../src/lib/engine/compare/indicators';
import { daily, fakeRun, inSeason, roleModel } from './fixture';

// 2027-01-01 .. 2030-01-01 (day 1095): whole years 2027, 2028 (leap), 2029.
const START = '2027-01-01';
const N = 1096;
const byYear = (d: Date, v: Record<number, number>) => v[d.getUTCFullYear()] ?? NaN;

/** Chl 30, 20, 10 in the season of 2027–2029 and 100 outside it; TP 24 in season, 48 outside;
 *  Secchi 0.5, 2, 2 in season, 9 outside. */
function threeYears() {
  const chl = daily(START, N, (d) => (inSeason(d) ? byYear(d, { 2027: 30, 2028: 20.0855, 2029: 20.0855, 2030: 0 }) : 100));
  const tp = daily(START, N, (d) => (inSeason(d) ? 24 : 48));
  const sd = daily(START, N, (d) => (inSeason(d) ? byYear(d, { 2027: 0.5, 2028: 2, 2029: 2, 2030: 2 }) : 9));
  const model = roleModel({ chlorophyll: { id: 'Chl', unit: 'ug/L' }, totalP: { id: 'TP', unit: 'mg/m^3' }, secchi: { id: 'SD', unit: 'm' } });
  const run = fakeRun(START, chl.times, { Chl: chl.values, TP: tp.values, SD: sd.values }, { Chl: 'ug/L', TP: 'mg/m^3', SD: 'm' });
  return { model, run };
}

describe('lastYearsOf(run, n)', () => {
  it('gives the last n whole calendar years (1 January to 31 December inside the run)', () => {
    const { run } = threeYears();
    expect(lastYearsOf(run, 2)).toEqual([2028, 2029]);
    expect(lastYearsOf(run, 3)).toEqual([2027, 2028, 2029]);
    expect(lastYearsOf(run, 4)).toEqual([]);
  });
  it('leaves out a last year that stops on 30 December', () => {
    const r = fakeRun(START, Array.from({ length: 1094 }, (_, i) => i), {}, {}); // last day 2029-12-30
    expect(lastYearsOf(r, 2)).toEqual([2027, 2028]);
  });
});

describe('runIndicators(run, model, options)', () => {
  const { model, run } = threeYears();
  const ind = runIndicators(run, model, { lastYears: 2, targets: { chlorophyll: 25, secchi: 1 } });

  it('takes the growing-season mean of chlorophyll per year (off-season days left out)', () => {
    const r = ind.roles.chlorophyll;
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.seriesId).toBe('Chl');
    expect(r.perYear.map((y) => y.year)).toEqual([2027, 2028, 2029]);
    expect(r.perYear[0].value).toBeCloseTo(30, 12);
    expect(r.perYear[0].days).toBe(183); // 30+31+30+31+31+30
    expect(r.last).toBeCloseTo(20.0855, 12); // mean of 2028 and 2029
  });

  it('takes the annual mean of total P: (24·183 + 48·182)/365 in 2027, (24·183 + 48·183)/366 = 36 in 2028', () => {
    const r = ind.roles.totalP;
    if (!r.ok) throw new Error(r.reason);
    expect(r.window).toBe('year');
    expect(r.perYear[0].value).toBeCloseTo((24 * 183 + 48 * 182) / 365, 12);
    expect(r.perYear[1].value).toBeCloseTo(36, 12);
    expect(r.last).toBeCloseTo((36 + (24 * 183 + 48 * 182) / 365) / 2, 12);
    // and its growing-season mean, for the TSI
    expect(r.seasonLast).toBeCloseTo(24, 12);
  });

  it('counts the season days above a chlorophyll target of 25: 183 in 2027, 0 later; first year met 2028', () => {
    const r = ind.roles.chlorophyll;
    if (!r.ok || !r.target) throw new Error('no target');
    expect(r.target.daysNotMet.map((y) => y.value)).toEqual([183, 0, 0]);
    expect(r.target.daysNotMetLast).toBe(0);
    expect(r.target.firstYearMet).toBe(2028);
  });

  it('counts the days below a Secchi target of 1 m (deeper is better): 183 in 2027', () => {
    const r = ind.roles.secchi;
    if (!r.ok || !r.target) throw new Error('no target');
    expect(r.target.better).toBe('higher');
    expect(r.target.daysNotMet.map((y) => y.value)).toEqual([183, 0, 0]);
    expect(r.target.firstYearMet).toBe(2028);
  });

  it('says why a role is missing: not in the model', () => {
    const r = ind.roles.dissolvedP;
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.reason).toMatch(/no derived quantity with role `dissolvedP`/);
  });

  it('says why a role is missing: in the model but not recorded by the run', () => {
    const m = roleModel({ dissolvedP: { id: 'DP', unit: 'mg/m^3', report: false } });
    const r = runIndicators(run, m).roles.dissolvedP;
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/did not record `DP`/);
  });

  it('gives Carlson TSI 60 (Chl 20.0855), 50 (TP 24), 50 (SD 2 m) for the last two seasons, exact forms (check-values 3.2)', () => {
    expect(ind.tsiVariant).toBe('exact');
    const { chlorophyll, totalP, secchi } = ind.tsi;
    if (!chlorophyll.ok || !totalP.ok || !secchi.ok) throw new Error('missing TSI');
    expect(chlorophyll.last).toBeCloseTo(60, 3);
    expect(totalP.last).toBeCloseTo(50, 9);
    expect(secchi.last).toBeCloseTo(50, 9);
    // 2027: SD 0.5 m is TSI 70 (Carlson 1977, Table 2)
    expect(secchi.perYear[0].value).toBeCloseTo(70, 9);
  });

  it('gives no indicator for a failed run, with the engine message as the reason', () => {
    const failed = { ...run, status: 'failed' as const, error: { code: 'non_finite_rate', message: 'rate of flow `uptake` is not finite' } };
    const f = runIndicators(failed, model);
    for (const r of Object.values(f.roles)) {
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.reason).toMatch(/the run failed: rate of flow `uptake` is not finite/);
    }
    expect(f.tsi.chlorophyll.ok).toBe(false);
  });
});

describe('runIndicators, rounded TSI and units', () => {
  // check-values 3.2 whole-lake example: SD 5 / Chl 4 / TP 10 → 36.808, 44.200, 37.353 (rounded forms)
  const n = 366 + 365 + 1; // 2028-01-01 .. 2030-01-01
  const s = '2028-01-01';
  const c = (v: number) => daily(s, n, () => v);
  const model = roleModel({ chlorophyll: { id: 'Chl', unit: 'ug/L' }, totalP: { id: 'TP', unit: 'mg/L' }, secchi: { id: 'SD', unit: 'cm' } });
  const run = fakeRun(s, c(0).times, { Chl: c(4).values, TP: c(0.01).values, SD: c(500).values }, { Chl: 'ug/L', TP: 'mg/L', SD: 'cm' });

  it('converts mg/L and cm before the index and uses the rounded coefficients when asked', () => {
    const ind = runIndicators(run, model, { tsiVariant: 'rounded', lastYears: 2 });
    const { chlorophyll, totalP, secchi } = ind.tsi;
    if (!chlorophyll.ok || !totalP.ok || !secchi.ok) throw new Error('missing TSI');
    expect(secchi.last).toBeCloseTo(36.808, 3);
    expect(chlorophyll.last).toBeCloseTo(44.2, 3);
    expect(totalP.last).toBeCloseTo(37.353, 3);
  });

  it('unitFactor: 1 mg/L = 1000 mg/m^3, ug/L = mg/m^3, m and mg/m^3 do not convert', () => {
    expect(unitFactor('mg/L', 'mg/m^3')).toBeCloseTo(1000, 9);
    expect(unitFactor('ug/L', 'mg/m^3')).toBeCloseTo(1, 12);
    expect(unitFactor('m', 'mg/m^3')).toBeNull();
  });

  it('gives no index, with a reason, for a unit that is not a concentration', () => {
    const bad = roleModel({ chlorophyll: { id: 'Chl', unit: 'm' } });
    const r = fakeRun(s, c(0).times, { Chl: c(4).values }, { Chl: 'm' });
    const t = runIndicators(r, bad, { lastYears: 2 }).tsi.chlorophyll;
    expect(t.ok).toBe(false);
    if (!t.ok) expect(t.reason).toMatch(/does not convert to mg\/m\^3/);
  });
});

describe('runIndicators on a coarser output step', () => {
  it('reads a 10-day series through daily values: Chl = day number gives the 2027 season mean (90 + 272)/2 = 181', () => {
    // 1 April 2027 is day 90, 30 September day 272; linear interpolation is exact for a line.
    const times = Array.from({ length: 110 }, (_, i) => i * 10); // to day 1090
    times.push(1095);
    const model = roleModel({ chlorophyll: { id: 'Chl', unit: 'ug/L' } });
    const run = fakeRun(START, times, { Chl: times.slice() }, { Chl: 'ug/L' });
    const r = runIndicators(run, model, { lastYears: 1 }).roles.chlorophyll;
    if (!r.ok) throw new Error(r.reason);
    expect(r.perYear[0].value).toBeCloseTo(181, 9);
    expect(r.last).toBeCloseTo(181 + 365 + 366, 9); // 2029: the same days shifted by 731
  });
});

describe('headlines(indicators, targets)', () => {
  const { model, run } = threeYears();
  it('lists the last-years means, the target values when a target is set, and three TSI values, with the same keys for every run', () => {
    const targets = { chlorophyll: 25 };
    const h = headlines(runIndicators(run, model, { lastYears: 2, targets }), targets);
    expect(h.map((x) => x.key)).toEqual([
      'chlorophyll.last',
      'chlorophyll.daysNotMet',
      'chlorophyll.firstYearMet',
      'totalP.last',
      'dissolvedP.last',
      'secchi.last',
      'tsi.chlorophyll',
      'tsi.totalP',
      'tsi.secchi'
    ]);
    const get = (k: string) => h.find((x) => x.key === k)!;
    expect(get('chlorophyll.last').value).toBeCloseTo(20.0855, 12);
    expect(get('chlorophyll.daysNotMet').value).toBe(0);
    expect(get('chlorophyll.firstYearMet').value).toBe(2028);
    expect(get('dissolvedP.last').value).toBeNull();
    expect(get('dissolvedP.last').reason).toMatch(/dissolvedP/);
    expect(get('tsi.totalP').label).toMatch(/exact coefficients/);
  });
  it('gives null with "fewer than" when the run is shorter than the last-years span', () => {
    const h = headlines(runIndicators(run, model, { lastYears: 5 }));
    expect(h[0].value).toBeNull();
    expect(h[0].reason).toMatch(/fewer than 5 whole years/);
  });
});
