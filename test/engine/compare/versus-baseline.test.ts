/**
 * versusBaseline / scenarioCost / costPerImprovement with values computed by hand in the
 * test (the rules are the project's own, written in versus-baseline.ts).
 */
import { describe, expect, it } from 'vitest';
import type { Headline } from '../../../src/lib/engine/compare/indicators';
import { costPerImprovement, scenarioCost, versusBaseline } from '../../../src/lib/engine/compare/versus-baseline';

const h = (key: string, value: number | null, better: Headline['better'] = 'lower', kind: Headline['kind'] = 'value', unit = 'ug/L'): Headline => ({
  key,
  role: key.split('.')[0],
  label: key,
  unit,
  kind,
  better,
  value
});

describe('versusBaseline(run, baseline)', () => {
  const base = [h('chlorophyll.last', 40), h('secchi.last', 1, 'higher', 'value', 'm'), h('chlorophyll.firstYearMet', 2040, 'earlier', 'year', 'year'), h('dissolvedP.last', 0), h('totalP.last', null)];
  const run = [h('chlorophyll.last', 30), h('secchi.last', 1.5, 'higher', 'value', 'm'), h('chlorophyll.firstYearMet', 2035, 'earlier', 'year', 'year'), h('dissolvedP.last', 2), h('totalP.last', 50)];
  const c = Object.fromEntries(versusBaseline(run, base).map((x) => [x.key, x]));

  it('chlorophyll 40 → 30: change −10 ug/L, −25 %, improvement 10', () => {
    expect(c['chlorophyll.last'].change).toBeCloseTo(-10, 12);
    expect(c['chlorophyll.last'].percent).toBeCloseTo(-25, 12);
    expect(c['chlorophyll.last'].improvement).toBeCloseTo(10, 12);
  });
  it('Secchi depth 1 → 1.5 m (deeper is better): +0.5 m, +50 %, improvement 0.5', () => {
    expect(c['secchi.last'].change).toBeCloseTo(0.5, 12);
    expect(c['secchi.last'].percent).toBeCloseTo(50, 12);
    expect(c['secchi.last'].improvement).toBeCloseTo(0.5, 12);
  });
  it('first year met 2040 → 2035: −5 years, no per cent, improvement 5 (earlier is better)', () => {
    expect(c['chlorophyll.firstYearMet'].change).toBe(-5);
    expect(c['chlorophyll.firstYearMet'].percent).toBeNull();
    expect(c['chlorophyll.firstYearMet'].improvement).toBe(5);
  });
  it('a baseline of 0 has no per cent; a missing value has no change', () => {
    expect(c['dissolvedP.last'].change).toBe(2);
    expect(c['dissolvedP.last'].percent).toBeNull();
    expect(c['totalP.last'].change).toBeNull();
    expect(c['totalP.last'].improvement).toBeNull();
  });
});

describe('scenarioCost(scenario)', () => {
  it('sums the costs by currency, currencies in alphabetical order', () => {
    expect(
      scenarioCost({
        costs: [
          { measure: 'a', amount: 100, currency: 'SEK' },
          { measure: 'b', amount: 210000, currency: 'EUR' },
          { measure: 'c', amount: 2400000, currency: 'EUR' }
        ]
      })
    ).toEqual([
      { currency: 'EUR', amount: 2610000 },
      { currency: 'SEK', amount: 100 }
    ]);
  });
  it('is empty for a scenario without costs', () => {
    expect(scenarioCost({})).toEqual([]);
  });
});

describe('costPerImprovement(costs, change)', () => {
  const costs = [{ currency: 'EUR', amount: 150 }];
  it('150 EUR for 10 ug/L less chlorophyll is 15 EUR per ug/L', () => {
    const [r] = costPerImprovement(costs, { key: 'k', label: 'k', unit: 'ug/L', run: 30, baseline: 40, change: -10, percent: -25, improvement: 10 });
    expect(r.perUnit).toBeCloseTo(15, 12);
    expect(r.unit).toBe('ug/L');
  });
  it('says "no improvement" when the run is no better than the baseline', () => {
    const worse = costPerImprovement(costs, { key: 'k', label: 'k', unit: 'ug/L', run: 45, baseline: 40, change: 5, percent: 12.5, improvement: -5 });
    expect(worse[0].perUnit).toBeNull();
    expect(worse[0].reason).toBe('no improvement');
    const same = costPerImprovement(costs, { key: 'k', label: 'k', unit: 'ug/L', run: 40, baseline: 40, change: 0, percent: 0, improvement: 0 });
    expect(same[0].reason).toBe('no improvement');
  });
});
