/**
 * compileModel(doc): units are converted once, at compile time; the compiled right-hand
 * side keeps the whole-system mass identity; bind(overrides) changes parameter values
 * without generating code again; the analytic Jacobian agrees with finite differences.
 *
 * Hand conversions: 1 yr = 365.25 d (the engine's `yr`); mg/m^3 × m^3 = 1e-6 kg.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compileModel, ModelInvalidError } from '../../../src/lib/engine';
import type { ModelDoc } from '../../../src/lib/engine';
import { mulberry32 } from '../../../src/lib/engine/balance/identity';

const EXAMPLES = new URL('../../../static/examples/', import.meta.url);
const example = (file: string): ModelDoc => JSON.parse(readFileSync(new URL(file, EXAMPLES), 'utf8'));
const exampleFiles = readdirSync(EXAMPLES).filter((f) => f.endsWith('.model.json'));

const rel = (x: number, y: number) => (x === y ? 0 : Math.abs(x - y) / Math.max(Math.abs(x), Math.abs(y)));

/** An invented lake: one state, a load, and first-order loss with k in the given unit. */
function decayModel(k: number, kUnit: string): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'decay',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 5e6, unit: 'm^3' },
      { id: 'k', value: k, unit: kUnit },
      { id: 'load', value: 2, unit: 'mg/m^3/d' }
    ],
    states: [{ id: 'DIP', unit: 'mg/m^3', initial: 40, size: 'V' }],
    flows: [
      { id: 'inflow', to: 'DIP', rate: 'load' },
      { id: 'loss', from: 'DIP', rate: 'k * DIP' }
    ]
  };
}

function rhsAt(model: ModelDoc, y0: number[], t = 0, overrides?: Record<string, number>): Float64Array {
  const c = compileModel(model);
  const y = new Float64Array(c.dim);
  y0.forEach((v, i) => (y[i] = v));
  const dy = new Float64Array(c.dim);
  c.bind(overrides).rhs(t, y, dy);
  return dy;
}

describe('compileModel(doc) converts units at compile time', () => {
  it('a rate constant in 1/yr gives the same right-hand side as the same rate in 1/d ÷ 365.25', () => {
    const perYear = rhsAt(decayModel(0.73, '1/yr'), [40]);
    const perDay = rhsAt(decayModel(0.73 / 365.25, '1/d'), [40]);
    expect(perYear.length).toBe(perDay.length);
    for (let i = 0; i < perYear.length; i++) expect(rel(perYear[i], perDay[i])).toBeLessThan(1e-14);
  });

  it('the right-hand side is in the state unit per day, and the accumulators in kg per day', () => {
    const dy = rhsAt(decayModel(0.73, '1/yr'), [40]);
    const loss = (0.73 / 365.25) * 40; // mg/m^3/d
    expect(rel(dy[0], 2 - loss)).toBeLessThan(1e-14);
    // layout: [DIP, inflow, loss, imports, exports]; mass = rate × V × 1e-6 kg per mg/m^3·m^3
    expect(rel(dy[1], 2 * 5e6 * 1e-6)).toBeLessThan(1e-14);
    expect(rel(dy[2], loss * 5e6 * 1e-6)).toBeLessThan(1e-14);
    expect(rel(dy[3], dy[1])).toBeLessThan(1e-14);
    expect(rel(dy[4], dy[2])).toBeLessThan(1e-14);
  });

  it('a state in ug/L behaves as the same state in mg/m^3', () => {
    const inUgL = decayModel(0.1, '1/d');
    inUgL.states[0].unit = 'ug/L';
    inUgL.parameters[2].unit = 'ug/L/d';
    const a = rhsAt(inUgL, [40]);
    const b = rhsAt(decayModel(0.1, '1/d'), [40]);
    for (let i = 0; i < a.length; i++) expect(rel(a[i], b[i])).toBeLessThan(1e-14);
  });

  it('the one-box example: dTP/dt = Q/V·Pin − (Q/V + sigma)·TP, with Q in m^3/yr and sigma in 1/yr', () => {
    const m = example('one-box.model.json');
    const p = Object.fromEntries(m.parameters.map((x) => [x.id, x.value]));
    const TP = 60;
    const perDay = 1 / 365.25;
    const want = ((p.Q * perDay) / p.V) * p.Pin - ((p.Q * perDay) / p.V + p.sigma * perDay) * TP;
    expect(rel(rhsAt(m, [TP])[0], want)).toBeLessThan(1e-13);
  });
});

describe('compileModel(doc).identity', () => {
  it.each(exampleFiles)('%s: the whole-system identity holds to 1e-12 at the sampled states', (file) => {
    const c = compileModel(example(file));
    expect(c.identity.samples).toBeGreaterThan(0);
    expect(c.identity.worst).toBeLessThan(1e-12);
  });
});

describe('compileModel(doc).bind(overrides)', () => {
  it('changes results, reading parameter values at bind time rather than writing them into the generated code', () => {
    const c = compileModel(decayModel(0.123456789, '1/d'));
    const y = Float64Array.of(40, 0, 0, 0, 0);
    const dy = new Float64Array(c.dim);
    c.bind().rhs(0, y, dy);
    expect(rel(dy[0], 2 - 0.123456789 * 40)).toBeLessThan(1e-14);
    c.bind({ k: 0.5 }).rhs(0, y, dy);
    expect(rel(dy[0], 2 - 0.5 * 40)).toBeLessThan(1e-14);
    c.bind({ load: 0 }).rhs(0, y, dy);
    expect(rel(dy[0], -0.123456789 * 40)).toBeLessThan(1e-14);
    // Parameter values are read at bind time, never written into the generated code.
    expect(c.source).not.toContain('123456789');
  });

  it('a binding does not leak into the next one', () => {
    const c = compileModel(decayModel(0.1, '1/d'));
    const y = Float64Array.of(40, 0, 0, 0, 0);
    const a = new Float64Array(c.dim);
    const b = new Float64Array(c.dim);
    const first = c.bind({ k: 0.9 });
    c.bind().rhs(0, y, b);
    first.rhs(0, y, a);
    expect(rel(a[0], 2 - 0.9 * 40)).toBeLessThan(1e-14);
    expect(rel(b[0], 2 - 0.1 * 40)).toBeLessThan(1e-14);
  });

  it('an override of a size parameter changes the mass factor m', () => {
    const c = compileModel(decayModel(0.1, '1/d'));
    expect(rel(c.bind().m[0], 5e6 * 1e-6)).toBeLessThan(1e-14);
    expect(rel(c.bind({ V: 1e6 }).m[0], 1e6 * 1e-6)).toBeLessThan(1e-14);
  });
});

describe('compileModel(doc).jacobianFactory()', () => {
  /** Central differences of rhs over the state columns (step 1e-6 of each state's value). */
  function fdJacobian(c: ReturnType<typeof compileModel>, bound: ReturnType<ReturnType<typeof compileModel>['bind']>, t: number, y: Float64Array) {
    const dim = c.dim;
    const J = new Float64Array(dim * dim);
    const up = new Float64Array(dim);
    const down = new Float64Array(dim);
    for (let j = 0; j < c.nStates; j++) {
      const h = 1e-6 * Math.max(Math.abs(y[j]), 1e-3);
      const yp = Float64Array.from(y);
      const ym = Float64Array.from(y);
      yp[j] += h;
      ym[j] -= h;
      bound.rhs(t, yp, up);
      bound.rhs(t, ym, down);
      for (let i = 0; i < dim; i++) J[i * dim + j] = (up[i] - down[i]) / (2 * h);
    }
    return J;
  }

  function compare(file: string) {
    const m = example(file);
    const c = compileModel(m);
    const factory = c.jacobianFactory();
    expect(factory).not.toBeNull();
    const bound = c.bind();
    const jac = factory!(bound);
    const dim = c.dim;
    const rnd = mulberry32(7);
    let compared = 0;
    for (const t of [0, 100, 213, 300]) {
      const y = new Float64Array(dim);
      m.states.forEach((s, i) => (y[i] = s.initial * (0.5 + rnd())));
      const J = new Float64Array(dim * dim).fill(NaN);
      jac(t, y, J);
      const F = fdJacobian(c, bound, t, y);
      for (let i = 0; i < dim; i++) {
        let rowScale = 0;
        for (let j = 0; j < c.nStates; j++) rowScale = Math.max(rowScale, Math.abs(F[i * dim + j]));
        for (let j = 0; j < dim; j++) {
          const a = J[i * dim + j];
          const b = F[i * dim + j];
          // Columns of the accumulators: the rhs does not read them.
          if (j >= c.nStates) {
            expect(a).toBe(0);
            continue;
          }
          expect(Math.abs(a - b), `J[${i}][${j}] at t=${t}: ${a} vs ${b}`).toBeLessThanOrEqual(1e-5 * Math.max(Math.abs(a), Math.abs(b)) + 1e-9 * rowScale);
          if (b !== 0) compared++;
        }
      }
    }
    return compared;
  }

  it('closed NPZD example: J equals central differences of rhs to 1e-5 relative', () => {
    expect(compare('closed-npzd.model.json')).toBeGreaterThan(40);
  });

  it.each(exampleFiles.filter((f) => f !== 'closed-npzd.model.json'))('%s: J equals central differences of rhs to 1e-5 relative', (file) => {
    expect(compare(file)).toBeGreaterThan(0);
  });

  it('is null when a rate has no derivative formula (min)', () => {
    const m = decayModel(0.1, '1/d');
    m.parameters.push({ id: 'cap', value: 3, unit: 'mg/m^3/d' });
    m.flows[1].rate = 'min(k * DIP, cap)';
    expect(compileModel(m).jacobianFactory()).toBeNull();
  });
});

describe('compileModel(invalid doc)', () => {
  it('throws ModelInvalidError with code invalid_model carrying every problem', () => {
    const m = decayModel(0.1, '1/d');
    m.flows[1].rate = 'k DIP';
    m.states[0].size = 'W';
    let caught: unknown;
    try {
      compileModel(m);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ModelInvalidError);
    const err = caught as ModelInvalidError;
    expect(err.code).toBe('invalid_model');
    expect(err.problems.map((p) => [p.code, p.path])).toEqual(
      expect.arrayContaining([
        ['implicit_multiplication', 'flows[1].rate'],
        ['unknown_symbol', 'states[0].size']
      ])
    );
  });
});
