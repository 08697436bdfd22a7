/**
 * The two-box water–sediment model, with water in mg/m^3 over V and sediment in g/m^2 over A,
 * so that the engine must convert between the two through the sizes.
 *
 * Sources:
 * - Derived two-box test of check-values section 7 (not a published reference) [D]:
 *   dMw/dt = L − (ρ + s) Mw + r Ms, dMs/dt = s Mw − (r + b) Ms, L = 1000 kg/yr, ρ = 2/yr,
 *   s = 1.5/yr, r = 0.1/yr, b = 0.05/yr, V = 1e7 m^3; values at t = 1, 5, 20 yr and the
 *   cumulative outflow and burial at 1 and 5 yr.
 * - The steady state, the eigenvalues and the transient (eigen-decomposition of the 2×2
 *   matrix, and its time integral for the cumulative fluxes) are derived in the test.
 * - Closure: L t − outflow − burial − (Mw + Ms) = 0 (check-values 7.2, common practice).
 * Unit factors (derived): W [mg/m^3] × 1e7 m^3 × 1e-6 = kg; S [g/m^2] × 1e6 m^2 × 1e-3 = kg.
 * Times: the parameters carry 1/yr and kg/yr; the engine's yr is 365.25 d, so t yr = 365.25 t d.
 */
import { describe, expect, it } from 'vitest';
import { massBalances, simulate } from '../../../src/lib/engine';
import { DAYS_PER_YEAR, TIGHT, WS, at, daysBetween, relErr, scenario, sedimentMass, waterMass, waterSediment, why } from './fixtures';

// ---- the analytic solution, per year, in kg -----------------------------------------------
const a11 = -(WS.rho + WS.s);
const a12 = WS.r;
const a21 = WS.s;
const a22 = -(WS.r + WS.b);
const det = a11 * a22 - a12 * a21;
// Steady state: A x* + (L, 0) = 0, by Cramer's rule.
const MwStar = (-WS.L * a22) / det;
const MsStar = (WS.L * a21) / det;
// Eigenvalues of A and eigenvectors v = (a12, λ − a11).
const tr = a11 + a22;
const disc = Math.sqrt((tr * tr) / 4 - det);
const lambda = [tr / 2 + disc, tr / 2 - disc];
const vec = lambda.map((l) => [a12, l - a11]);
// x(0) − x* = −x* = α1 v1 + α2 v2.
const dv = vec[0][0] * vec[1][1] - vec[1][0] * vec[0][1];
const alpha = [
  (-MwStar * vec[1][1] + MsStar * vec[1][0]) / dv,
  (-MsStar * vec[0][0] + MwStar * vec[0][1]) / dv
];

/** Masses (kg) at t years, from Mw = Ms = 0. */
function masses(t: number): [number, number] {
  let mw = MwStar;
  let ms = MsStar;
  for (let i = 0; i < 2; i++) {
    const e = alpha[i] * Math.exp(lambda[i] * t);
    mw += e * vec[i][0];
    ms += e * vec[i][1];
  }
  return [mw, ms];
}

/** ∫0^t (Mw, Ms) dt in kg·yr. */
function integrals(t: number): [number, number] {
  let iw = MwStar * t;
  let is = MsStar * t;
  for (let i = 0; i < 2; i++) {
    const e = (alpha[i] * (Math.exp(lambda[i] * t) - 1)) / lambda[i];
    iw += e * vec[i][0];
    is += e * vec[i][1];
  }
  return [iw, is];
}
const cumOutflow = (t: number) => WS.rho * integrals(t)[0];
const cumBurial = (t: number) => WS.b * integrals(t)[1];

describe('the analytic two-box solution (derived in the test)', () => {
  it('has the steady state (400 kg, 4000 kg) and eigenvalues −3.54419312, −0.10580688 /yr', () => {
    expect(Math.abs(MwStar - 400)).toBeLessThan(1e-10);
    expect(Math.abs(MsStar - 4000)).toBeLessThan(1e-9);
    expect(Math.abs(lambda[1] - -3.54419312)).toBeLessThan(5e-9);
    expect(Math.abs(lambda[0] - -0.10580688)).toBeLessThan(5e-9);
    // Budget at steady state: 1000 = 800 (outflow) + 200 (burial).
    expect(Math.abs(WS.rho * MwStar - 800)).toBeLessThan(1e-10);
    expect(Math.abs(WS.b * MsStar - 200)).toBeLessThan(1e-10);
  });

  it('reproduces check-values 7 at t = 1, 5, 20 yr (masses and cumulative outflow, burial)', () => {
    const ref = [
      { t: 1, mw: 282.674347271, ms: 294.432157114, out: 416.830038389, bur: 6.063457226 },
      { t: 5, mw: 328.430252849, ms: 1570.784755629, out: 2899.503928052, bur: 201.28106347 },
      { t: 20, mw: 385.362755832, ms: 3503.183664796 }
    ];
    for (const r of ref) {
      const [mw, ms] = masses(r.t);
      expect(Math.abs(mw - r.mw)).toBeLessThan(1e-8);
      expect(Math.abs(ms - r.ms)).toBeLessThan(1e-8);
      if (r.out !== undefined) {
        expect(Math.abs(cumOutflow(r.t) - r.out)).toBeLessThan(1e-8);
        expect(Math.abs(cumBurial(r.t) - r.bur!)).toBeLessThan(1e-8);
        // Closure: L t − outflow − burial − (Mw + Ms) = 0.
        expect(Math.abs(WS.L * r.t - r.out - r.bur! - r.mw - r.ms)).toBeLessThan(1e-8);
      }
    }
  });
});

describe('massBalances(waterSediment) converts through the sizes', () => {
  const b = massBalances(waterSediment());
  const term = (st: string, side: 'inflows' | 'outflows', f: string) =>
    b.states.find((x) => x.state === st)![side].find((x) => x.flow === f)!;

  it('settling enters S with factor m(W)/m(S) = (1e7·1e-6)/(1e6·1e-3) = 0.01 and release enters W with 100', () => {
    // m(x) = size × (unit factor to kg), derived: m(W) = 10 kg per mg/m^3, m(S) = 1000 kg per g/m^2.
    expect(relErr(term('S', 'inflows', 'settling').factor, 0.01)).toBeLessThan(1e-12);
    expect(relErr(term('W', 'inflows', 'release').factor, 100)).toBeLessThan(1e-12);
    expect(term('W', 'outflows', 'settling').factor).toBe(1);
    expect(term('S', 'outflows', 'release').factor).toBe(1);
  });

  it('lists load as the import and outflow, burial as the exports', () => {
    expect(b.imports).toEqual(['load']);
    expect([...b.exports].sort()).toEqual(['burial', 'outflow']);
    expect(b.unit).toBe('kg');
  });
});

describe('simulate(waterSediment) from W = S = 0 over 20 years (7305 d = 20 × 365.25 d)', () => {
  const m = waterSediment(0, 0);
  const run = simulate(m, scenario(m, { end: '2047-01-01', solver: TIGHT }));
  const kgW = (t: number) => waterMass(at(run, 'W', t));
  const kgS = (t: number) => sedimentMass(at(run, 'S', t));

  it('ends on day 7305, exactly 20 engine years', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(run.times[run.times.length - 1]).toBe(7305);
  });

  it('Mw and Ms at t = 20 yr match check-values 7 (385.362755832, 3503.183664796 kg) to 1e-8', () => {
    expect(relErr(kgW(7305), 385.362755832)).toBeLessThan(1e-8);
    expect(relErr(kgS(7305), 3503.183664796)).toBeLessThan(1e-8);
  });

  it('Mw and Ms follow the analytic solution at whole days near 1, 5 and 10 yr to 1e-8', () => {
    for (const d of [1, 30, 365, 366, 1826, 1827, 3653]) {
      const [mw, ms] = masses(d / DAYS_PER_YEAR);
      expect(relErr(kgW(d), mw), `Mw at day ${d}`).toBeLessThan(1e-8);
      expect(relErr(kgS(d), ms), `Ms at day ${d}`).toBeLessThan(1e-8);
    }
  });

  it('the yearly budgets book outflow and burial equal to the analytic integrals over each calendar year', () => {
    expect(run.budget.filter((y) => daysBetween(y.from, y.to) > 0).length).toBe(20);
    for (const y of run.budget) {
      const t0 = daysBetween('2027-01-01', y.from) / DAYS_PER_YEAR;
      const t1 = daysBetween('2027-01-01', y.to) / DAYS_PER_YEAR;
      if (t1 === t0) continue;
      expect(relErr(y.flows.outflow, cumOutflow(t1) - cumOutflow(t0)), `outflow ${y.year}`).toBeLessThan(1e-8);
      expect(relErr(y.flows.burial, cumBurial(t1) - cumBurial(t0)), `burial ${y.year}`).toBeLessThan(1e-8);
      expect(relErr(y.flows.load, WS.L * (t1 - t0)), `load ${y.year}`).toBeLessThan(1e-12);
    }
  });

  it('closure.exported = cumulative outflow + burial = 20000 − Mw(20) − Ms(20) kg; closure ok', () => {
    expect(relErr(run.closure.imported, WS.L * 20)).toBeLessThan(1e-12);
    const exported = cumOutflow(20) + cumBurial(20);
    expect(Math.abs(exported - (20000 - 385.362755832 - 3503.183664796))).toBeLessThan(1e-7);
    expect(relErr(run.closure.exported, exported)).toBeLessThan(1e-9);
    const outflow = run.budget.reduce((a, y) => a + y.flows.outflow, 0);
    const burial = run.budget.reduce((a, y) => a + y.flows.burial, 0);
    expect(relErr(outflow, cumOutflow(20))).toBeLessThan(1e-8);
    expect(relErr(burial, cumBurial(20))).toBeLessThan(1e-8);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
  });

  it('settling leaves the water and arrives in the sediment as the same mass (budget, kg)', () => {
    // The sediment gains s·Mw − (r + b)·Ms: over 20 years its mass change equals
    // settling − release − burial as booked.
    const sum = (id: string) => run.budget.reduce((a, y) => a + y.flows[id], 0);
    const dMs = kgS(7305) - kgS(0);
    expect(relErr(sum('settling') - sum('release') - sum('burial'), dMs)).toBeLessThan(1e-8);
    const dMw = kgW(7305) - kgW(0);
    expect(relErr(sum('load') - sum('outflow') - sum('settling') + sum('release'), dMw)).toBeLessThan(1e-8);
  });
});

describe('simulate(waterSediment) started at the derived steady state', () => {
  // 400 kg in 1e7 m^3 = 40 mg/m^3; 4000 kg on 1e6 m^2 = 4 g/m^2.
  const W0 = MwStar / (WS.V * 1e-6);
  const S0 = MsStar / (WS.A * 1e-3);
  const m = waterSediment(W0, S0);
  const run = simulate(m, scenario(m, { end: '2047-01-01', solver: TIGHT }));

  it('stays at W = 40 mg/m^3 and S = 4 g/m^2 (a wrong size or unit conversion would drift)', () => {
    expect(W0).toBeCloseTo(40, 12);
    expect(S0).toBeCloseTo(4, 12);
    expect(run.status, why(run)).toBe('ok');
    for (const d of [1, 365, 3653, 7305]) {
      expect(relErr(at(run, 'W', d), W0)).toBeLessThan(1e-9);
      expect(relErr(at(run, 'S', d), S0)).toBeLessThan(1e-9);
    }
  });

  it('books 800 kg/yr outflow, 200 burial, 600 settling, 400 release in each full year', () => {
    const y = run.budget.find((b) => b.year === 2030)!;
    const years = daysBetween(y.from, y.to) / DAYS_PER_YEAR;
    expect(relErr(y.flows.outflow, 800 * years)).toBeLessThan(1e-9);
    expect(relErr(y.flows.burial, 200 * years)).toBeLessThan(1e-9);
    expect(relErr(y.flows.settling, WS.s * MwStar * years)).toBeLessThan(1e-9);
    expect(relErr(y.flows.release, WS.r * MsStar * years)).toBeLessThan(1e-9);
    expect(Math.abs(y.storageChange)).toBeLessThan(1e-6);
  });
});
