/**
 * Logistic growth N' = rN(1 − N/K) written as a single state fed by an import flow.
 *
 * Sources:
 * - Verhulst (1838) (citation [M]): N(t) = K / (1 + ((K − N0)/N0) e^(−rt)); check values for
 *   r = 1 /d, K = 10, N0 = 1: check-values 6.3 [D].
 * - Closure with boundary fluxes, d(ΣM)/dt = imports − exports: check-values 7.2 (common practice).
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import { LOGISTIC_VOLUME, MG_TO_KG, TIGHT, at, logistic, relErr, scenario, why } from './fixtures';

const r = 1;
const K = 10;
const N0 = 1;
const exact = (t: number) => K / (1 + ((K - N0) / N0) * Math.exp(-r * t));
const KG_PER_UNIT = LOGISTIC_VOLUME * MG_TO_KG; // 1 mg/m^3 over 4e6 m^3 = 4 kg

describe('Verhulst (1838) closed form', () => {
  it('reproduces check-values 6.3, including N(ln 9) = K/2 exactly', () => {
    expect(Math.abs(exact(1) - 2.319693166840739)).toBeLessThan(1e-14);
    expect(Math.abs(exact(2) - 4.508530603792837)).toBeLessThan(1e-14);
    expect(Math.abs(exact(Math.log(9)) - 5)).toBeLessThan(1e-14);
    expect(Math.abs(exact(5) - 9.42825618574015)).toBeLessThan(1e-13);
    expect(Math.abs(exact(10) - 9.995915675173919)).toBeLessThan(1e-13);
  });
});

describe('simulate(logistic) with growth as an import flow', () => {
  const m = logistic(r, K, N0);
  const run = simulate(m, scenario(m, { end: 20, solver: TIGHT }));

  it('matches N(1), N(2), N(5), N(10) of check-values 6.3 to 1e-8 relative', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(relErr(at(run, 'N', 1), 2.319693166840739)).toBeLessThan(1e-8);
    expect(relErr(at(run, 'N', 2), 4.508530603792837)).toBeLessThan(1e-8);
    expect(relErr(at(run, 'N', 5), 9.42825618574015)).toBeLessThan(1e-8);
    expect(relErr(at(run, 'N', 10), 9.995915675173919)).toBeLessThan(1e-8);
  });

  it('agrees with the closed form at every day, crosses K/2 between day 2 and 3 (ln 9 = 2.197) and stays below K', () => {
    expect(run.times.length).toBe(21);
    for (let i = 0; i < run.times.length; i++) {
      expect(relErr(run.series.N[i], exact(run.times[i]))).toBeLessThan(1e-8);
      expect(run.series.N[i]).toBeLessThan(K);
    }
    expect(at(run, 'N', 2)).toBeLessThan(K / 2);
    expect(at(run, 'N', 3)).toBeGreaterThan(K / 2);
  });

  it('books the growth as an import: closure.imported = ΔM, exported = 0, closure ok', () => {
    const gained = (run.series.N[run.series.N.length - 1] - N0) * KG_PER_UNIT;
    expect(run.closure.exported).toBe(0);
    expect(relErr(run.closure.imported, gained)).toBeLessThan(1e-9);
    expect(relErr(run.closure.imported, (exact(20) - N0) * KG_PER_UNIT)).toBeLessThan(1e-8);
    expect(relErr(run.closure.initialMass, N0 * KG_PER_UNIT)).toBeLessThan(1e-12);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
    const y2027 = run.budget.find((y) => y.year === 2027)!;
    expect(relErr(y2027.flows.growth, gained)).toBeLessThan(1e-9);
    expect(relErr(y2027.imported, gained)).toBeLessThan(1e-9);
  });
});
