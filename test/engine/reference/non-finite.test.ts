/**
 * Rates that turn non-finite on a trial step must not make the solver crawl to its step limit.
 *
 * The model X' = L − k √(Xref·X) has a rate that is NaN for X < 0, so any trial step that
 * overshoots zero yields a non-finite derivative.
 * - With a load (L > 0) the exact solution approaches X* = (L/k)²/Xref > 0 and stays positive;
 *   a large trial step on the steep approach overshoots zero. The solver has to reject such a
 *   step and retry a smaller one (odex accepts NaN steps unless guarded: shared engine notes).
 *   Exact solution (derived in the test by separating variables, with Xref = 1 and u = √X):
 *   t = −(2/k)(u − u0) − (2L/k²) ln((L − k u)/(L − k u0)).
 * - Without a load the exact solution X(t) = (√X0 − k t/2)² reaches zero at t* = 2√X0/k and a
 *   numerical solution can only creep towards t* with ever smaller steps (Zeno); an unguarded
 *   odex run reaches its step limit there. The engine must either finish or stop with an error
 *   that names the flow, long before maxSteps.
 * Sources: exact solutions derived in the test; the NaN behaviour of odex: Hairer, Nørsett &
 * Wanner (1993), Sect. II.9 step control (err > 1 rejects; NaN compares false).
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import { odexSegment } from '../../../src/lib/engine/solve/odex-segment';
import { dopri5Segment } from '../../../src/lib/engine/solve/dopri5';
import { at, relErr, scenario, sqrtDrain, why } from './fixtures';

const MAX_STEPS = 100_000;

// Step budgets: near X* the Jacobian is −k/(2√X*) = −500 /d, so the problem turns stiff for
// an explicit Runge–Kutta method: Dormand–Prince 5(4) is held to h ≲ 3.3/500 d by its
// stability region (Hairer & Wanner 1996, Solving ODEs II, Sect. IV.2), about 60,000 steps
// over 400 d (seen: 60,358), while odex's extrapolation tableau reaches far further along the
// negative axis (seen: 31 steps). What both must do is reject the NaN trial steps and end at X*.
describe.each([['odexSegment', odexSegment, 1000], ['dopri5Segment', dopri5Segment, 80_000]] as const)('%s on X\' = L − k√X (the design really produces non-finite trial rates)', (_name, solver, stepBudget) => {
  it('with L = 1e-3, k = 1, maxStep 100 some trial evaluations are NaN, yet the segment ends ok at X*', () => {
    let nonFinite = 0;
    const sys = {
      n: 1,
      rhs(_t: number, y: Float64Array, out: Float64Array) {
        out[0] = 1e-3 - Math.sqrt(y[0]);
        if (!Number.isFinite(out[0])) nonFinite++;
      }
    };
    const r = solver(sys, 0, Float64Array.of(1), 400, [], () => {}, {
      rtol: 1e-10,
      atol: 1e-12,
      maxStep: 100,
      maxSteps: MAX_STEPS,
      // A first trial step of 50 d overshoots zero for sure (X falls from 1 towards 1e-6).
      initialStep: 50
    });
    expect(nonFinite).toBeGreaterThan(0);
    expect(r.status).toBe('ok');
    // Within ten times atol (1e-12) of X* = 1e-6 (seen: odex 1e-15, Dormand–Prince 3.7e-13).
    expect(Math.abs(r.y[0] - 1e-6)).toBeLessThan(1e-11);
    expect(r.steps + r.rejected).toBeLessThan(stepBudget);
  });
});

describe('simulate(sqrtDrain with load): trial steps that go negative are retried', () => {
  const L = 1e-3;
  const k = 1;
  const X0 = 1;
  const m = sqrtDrain({ load: L, k, X0 });
  const run = simulate(
    m,
    scenario(m, { end: 400, solver: { method: 'odex', rtol: 1e-10, atol: 1e-12, maxStep: 100, maxSteps: MAX_STEPS } })
  );
  const tOf = (X: number) => {
    const u = Math.sqrt(X);
    return -(2 / k) * (u - Math.sqrt(X0)) - ((2 * L) / k ** 2) * Math.log((L - k * u) / (L - k * Math.sqrt(X0)));
  };

  it('finishes with status ok in far fewer steps than maxSteps', () => {
    expect(run.status, why(run)).toBe('ok');
    expect(run.solver.steps).toBeGreaterThan(0);
    expect(run.solver.steps).toBeLessThan(MAX_STEPS / 100);
  });

  it('follows the exact solution on the approach (t(X(t)) = t to 1e-8 d at days 1 and 2)', () => {
    for (const d of [1, 2]) expect(Math.abs(tOf(at(run, 'X', d)) - d)).toBeLessThan(1e-8);
  });

  it('settles at X* = (L/k)² = 1e-6 mg/m^3, never below zero, with closure ok', () => {
    expect(relErr(run.series.X[run.series.X.length - 1], 1e-6)).toBeLessThan(1e-6);
    expect(Math.min(...run.series.X)).toBeGreaterThan(0);
    expect(run.closure.ok).toBe(true);
  });
});

describe.each(['odex', 'auto', 'stiff', 'dp54'] as const)('simulate(sqrtDrain without load, method %s): the rate must turn NaN', (method) => {
  const k = 0.5;
  const X0 = 1;
  const tStar = (2 * Math.sqrt(X0)) / k; // 4 d
  const m = sqrtDrain({ load: 0, k, X0 });
  const run = simulate(m, scenario(m, { end: 100, solver: { method, rtol: 1e-6, atol: 1e-9, maxStep: 100, maxSteps: MAX_STEPS } }));

  it('does not crawl to the step limit: run.solver.steps well below maxSteps', () => {
    expect(run.solver.steps).toBeGreaterThan(0);
    expect(run.solver.steps + run.solver.rejected).toBeLessThan(MAX_STEPS / 5);
  });

  it('either stops with an error naming the flow near t* = 4 d, or finishes with X ≈ 0 after t*', () => {
    if (run.status === 'failed') {
      expect(run.error).not.toBeNull();
      expect(run.error!.flow).toBe('drain');
      expect(typeof run.error!.code).toBe('string');
      expect(run.error!.time!).toBeGreaterThan(3.5);
      expect(run.error!.time!).toBeLessThan(4.5);
    } else {
      expect(run.status, why(run)).toBe('ok');
      for (let i = 0; i < run.times.length; i++) {
        const t = run.times[i];
        const exact = t < tStar ? (Math.sqrt(X0) - (k * t) / 2) ** 2 : 0;
        expect(Math.abs(run.series.X[i] - exact)).toBeLessThan(1e-5);
      }
    }
  });
});

describe.each(['auto', 'odex', 'stiff', 'dp54'] as const)('simulate(rate NaN at the start, method %s) fails naming the flow (regression)', (method) => {
  // X' = -k Xref log(X/Xref - 2) with X(0) = 1: the logarithm of a negative number, already at day 0.
  const m = sqrtDrain({ load: 0, k: 0.1, X0: 1 });
  m.flows[0].rate = 'k * Xref * log(X / Xref - 2)';
  const run = simulate(m, scenario(m, { end: 31, solver: { method } }));

  it('is failed with non_finite_rate on day 0, naming `drain`, and did not move X', () => {
    expect(run.status).toBe('failed');
    expect(run.error?.code).toBe('non_finite_rate');
    expect(run.error?.flow).toBe('drain');
    expect(run.error?.time).toBe(0);
    expect(run.series.X).toEqual([1]);
  });
});
