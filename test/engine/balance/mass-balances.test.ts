/**
 * massBalances(doc): each state's balance built from the flows, with the factor that
 * converts a flow arriving in a state of another unit or size, and the whole-system identity.
 *
 * The two-box model is invented: lake water in mg/m^3 over V = 4e6 m^3 and mobile sediment
 * in g/m^2 over A = 1e6 m^2. By hand: m(water) = V · 1e-6 kg, m(sediment) = A · 1e-3 kg, so
 * what leaves the water at rate r arrives in the sediment at r · m(water)/m(sediment)
 * = r · (V / A) · 1e-3 (= 0.004 here), and the reverse factor is (A / V) · 1e3 (= 250).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compileModel, massBalances, ModelInvalidError } from '../../../src/lib/engine';
import type { ModelDoc } from '../../../src/lib/engine';

const V = 4e6;
const A = 1e6;

function twoBox(): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'two_box',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: V, unit: 'm^3' },
      { id: 'A', value: A, unit: 'm^2' },
      { id: 'Q', value: 1e4, unit: 'm^3/d' },
      { id: 'Pin', value: 80, unit: 'mg/m^3' },
      { id: 'vs', value: 0.05, unit: 'm/d' },
      { id: 'z', value: 4, unit: 'm' },
      { id: 'kr', value: 0.002, unit: '1/d' },
      { id: 'kb', value: 0.0005, unit: '1/d' }
    ],
    states: [
      { id: 'WAT', unit: 'mg/m^3', initial: 50, size: 'V', zone: 'water' },
      { id: 'SED', unit: 'g/m^2', initial: 2, size: 'A', zone: 'sediment' }
    ],
    flows: [
      { id: 'load', to: 'WAT', rate: 'Q / V * Pin', role: 'externalLoad' },
      { id: 'flush', from: 'WAT', rate: 'Q / V * WAT', role: 'outflow' },
      { id: 'settling', from: 'WAT', to: 'SED', rate: 'vs / z * WAT', role: 'sedimentation' },
      { id: 'release', from: 'SED', to: 'WAT', rate: 'kr * SED', role: 'release' },
      { id: 'burial', from: 'SED', rate: 'kb * SED', role: 'burial' }
    ]
  };
}

const rel = (x: number, y: number) => Math.abs(x - y) / Math.abs(y);

describe('massBalances(two-box water → sediment model)', () => {
  const mb = massBalances(twoBox());
  const water = mb.states.find((s) => s.state === 'WAT')!;
  const sed = mb.states.find((s) => s.state === 'SED')!;

  it('the sediment equation shows the conversion factor (V / A) · 0.001 on settling', () => {
    expect(sed.equation).toBe('dSED/dt = settling · (V / A) · 0.001 − release − burial');
  });

  it('the factor on settling equals V/A · 1e-3 numerically', () => {
    const settling = sed.inflows.find((t) => t.flow === 'settling')!;
    expect(settling.factorText).toBe('(V / A) · 0.001');
    expect(rel(settling.factor, (V / A) * 1e-3)).toBeLessThan(1e-12);
    expect(settling.other).toBe('WAT');
    expect(settling.sign).toBe(1);
  });

  it('the water equation converts release back with (A / V) · 1000', () => {
    expect(water.equation).toBe('dWAT/dt = load + release · (A / V) · 1000 − flush − settling');
    const release = water.inflows.find((t) => t.flow === 'release')!;
    expect(rel(release.factor, (A / V) * 1e3)).toBeLessThan(1e-12);
  });

  it('outflows carry no factor: a rate is in the unit of the state it leaves', () => {
    for (const s of [water, sed]) for (const t of s.outflows) expect([t.factor, t.factorText, t.sign]).toEqual([1, '', -1]);
  });

  it('the factors are the ones the compiled model uses: m(from) / m(to)', () => {
    const m = compileModel(twoBox()).bind().m;
    const settling = sed.inflows.find((t) => t.flow === 'settling')!;
    expect(rel(settling.factor, m[0] / m[1])).toBeLessThan(1e-12);
  });

  it('lists imports and exports across the boundary', () => {
    expect(mb.imports).toEqual(['load']);
    expect(mb.exports).toEqual(['flush', 'burial']);
    expect(water.inflows.find((t) => t.flow === 'load')!.other).toBe('outside');
    expect(sed.outflows.find((t) => t.flow === 'burial')!.other).toBe('outside');
  });

  it('the whole-system identity names the boundary flows only', () => {
    expect(mb.identity).toMatch(/^Σ m\(x\)·dx\/dt = load − flush − burial\b/);
    expect(mb.unit).toBe('kg');
    expect(mb.element).toBe('P');
  });

  it('keeps the units as the model writes them', () => {
    expect([water.unit, sed.unit]).toEqual(['mg/m^3', 'g/m^2']);
  });
});

describe('massBalances(closed model)', () => {
  const npzd: ModelDoc = JSON.parse(readFileSync(new URL('../../../static/examples/closed-npzd.model.json', import.meta.url), 'utf8'));
  const mb = massBalances(npzd);

  it('the closed NPZD example has an identity that reads = 0, and no imports or exports', () => {
    expect(mb.identity).toMatch(/^Σ m\(x\)·dx\/dt = 0\s/);
    expect(mb.imports).toEqual([]);
    expect(mb.exports).toEqual([]);
  });

  it('every flow appears once as an outflow and once as an inflow, with factor 1 between states of one size and unit', () => {
    const out = mb.states.flatMap((s) => s.outflows.map((t) => t.flow)).sort();
    const inn = mb.states.flatMap((s) => s.inflows.map((t) => t.flow)).sort();
    expect(out).toEqual(npzd.flows.map((f) => f.id).sort());
    expect(inn).toEqual(out);
    for (const s of mb.states) for (const t of s.inflows) expect([t.factor, t.factorText]).toEqual([1, '']);
  });

  it('writes one equation per state, each starting dX/dt =', () => {
    expect(mb.states.map((s) => s.equation.split(' = ')[0])).toEqual(npzd.states.map((s) => `d${s.id}/dt`));
  });
});

describe('massBalances(non-conserved states)', () => {
  it('a flow among non-conserved states is not an import or export', () => {
    const m = twoBox();
    m.parameters.push({ id: 'kf', value: 0.01, unit: '1/d' });
    m.states.push({ id: 'FRY', unit: '1', initial: 100, size: 'V', conserved: false });
    m.flows.push({ id: 'fryLoss', from: 'FRY', rate: 'kf * FRY' });
    const mb = massBalances(m);
    expect(mb.exports).toEqual(['flush', 'burial']);
    expect(mb.states.find((s) => s.state === 'FRY')!.conserved).toBe(false);
  });
});

describe('massBalances(invalid doc)', () => {
  it('throws ModelInvalidError with the problems', () => {
    const m = twoBox();
    m.flows[2].to = 'SEDX';
    expect(() => massBalances(m)).toThrow(ModelInvalidError);
  });
});

describe('massBalances(model) brackets a compound size in the denominator (regression)', () => {
  it('writes (A / (A * zMean)), never A / A * zMean', async () => {
    const { readFileSync } = await import('node:fs');
    const { massBalances: mb } = await import('../../../src/lib/engine');
    const demo = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8'));
    const dip = mb(demo).states.find((s) => s.state === 'DIP')!;
    expect(dip.equation).toContain('(A / (A * zMean))');
    expect(dip.equation).not.toContain('A / A * zMean');
  });
});
