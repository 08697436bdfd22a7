/**
 * The project's Dormand–Prince 5(4) (solve/dopri5.ts), held against its published tableau and
 * against odex, the reference method.
 *
 * Sources:
 * - Order conditions of Runge–Kutta methods up to order 5 (the 17 rooted trees): Butcher
 *   (2008), Numerical Methods for Ordinary Differential Equations, 2nd ed., Sect. 31
 *   (Table 312(I)); Hairer, Nørsett & Wanner (1993), Solving ODEs I, Sect. II.2, Table 2.2.
 *   The 5th-order weights b satisfy all of them; the embedded 4th-order weights b̂ = b − e
 *   those up to order 4 and not all of order 5 (otherwise there would be no error estimate).
 * - Dense output: Hairer et al. (1993), Sect. II.6, eq. (6.12) (Shampine 1986). At θ = 1 it
 *   is the step's end value, at θ = 0 its start; it is a 4th-order interpolant.
 * - Exact solutions y' = λy (common practice) and the Robertson problem as in
 *   test/engine/reference/robertson.test.ts (check-values section 9 [D]).
 * - Demo lake: odex (the `odex` package, Hairer & Wanner's ODEX) at rtol 1e-10 is the
 *   reference; both methods at the engine's default tolerance must agree with it.
 */
import { describe, expect, it } from 'vitest';
import { dopri5Segment, DOPRI5_TABLEAU } from '../../../src/lib/engine/solve/dopri5';
import { odexSegment } from '../../../src/lib/engine/solve/odex-segment';
import { simulate } from '../../../src/lib/engine';
import type { ModelDoc, RunDoc, ScenarioDoc } from '../../../src/lib/engine';
import type { OdeSystem } from '../../../src/lib/engine/solve/types';
import { at, loadExample, relErr, robertson, scenario, why } from '../reference/fixtures';
import { readFileSync } from 'node:fs';

const { a, b, c, e } = DOPRI5_TABLEAU;
const s = 7;
const A = (i: number, j: number) => (a[i] as readonly number[])[j] ?? 0;
const dot = (w: readonly number[], v: number[]) => w.reduce((acc, wi, i) => acc + wi * v[i], 0);
const cPow = (k: number) => c.map((ci) => ci ** k);
/** (A v)_i */
const Av = (v: number[]) => Array.from({ length: s }, (_, i) => Array.from({ length: s }, (_, j) => A(i, j) * v[j]).reduce((x, y) => x + y, 0));
const times = (u: number[], v: number[]) => u.map((x, i) => x * v[i]);

/** The order conditions Φ(t) = 1/γ(t) for the trees up to order 5 (Butcher 2008, Table 312(I)). */
function conditions(w: readonly number[]): { order: number; got: number; want: number }[] {
  const one = Array(s).fill(1);
  const cc = c as unknown as number[];
  const Ac = Av(cc);
  const Ac2 = Av(cPow(2));
  const AAc = Av(Ac);
  return [
    { order: 1, got: dot(w, one), want: 1 },
    { order: 2, got: dot(w, cc), want: 1 / 2 },
    { order: 3, got: dot(w, cPow(2)), want: 1 / 3 },
    { order: 3, got: dot(w, Ac), want: 1 / 6 },
    { order: 4, got: dot(w, cPow(3)), want: 1 / 4 },
    { order: 4, got: dot(w, times(cc, Ac)), want: 1 / 8 },
    { order: 4, got: dot(w, Ac2), want: 1 / 12 },
    { order: 4, got: dot(w, AAc), want: 1 / 24 },
    { order: 5, got: dot(w, cPow(4)), want: 1 / 5 },
    { order: 5, got: dot(w, times(cPow(2), Ac)), want: 1 / 10 },
    { order: 5, got: dot(w, times(cc, Ac2)), want: 1 / 15 },
    { order: 5, got: dot(w, times(cc, AAc)), want: 1 / 30 },
    { order: 5, got: dot(w, times(Ac, Ac)), want: 1 / 20 },
    { order: 5, got: dot(w, Av(cPow(3))), want: 1 / 20 },
    { order: 5, got: dot(w, Av(times(cc, Ac))), want: 1 / 40 },
    { order: 5, got: dot(w, Av(Ac2)), want: 1 / 60 },
    { order: 5, got: dot(w, Av(AAc)), want: 1 / 120 }
  ];
}

describe('Dormand–Prince 5(4) tableau (Dormand & Prince 1980, Table 2)', () => {
  it('row sums: c_i = Σ_j a_ij for every stage', () => {
    for (let i = 0; i < s; i++) {
      const sum = Array.from({ length: s }, (_, j) => A(i, j)).reduce((x, y) => x + y, 0);
      expect(Math.abs(sum - c[i]), `stage ${i + 1}`).toBeLessThan(1e-15);
    }
  });

  it('the 5th-order weights b satisfy all 17 order conditions up to order 5 (Butcher 2008)', () => {
    for (const k of conditions(b)) expect(Math.abs(k.got - k.want), `order ${k.order}: ${k.got} vs ${k.want}`).toBeLessThan(1e-14);
  });

  it('the embedded weights b̂ = b − e satisfy the 8 conditions up to order 4 but not all of order 5', () => {
    const bHat = b.map((bi, i) => bi - e[i]);
    const all = conditions(bHat);
    for (const k of all.filter((k) => k.order <= 4)) expect(Math.abs(k.got - k.want), `order ${k.order}`).toBeLessThan(1e-14);
    const worst = Math.max(...all.filter((k) => k.order === 5).map((k) => Math.abs(k.got - k.want)));
    expect(worst).toBeGreaterThan(1e-4);
  });

  it('is FSAL: the last row of a equals b, and c_7 = 1', () => {
    for (let j = 0; j < s; j++) expect(A(6, j)).toBe(b[j]);
    expect(c[6]).toBe(1);
  });
});

describe('dopri5Segment on y\' = λy (exact solution e^{λt}, common practice)', () => {
  const decay = (lambda: number): OdeSystem => ({ n: 1, rhs: (_t, y, out) => void (out[0] = lambda * y[0]) });

  it('meets the tolerance at the steps and in the dense output between them', () => {
    const got = new Map<number, number>();
    const grid = Array.from({ length: 50 }, (_, i) => (i + 1) * 0.1);
    const r = dopri5Segment(decay(-1.3), 0, Float64Array.of(1), 5, grid, (t, y) => void got.set(t, y[0]), { rtol: 1e-9, atol: 1e-12, maxStep: 1, maxSteps: 1e5 });
    expect(r.status).toBe('ok');
    expect(got.size).toBe(50);
    // global error of an RK method at rtol 1e-9 over 5 time constants: a few 1e-9 (seen 3e-10)
    for (const [t, v] of got) expect(relErr(v, Math.exp(-1.3 * t)), `t = ${t}`).toBeLessThan(1e-8);
  });

  it('a tolerance 1,000 times tighter gives at least 100 times less error at the end', () => {
    const endErr = (rtol: number) => {
      const r = dopri5Segment(decay(-2), 0, Float64Array.of(1), 3, [], () => {}, { rtol, atol: rtol * 1e-3, maxStep: 3, maxSteps: 1e6 });
      return { err: relErr(r.y[0], Math.exp(-6)), steps: r.steps };
    };
    const loose = endErr(1e-5);
    const tight = endErr(1e-8);
    expect(tight.err).toBeLessThan(loose.err / 100);
    expect(tight.steps).toBeGreaterThan(loose.steps);
  });

  it('quadrature components (quadratureFrom) change nothing: same values bit for bit', () => {
    // y0' = −y0, y1' = y0 (a quadrature of the state): y1(t) = 1 − e^{−t}
    const sys: OdeSystem = { n: 2, rhs: (_t, y, out) => { out[0] = -y[0]; out[1] = y[0]; } };
    const opts = { rtol: 1e-8, atol: Float64Array.of(1e-10, 1e300), maxStep: 1, maxSteps: 1e5 };
    const p = dopri5Segment(sys, 0, Float64Array.of(1, 0), 4, [1, 2.5], () => {}, opts);
    const q = dopri5Segment(sys, 0, Float64Array.of(1, 0), 4, [1, 2.5], () => {}, { ...opts, quadratureFrom: 1 });
    expect(Array.from(q.y)).toEqual(Array.from(p.y));
    expect(q.steps).toBe(p.steps);
    expect(relErr(q.y[1], 1 - Math.exp(-4))).toBeLessThan(1e-7);
  });

  it('the collapse detector stops a stability-limited run (the signature auto switches on)', () => {
    // y' = −1e4 (y − cos t): the steps are held near 3.3e-4 by stability long after the transient
    const stiff: OdeSystem = { n: 1, rhs: (t, y, out) => void (out[0] = -1e4 * (y[0] - Math.cos(t))) };
    const r = dopri5Segment(stiff, 0, Float64Array.of(0), 10, [], () => {}, { rtol: 1e-6, atol: 1e-9, maxStep: 1, maxSteps: 1e6, collapse: { minStep: 0.01, window: 50 } });
    expect(r.status).toBe('collapsed');
    expect(r.t).toBeLessThan(1);
  });
});

describe('method dp54 against odex (the reference) on whole runs', () => {
  const maxRel = (x: RunDoc, y: RunDoc, id: string) => {
    const p = x.series[id];
    const q = y.series[id];
    const scale = Math.max(...p.map(Math.abs));
    let m = 0;
    for (let i = 0; i < p.length; i++) m = Math.max(m, Math.abs(p[i] - q[i]) / scale);
    return m;
  };

  it('Robertson (check-values section 9 [D]) through auto starting with dp54: switches, hits the reference, records the start', () => {
    const m = robertson();
    const run = simulate(m, scenario(m, { end: 40, solver: { method: 'auto', rtol: 1e-8, atol: 1e-14, maxStep: 1000, maxSteps: 100_000 } }), { autoStart: 'dp54' });
    expect(run.status, why(run)).toBe('ok');
    expect(run.solver.method).toBe('stiff');
    expect(run.solver.switchedAt).not.toBeNull();
    expect(run.solver.startedWith).toBe('dp54');
    expect(run.warnings.find((w) => w.code === 'switched_to_stiff')?.message).toContain('Dormand–Prince');
    expect(relErr(at(run, 'y1', 40), 7.158270687194e-1)).toBeLessThan(1e-6);
    expect(relErr(at(run, 'y3', 40), 2.841637457458e-1)).toBeLessThan(1e-6);
  });

  describe('the demo lake, 20 years of every shipped scenario', () => {
    const model: ModelDoc = loadExample('demo-lake.model.json');
    const read = (f: string): ScenarioDoc => JSON.parse(readFileSync(new URL(`../../../static/examples/${f}`, import.meta.url), 'utf8'));
    const files = ['demo-lake.baseline.scenario.json', 'demo-lake.load-and-fish.scenario.json'];
    for (const f of files) {
      const sc = read(f);
      const withMethod = (method: 'odex' | 'dp54', rtol?: number) =>
        simulate(model, { ...sc, solver: { ...(sc.solver ?? {}), method, ...(rtol ? { rtol, atol: 1e-12 } : {}) } });
      const ref = withMethod('odex', 1e-10);
      const od = withMethod('odex');
      const dp = withMethod('dp54');

      it(`${sc.id}: both finish, close to 1e-12, and dp54 is recorded as the method`, () => {
        for (const r of [ref, od, dp]) {
          expect(r.status, why(r)).toBe('ok');
          expect(r.closure.relativeResidual).toBeLessThan(1e-12);
        }
        expect(dp.solver.method).toBe('dp54');
        expect(dp.solver.switchedAt).toBeNull();
      });

      it(`${sc.id}: dp54 at the scenario's tolerance is as close to the tight reference as odex is (within 3×, and < 1e-3 of each series' range)`, () => {
        for (const id of Object.keys(ref.series)) {
          const eDp = maxRel(dp, ref, id);
          const eOd = maxRel(od, ref, id);
          expect(eDp, id).toBeLessThan(1e-3);
          expect(eDp, `${id}: dp54 ${eDp} vs odex ${eOd}`).toBeLessThan(Math.max(3 * eOd, 1e-6));
        }
      });
    }
  });
});

describe('dopri5Segment at the end of a segment', () => {
  it('a step that would leave a rounding sliver before t1 takes it along (no step-size underflow)', () => {
    // t1 = 3650 + 5 + 8e-12: with maxStep 5 the solver reaches 3650 + 5 and 8e-12 would be left,
    // below 16 ulp of t (1.3e-11); the step before must take it along
    const sys: OdeSystem = { n: 1, rhs: (_t, y, out) => void (out[0] = -0.001 * y[0]) };
    const t0 = 3650;
    const t1 = 3655 + 8e-12;
    const r = dopri5Segment(sys, t0, Float64Array.of(1), t1, [], () => {}, { rtol: 1e-6, atol: 1e-9, maxStep: 5, maxSteps: 100, initialStep: 5 });
    expect(r.status).toBe('ok');
    expect(r.t).toBe(t1);
    expect(relErr(r.y[0], Math.exp(-0.001 * (t1 - t0)))).toBeLessThan(1e-8);
  });
});
