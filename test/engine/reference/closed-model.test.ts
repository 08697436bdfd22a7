/**
 * The closed NPZD example (static/examples/closed-npzd.model.json) conserves its phosphorus.
 *
 * Sources:
 * - Closed box model: every transfer is subtracted from one box and added to another, so the
 *   total is constant (check-values 7.1; Chapra 1997, opening chapters — common practice).
 * - Runge–Kutta and extrapolation methods conserve linear invariants up to round-off
 *   (Hairer, Lubich & Wanner 2006, Ch. IV; check-values 7.3 [M]): the relative drift of
 *   Σ value × size should be of the order of 1e-13–1e-12 whatever the tolerance.
 * - Parameter values and their sources are in the example file (Chapra 1997; Eppley 1972).
 */
import { describe, expect, it } from 'vitest';
import { massBalances, simulate, validateModel } from '../../../src/lib/engine';
import { MG_TO_KG, loadExample, scenario, why } from './fixtures';

const doc = loadExample('closed-npzd.model.json');
const V = doc.parameters.find((p) => p.id === 'V')!.value;
const STATES = ['DIP', 'PHY', 'ZOO', 'DET'];

describe('static/examples/closed-npzd.model.json', () => {
  it('validateModel(example) reports no errors', () => {
    expect(validateModel(doc).filter((p) => p.severity === 'error')).toEqual([]);
  });

  it('has no boundary flow (every flow has both from and to) and every parameter names a source', () => {
    for (const f of doc.flows) {
      expect(f.from, f.id).toBeTruthy();
      expect(f.to, f.id).toBeTruthy();
    }
    for (const p of doc.parameters) expect(p.source, p.id).toBeTruthy();
  });

  it('massBalances(example) has no imports or exports and every flow leaves one state and enters another', () => {
    const b = massBalances(doc);
    expect(b.imports).toEqual([]);
    expect(b.exports).toEqual([]);
    for (const f of doc.flows) {
      const out = b.states.filter((s) => s.outflows.some((t) => t.flow === f.id)).map((s) => s.state);
      const inn = b.states.filter((s) => s.inflows.some((t) => t.flow === f.id)).map((s) => s.state);
      expect(out, f.id).toEqual([f.from]);
      expect(inn, f.id).toEqual([f.to]);
    }
  });
});

describe('simulate(closed NPZD) over 10 years with the default solver', () => {
  const run = simulate(doc, scenario(doc, { end: '2037-01-01' }));
  const total = (i: number) => STATES.reduce((a, id) => a + run.series[id][i], 0);

  it('finishes with status ok and without switching to the stiff method', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(run.times[run.times.length - 1]).toBe(3653);
    expect(run.solver.switchedAt).toBeNull();
  });

  it('closure.imported and closure.exported are 0, relativeResidual < 1e-9', () => {
    expect(run.closure.imported).toBe(0);
    expect(run.closure.exported).toBe(0);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
    // 28 mg/m^3 in 1.8e6 m^3 = 50.4 kg.
    const M0 = total(0) * V * MG_TO_KG;
    expect(Math.abs(run.closure.initialMass - M0)).toBeLessThan(1e-12 * M0);
    expect(Math.abs(run.closure.finalMass - M0)).toBeLessThan(1e-9 * M0);
  });

  it('Σ state × V from the series stays at its initial value to 1e-9 relative at every output time', () => {
    const M0 = total(0) * V * MG_TO_KG;
    let worst = 0;
    for (let i = 0; i < run.times.length; i++) {
      worst = Math.max(worst, Math.abs(total(i) * V * MG_TO_KG - M0) / M0);
    }
    expect(worst).toBeLessThan(1e-9);
  });

  it('the reported TP equals DIP + PHY + ZOO + DET and Chl equals chlP × PHY', () => {
    const chlP = doc.parameters.find((p) => p.id === 'chlP')!.value;
    for (let i = 0; i < run.times.length; i += 17) {
      expect(Math.abs(run.series.TP[i] - total(i))).toBeLessThan(1e-12 * total(i));
      // 1 mg/m^3 = 1 ug/L.
      expect(Math.abs(run.series.Chl[i] - chlP * run.series.PHY[i])).toBeLessThan(1e-9 * (1 + run.series.PHY[i]));
    }
    expect(run.units.Chl).toBe('ug/L');
    expect(run.units.TP).toBe('mg/m^3');
  });

  it('no state goes negative and the seasonal forcing produces a cycle (PHY varies by more than 2×)', () => {
    for (const id of STATES) expect(Math.min(...run.series[id]), id).toBeGreaterThanOrEqual(0);
    const lastYear = run.series.PHY.slice(-365);
    expect(Math.max(...lastYear) / Math.min(...lastYear)).toBeGreaterThan(2);
  });

  it('each budget year of a closed model has zero imports, exports and storage change', () => {
    expect(run.budget.length).toBeGreaterThanOrEqual(10);
    for (const y of run.budget) {
      expect(y.imported).toBe(0);
      expect(y.exported).toBe(0);
      expect(Math.abs(y.storageChange)).toBeLessThan(1e-9 * run.closure.initialMass);
      // Internal flows are booked: uptake moves mass every full year.
      if (y.year >= 2027 && y.year <= 2036) expect(y.flows.uptake).toBeGreaterThan(0);
    }
  });
});
