/**
 * A `remove` measure (fish removal) is booked as an export of the P it takes away.
 *
 * Sources:
 * - Fish removal in a P model is an export of the P in the removed biomass (check-values 7.4,
 *   common practice); d(ΣM)/dt = imports − exports with measure amounts added at their dates
 *   (check-values 7.2; documents.md, closure).
 * - The expected removed mass is derived in the test from the series: the series hold the value
 *   after the measure at its date, so the value before is value_after/(1 − f) and the removed
 *   mass is value_after × f/(1 − f) × size × unit factor (FISH in g/m^2 over A ha:
 *   1 g/m^2 × 1 ha = 10 kg).
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import type { RunDoc } from '../../../src/lib/engine/document/types';
import { FISH, TIGHT, daysBetween, fishLake, fishLakeMass, indexOf, relErr, scenario, why } from './fixtures';

const f = 0.7;

/** Removed mass (kg) derived from the post-measure value at day `t`. */
function removedAt(run: RunDoc, t: number): number {
  const after = run.series.FISH[indexOf(run, t)];
  return (after / (1 - f)) * f * FISH.A * FISH.kgPerUnit;
}

describe('simulate(fishLake, remove 70 % of FISH on 2028-03-01)', () => {
  const m = fishLake();
  const on = '2028-03-01';
  const tOn = daysBetween('2027-01-01', on); // 425
  const run = simulate(
    m,
    scenario(m, { end: '2030-01-01', solver: TIGHT, measures: [{ id: 'fishOut', kind: 'remove', state: 'FISH', fraction: f, on }] })
  );
  const removed = removedAt(run, tOn);

  it('runs, and the series drop by about (1 − f) at the date', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(tOn).toBe(425);
    // One day of feeding/excretion changes FISH by well under 1 %, so after/before ≈ 0.3.
    const ratio = run.series.FISH[indexOf(run, tOn)] / run.series.FISH[indexOf(run, tOn - 1)];
    expect(Math.abs(ratio - (1 - f))).toBeLessThan(0.01);
    expect(removed).toBeGreaterThan(0);
  });

  it("the budget of 2028 books the removed mass under measures['fishOut'] and counts it as an export", () => {
    const y2028 = run.budget.find((y) => y.year === 2028)!;
    expect(relErr(y2028.measures.fishOut, removed)).toBeLessThan(1e-9);
    expect(relErr(y2028.exported, y2028.flows.flush + y2028.measures.fishOut)).toBeLessThan(1e-12);
    // Years without the measure book nothing for it.
    for (const y of run.budget.filter((b) => b.year !== 2028)) {
      expect(y.measures.fishOut ?? 0).toBe(0);
    }
  });

  it('closure.exported = Σ flush + removed mass, and the closure holds (relativeResidual < 1e-9)', () => {
    const flushed = run.budget.reduce((a, y) => a + y.flows.flush, 0);
    expect(relErr(run.closure.exported, flushed + removed)).toBeLessThan(1e-9);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
  });

  it('the mass computed from the series closes with the booked imports and exports', () => {
    const n = run.times.length - 1;
    const change = fishLakeMass(run, n) - fishLakeMass(run, 0);
    const scale = Math.max(fishLakeMass(run, 0), run.closure.imported);
    expect(Math.abs(change - (run.closure.imported - run.closure.exported)) / scale).toBeLessThan(1e-9);
    expect(relErr(run.closure.initialMass, fishLakeMass(run, 0))).toBeLessThan(1e-12);
    expect(relErr(run.closure.finalMass, fishLakeMass(run, n))).toBeLessThan(1e-12);
  });

  it('without the removal the books differ by exactly the removed mass', () => {
    const base = simulate(m, scenario(m, { end: '2030-01-01', solver: TIGHT }));
    expect(base.status, why(base)).toBe('ok');
    // Up to the day before the measure the two runs agree (to the solver tolerance: the
    // measure date splits the integration, so the steps differ).
    const i = indexOf(run, tOn - 1);
    expect(relErr(run.series.FISH[i], base.series.FISH[i])).toBeLessThan(1e-8);
    // Pre-measure value of the scenario = value of the baseline at the date.
    const before = run.series.FISH[indexOf(run, tOn)] / (1 - f);
    expect(relErr(before, base.series.FISH[indexOf(base, tOn)])).toBeLessThan(1e-8);
  });
});

describe('simulate(fishLake, remove 70 % every year, 3 times from 2028-03-01)', () => {
  const m = fishLake();
  const run = simulate(
    m,
    scenario(m, {
      end: '2032-01-01',
      solver: TIGHT,
      measures: [
        { id: 'fishOut', kind: 'remove', state: 'FISH', fraction: f, on: '2028-03-01', repeat: { everyYears: 1, count: 3 } }
      ]
    })
  );

  it('books each removal in its own year and none in the year after the last', () => {
    expect(run.status, why(run)).toBe('ok');
    let total = 0;
    for (const [year, date] of [
      [2028, '2028-03-01'],
      [2029, '2029-03-01'],
      [2030, '2030-03-01']
    ] as const) {
      const want = removedAt(run, daysBetween('2027-01-01', date));
      const got = run.budget.find((y) => y.year === year)!.measures.fishOut;
      expect(relErr(got, want), String(year)).toBeLessThan(1e-9);
      total += want;
    }
    expect(run.budget.find((y) => y.year === 2031)!.measures.fishOut ?? 0).toBe(0);
    const flushed = run.budget.reduce((a, y) => a + y.flows.flush, 0);
    expect(relErr(run.closure.exported, flushed + total)).toBeLessThan(1e-9);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
  });
});
