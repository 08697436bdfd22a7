/**
 * Long-run states and load sweeps.
 *
 * The phosphorus-recycling lake model of Carpenter, S.R., Ludwig, D. & Brock, W.A. (1999),
 * Management of eutrophication for lakes subject to potentially irreversible change,
 * Ecological Applications 9: 751–771: dP/dt = l − s P + r P^q / (m^q + P^q), with
 * recycling from the sediment as an import. The model form is from that paper (from
 * memory); the parameters here are our own (s = r = 0.02 /d·(mg/m^3), m = 1 mg/m^3,
 * q = 8). Its fold points are computed independently in this test: steady states satisfy
 * l = g(P) = s P − r P^q/(m^q + P^q); the folds are g at the roots of g'(P) = 0, found by
 * bisection here. For l between them two stable states exist (Scheffer et al. 1993).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { settle, sweep, type ModelDoc } from '../../../src/lib/engine';

const S = 0.02;
const R = 0.02;
const M = 1;
const Q = 8;

function clb(l: number): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'recycling_lake',
    timeOrigin: '2027-01-01',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 1e6, unit: 'm^3' },
      { id: 'l', value: l, unit: 'mg/m^3/d' },
      { id: 's', value: S, unit: '1/d' },
      { id: 'r', value: R, unit: 'mg/m^3/d' },
      { id: 'm', value: M, unit: 'mg/m^3' },
      { id: 'q', value: Q, unit: '1' }
    ],
    states: [{ id: 'P', unit: 'mg/m^3', initial: 0.1, size: 'V' }],
    flows: [
      { id: 'load', to: 'P', rate: 'l', role: 'externalLoad' },
      { id: 'loss', from: 'P', rate: 's * P', role: 'outflow' },
      { id: 'recycling', to: 'P', rate: 'r * hill(P, m, q)', role: 'release' }
    ]
  };
}

/** The two fold values of l, by bisection on g'(P) = 0. */
function folds(): [number, number] {
  const g = (p: number) => S * p - (R * p ** Q) / (M ** Q + p ** Q);
  const dg = (p: number) => S - (R * Q * p ** (Q - 1) * M ** Q) / (M ** Q + p ** Q) ** 2;
  const roots: number[] = [];
  for (let p = 0.001; p < 5; p += 0.001) {
    if (dg(p) * dg(p + 0.001) < 0) {
      let a = p;
      let b = p + 0.001;
      for (let k = 0; k < 80; k++) {
        const c = 0.5 * (a + b);
        if (dg(a) * dg(c) <= 0) b = c;
        else a = c;
      }
      roots.push(0.5 * (a + b));
    }
  }
  const ls = roots.map(g).sort((x, y) => x - y);
  return [ls[0], ls[1]];
}

describe('settle(model): the long-run state', () => {
  it('the recycling lake settles to a steady state of l = g(P)', () => {
    const r = settle(clb(0.005), { initial: { P: 0 } });
    expect(r.outcome).toBe('settled');
    const P = r.state.P;
    const g = S * P - (R * P ** Q) / (M ** Q + P ** Q);
    expect(g).toBeCloseTo(0.005, 8);
  });

  it('a predator–prey pair with a 63-day cycle never settles to an annual cycle and is reported as not settled', () => {
    const lv: ModelDoc = {
      format: 'lakeledger.model/1',
      id: 'lv',
      timeOrigin: '2027-01-01',
      conserved: { element: 'P', unit: 'kg' },
      parameters: [
        { id: 'V', value: 1, unit: 'm^3' },
        { id: 'a', value: 0.1, unit: '1/d' },
        { id: 'b', value: 0.1, unit: 'm^3/mg/d' },
        { id: 'c', value: 0.1, unit: '1/d' }
      ],
      states: [
        { id: 'N', unit: 'mg/m^3', initial: 2, size: 'V' },
        { id: 'Z', unit: 'mg/m^3', initial: 0.5, size: 'V' }
      ],
      flows: [
        { id: 'growth', to: 'N', rate: 'a * N' },
        { id: 'eaten', from: 'N', to: 'Z', rate: 'b * N * Z' },
        { id: 'death', from: 'Z', rate: 'c * Z' }
      ]
    };
    const r = settle(lv, { maxCycles: 20 });
    expect(r.outcome).not.toBe('settled');
    expect(['oscillation', 'drift']).toContain(r.outcome);
    expect(r.message).toContain('did not settle');
  });
});

describe('sweep(model, target l): hysteresis of the recycling lake', () => {
  const [lDown, lUp] = folds();
  const doc = sweep(clb(0.01), {
    target: 'l',
    from: 0.004,
    to: 0.016,
    steps: 13,
    indicator: 'P',
    season: null,
    startLow: { P: 0 },
    startHigh: { P: 3 },
    refine: 10
  });

  it('the folds computed in the test lie at l = 0.00777 and 0.01320 mg/m^3/d (s·0.3886 and s·0.6600)', () => {
    expect(lDown).toBeCloseTo(S * 0.388644, 5);
    expect(lUp).toBeCloseTo(S * 0.660038, 5);
  });

  it('finds two branches that differ only between the folds', () => {
    doc.values.forEach((v, i) => {
      const differ = Math.abs(doc.low[i]! - doc.high[i]!) > doc.separation * Math.max(doc.low[i]!, doc.high[i]!);
      if (v < lDown * 0.995 || v > lUp * 1.005) expect(differ).toBe(false);
      if (v > lDown * 1.005 && v < lUp * 0.995) expect(differ).toBe(true);
    });
    expect(doc.bistable.length).toBe(1);
    expect(doc.bistable[0][0]).toBeGreaterThan(lDown);
    expect(doc.bistable[0][1]).toBeLessThan(lUp);
  });

  it('refines the switch points to the folds within 1 %', () => {
    expect(doc.switchPoints.length).toBe(2);
    expect(Math.abs(doc.switchPoints[0] - lDown) / lDown).toBeLessThan(0.01);
    expect(Math.abs(doc.switchPoints[1] - lUp) / lUp).toBeLessThan(0.01);
  });

  it('writes a lakeledger.sweep/1 document with every value settled', () => {
    expect(doc.format).toBe('lakeledger.sweep/1');
    expect(doc.values.length).toBe(13);
    expect(doc.values[0]).toBe(0.004);
    expect(doc.values[12]).toBeCloseTo(0.016, 15);
    expect(doc.notSettled).toEqual([]);
    expect(doc.kind).toBe('parameter');
  });
});

describe('sweep(one-box lake): one stable state, no hysteresis', () => {
  it('the two branches agree at every load and there is no bistable range', () => {
    const model = JSON.parse(readFileSync('static/examples/one-box.model.json', 'utf8')) as ModelDoc;
    const pin = model.parameters.find((p) => p.id === 'Pin')!.value;
    const doc = sweep(model, { target: 'Pin', from: pin * 0.5, to: pin * 1.5, steps: 5, indicator: 'TP', startLow: { TP: 0 }, startHigh: { TP: 500 } });
    expect(doc.bistable).toEqual([]);
    expect(doc.switchPoints).toEqual([]);
    // both settle to the one steady state, to the settling tolerance (1e-6 relative per cycle)
    doc.values.forEach((_, i) => expect(Math.abs(doc.low[i]! - doc.high[i]!) / doc.high[i]!).toBeLessThan(1e-4));
  });

  it('an unknown target or indicator is refused with a clear message', () => {
    const model = JSON.parse(readFileSync('static/examples/one-box.model.json', 'utf8')) as ModelDoc;
    expect(() => sweep(model, { target: 'nope', from: 1, to: 2, steps: 3, indicator: 'TP' })).toThrow(/no parameter or forcing 'nope'/);
    expect(() => sweep(model, { target: 'Pin', from: 1, to: 2, steps: 3, indicator: 'Chl' })).toThrow(/indicator 'Chl'/);
    expect(() => sweep(model, { target: 'Pin', from: 1, to: 2, steps: 1, indicator: 'TP' })).toThrow(/steps/);
  });
});

describe('settle(model) with a burial pool that only fills', () => {
  it('leaves the pool out of the settling test (no rate reads it) and says so', () => {
    const m = clb(0.005);
    m.parameters.push({ id: 'A', value: 1e6, unit: 'm^2' });
    m.states.push({ id: 'BUR', unit: 'g/m^2', initial: 0, size: 'A' });
    m.flows[1] = { id: 'loss', from: 'P', to: 'BUR', rate: 's * P', role: 'burial' };
    const r = settle(m, { initial: { P: 0 } });
    expect(r.outcome).toBe('settled');
    expect(r.message).toContain('BUR no rate reads');
  });
});
