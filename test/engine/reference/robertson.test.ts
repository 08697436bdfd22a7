/**
 * Robertson's stiff chemical kinetics as a closed three-box model: method `auto` must move to
 * the stiff solver and still hit the reference values.
 *
 * Sources:
 * - Robertson, H.H. (1966) in Walsh (ed.), Numerical Analysis: An Introduction, 178–182; the
 *   standard stiff test problem of Hairer & Wanner (1996), Solving ODEs II, Sect. IV.1/IV.10.
 *   y1' = −0.04 y1 + 1e4 y2 y3, y2' = 0.04 y1 − 1e4 y2 y3 − 3e7 y2², y3' = 3e7 y2²,
 *   y(0) = (1, 0, 0); reference values at t = 40, 400, 4000: check-values section 9 [D].
 * - y1 + y2 + y3 = 1 for all t (closed system; check-values 7.1 and 9).
 * Units: states in mg/m^3 (size 1e6 m^3, so 1 mg/m^3 is 1 kg); k1 in 1/d, k2 and k3 in
 * m^3/mg/d, so that every rate is in mg/m^3/d; time in days.
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import { at, relErr, robertson, scenario, why } from './fixtures';

const REF = {
  40: [7.158270687194e-1, 9.185534764558e-6, 2.841637457458e-1],
  400: [4.505186684712e-1, 3.222901441675e-6, 5.494781086274e-1],
  4000: [1.832022577770e-1, 8.942371252781e-7, 8.167968479859e-1]
} as const;

const SOLVER = { method: 'auto', rtol: 1e-8, atol: 1e-14, maxStep: 1000, maxSteps: 100_000 } as const;

function expectReference(run: ReturnType<typeof simulate>, t: 40 | 400 | 4000) {
  const [y1, y2, y3] = REF[t];
  expect(relErr(at(run, 'y1', t), y1), `y1(${t})`).toBeLessThan(1e-6);
  expect(relErr(at(run, 'y2', t), y2), `y2(${t})`).toBeLessThan(1e-4);
  expect(relErr(at(run, 'y3', t), y3), `y3(${t})`).toBeLessThan(1e-6);
}

describe('simulate(robertson) to t = 40 d with method auto', () => {
  const m = robertson();
  const run = simulate(m, scenario(m, { end: 40, solver: SOLVER }));

  it('finishes, and auto switched to the stiff method (solver.switchedAt is set)', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(run.solver.switchedAt).not.toBeNull();
    expect(run.solver.switchedAt!).toBeGreaterThanOrEqual(0);
    expect(run.solver.switchedAt!).toBeLessThan(40);
    expect(run.solver.steps).toBeGreaterThan(0);
    expect(run.solver.steps).toBeLessThan(SOLVER.maxSteps);
  });

  it('y1, y3 match check-values 9 to 1e-6 relative and y2 to 1e-4 at t = 40', () => {
    expectReference(run, 40);
  });

  it('keeps y1 + y2 + y3 = 1 and the closure (relativeResidual < 1e-9)', () => {
    for (let i = 0; i < run.times.length; i++) {
      expect(Math.abs(run.series.y1[i] + run.series.y2[i] + run.series.y3[i] - 1)).toBeLessThan(1e-9);
    }
    expect(run.closure.imported).toBe(0);
    expect(run.closure.exported).toBe(0);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
  });
});

describe('simulate(robertson) to t = 4000 d with method auto, output every 10 d', () => {
  const m = robertson();
  // 2027-01-01 + 4000 d = 2037-12-14; 400 output steps of 10 d.
  const run = simulate(m, scenario(m, { end: '2037-12-14', outputStep: 10, solver: SOLVER }));

  it('reaches t = 4000 with the stiff method in far fewer steps than maxSteps', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(run.times[run.times.length - 1]).toBe(4000);
    expect(run.solver.switchedAt).not.toBeNull();
    expect(run.solver.steps).toBeLessThan(SOLVER.maxSteps / 10);
  });

  it('matches check-values 9 at t = 40, 400 and 4000', () => {
    expectReference(run, 40);
    expectReference(run, 400);
    expectReference(run, 4000);
  });

  it('keeps the closure over the long horizon', () => {
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
  });
});

describe('simulate(robertson) with method stiff', () => {
  it('matches check-values 9 at t = 40 and never reports a switch', () => {
    const m = robertson();
    const run = simulate(m, scenario(m, { end: 40, solver: { ...SOLVER, method: 'stiff' } }));
    expect(run.status, why(run)).toBe('ok');
    expect(run.solver.method).toBe('stiff');
    expect(run.solver.switchedAt).toBeNull();
    expectReference(run, 40);
  });
});
