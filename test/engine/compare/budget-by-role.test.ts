/**
 * budgetByRole: a hand-written year book grouped by hand, and the demo lake run through
 * simulate() whose grouped budget must add up to its closure (mass balance: imported −
 * exported = storage change; common practice, e.g. Chapra 1997 — check-values section 7).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { simulate } from '../../../src/lib/engine/simulate';
import type { ModelDoc, ScenarioDoc } from '../../../src/lib/engine/document/types';
import { budgetByRole, compensatedSum } from '../../../src/lib/engine/compare/budget-by-role';
import { fakeRun } from './fixture';

const read = <T>(n: string): T => JSON.parse(readFileSync(`static/examples/${n}`, 'utf8')) as T;

const model: ModelDoc = {
  format: 'lakeledger.model/1',
  id: 'two_box',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [{ id: 'V', value: 1, unit: 'm^3' }],
  states: [
    { id: 'W', unit: 'mg/m^3', initial: 1, size: 'V', zone: 'water' },
    { id: 'A', unit: 'mg/m^3', initial: 1, size: 'V', zone: 'water' },
    { id: 'S', unit: 'mg/m^3', initial: 1, size: 'V', zone: 'sediment' },
    { id: 'I', unit: 'mg/m^3', initial: 1, size: 'V', zone: 'sediment' },
    { id: 'Ox', unit: 'mg/m^3', initial: 1, size: 'V', conserved: false },
    { id: 'Oy', unit: 'mg/m^3', initial: 1, size: 'V', conserved: false }
  ],
  flows: [
    { id: 'load', to: 'W', rate: '1', role: 'externalLoad' },
    { id: 'rain', to: 'W', rate: '1', role: 'deposition' },
    { id: 'out', from: 'W', rate: '1', role: 'outflow' },
    { id: 'settle', from: 'W', to: 'S', rate: '1', role: 'sedimentation' },
    { id: 'settleA', from: 'A', to: 'S', rate: '1', role: 'sedimentation' },
    { id: 'resusp', from: 'S', to: 'W', rate: '1', role: 'resuspension' },
    { id: 'rel', from: 'S', to: 'W', rate: '1', role: 'release' },
    { id: 'bur', from: 'S', to: 'I', rate: '1', role: 'burial' },
    { id: 'upt', from: 'W', to: 'A', rate: '1', role: 'uptake' },
    { id: 'ox', from: 'Ox', to: 'Oy', rate: '1' }
  ]
};

// One year, in kg: imported = load 100 + rain 4 + added 2 = 106; exported = out 60 + removed 3 = 63;
// storage change 43 = 106 − 63, residual 0.
const run = fakeRun('2027-01-01', [0], {}, {}, {
  budget: [
    {
      year: 2027,
      from: '2027-01-01',
      to: '2028-01-01',
      flows: { load: 100, rain: 4, out: 60, settle: 50, settleA: 5, resusp: 10, rel: 7, bur: 8, upt: 30, ox: 99 },
      measures: { stock: 2, fishOut: 3, cap: 20 },
      imported: 106,
      exported: 63,
      storageChange: 43,
      residual: 0
    }
  ]
});
const scenario = {
  measures: [
    { id: 'stock', kind: 'add' as const, state: 'A', amount: 1, on: '2027-03-01' },
    { id: 'fishOut', kind: 'remove' as const, state: 'A', fraction: 0.5, on: '2027-03-01' },
    { id: 'cap', kind: 'transfer' as const, state: 'S', into: 'I', fraction: 0.5, on: '2027-05-01' }
  ]
};

describe('budgetByRole(run, model, scenario) on a hand-written year', () => {
  const b = budgetByRole(run, model, scenario);
  const line = (k: string) => b.lines.find((l) => l.key === k)!;

  it('puts the lines in order: imports, exports, sediment exchange, other internal', () => {
    expect(b.lines.map((l) => l.key)).toEqual([
      'import:externalLoad',
      'import:deposition',
      'measures:added',
      'export:outflow',
      'measures:removed',
      'sediment:sedimentation',
      'sediment:resuspension',
      'sediment:netSedimentation',
      'sediment:release',
      'sediment:burial',
      'measures:moved',
      'internal:uptake'
    ]);
  });

  it('gathers each role: sedimentation 50 + 5 = 55, net sedimentation 55 − 10 = 45, release 7, burial 8', () => {
    expect(line('sediment:sedimentation').perYear).toEqual([55]);
    expect(line('sediment:netSedimentation').perYear).toEqual([45]);
    expect(line('sediment:netSedimentation').derived).toBe(true);
    expect(line('sediment:release').total).toBe(7);
    expect(line('sediment:burial').crossing).toBe('internal');
    expect(line('measures:moved').total).toBe(20);
  });

  it('adds up: import lines 100 + 4 + 2 = imported 106, export lines 60 + 3 = exported 63', () => {
    const sum = (c: string) => b.lines.filter((l) => l.crossing === c && !l.derived).reduce((a, l) => a + l.total, 0);
    expect(sum('import')).toBe(b.totals.imported);
    expect(sum('export')).toBe(b.totals.exported);
  });

  it('keeps flows between non-conserved states out of the budget', () => {
    expect(b.notBooked).toEqual(['ox']);
    expect(b.lines.some((l) => l.flows.includes('ox'))).toBe(false);
  });

  it('books burial with no `to` as an export line of its own', () => {
    const m2 = { ...model, flows: [...model.flows.filter((f) => f.id !== 'bur'), { id: 'bur', from: 'S', rate: '1', role: 'burial' }] };
    const l = budgetByRole(run, m2, scenario).lines.find((x) => x.key === 'export:burial')!;
    expect(l.crossing).toBe('export');
    expect(l.total).toBe(8);
  });
});

describe('compensatedSum(values)', () => {
  it('keeps the small terms that a plain sum loses: 1e16 + 1 − 1e16 = 1 (Neumaier 1974)', () => {
    expect([1e16, 1, -1e16].reduce((a, b) => a + b, 0)).toBe(0);
    expect(compensatedSum([1e16, 1, -1e16])).toBe(1);
  });
});

describe('budgetByRole on the demo lake (simulate, fish removal and half load, 2027–2031)', () => {
  const demo = read<ModelDoc>('demo-lake.model.json');
  const sc = read<ScenarioDoc>('demo-lake.load-and-fish.scenario.json');
  const short: ScenarioDoc = { ...sc, period: { ...sc.period, end: '2031-01-01' } };
  const r = simulate(demo, short);
  const b = budgetByRole(r, demo, short);
  const rel = (a: number, x: number) => Math.abs(a - x) / Math.max(1, Math.abs(x));
  const scale = Math.max(r.closure.initialMass, r.closure.imported, r.closure.exported);

  it('runs and closes', () => {
    expect(r.status).toBe('ok');
    expect(r.closure.ok).toBe(true);
    expect(b.years.map((y) => y.year)).toEqual([2027, 2028, 2029, 2030]); // the end day 2031-01-01 opens no year of its own
  });

  it('each year: the import lines add up to imported, the export lines to exported, and imported − exported = storage change − residual', () => {
    b.years.forEach((_, i) => {
      const sum = (c: string) => compensatedSum(b.lines.filter((l) => l.crossing === c && !l.derived).map((l) => l.perYear[i]));
      expect(rel(sum('import'), b.imported[i])).toBeLessThan(1e-9);
      expect(rel(sum('export'), b.exported[i])).toBeLessThan(1e-9);
      expect(Math.abs(b.imported[i] - b.exported[i] - (b.storageChange[i] - b.residual[i]))).toBeLessThan(1e-9 * scale);
      expect(Math.abs(b.residual[i])).toBeLessThan(1e-9 * scale);
    });
  });

  it('over the run: the totals equal the closure (imported, exported, final − initial mass)', () => {
    expect(rel(b.totals.imported, r.closure.imported)).toBeLessThan(1e-9);
    expect(rel(b.totals.exported, r.closure.exported)).toBeLessThan(1e-9);
    expect(Math.abs(b.totals.storageChange - (r.closure.finalMass - r.closure.initialMass))).toBeLessThan(1e-9 * scale);
  });

  it('finds the groups a modeller expects: external load, outflow, removals, net sedimentation, release, burial, uptake', () => {
    const keys = b.lines.map((l) => l.key);
    for (const k of ['import:externalLoad', 'export:outflow', 'measures:removed', 'sediment:netSedimentation', 'sediment:release', 'sediment:burial', 'internal:uptake']) {
      expect(keys).toContain(k);
    }
    expect(b.lines.find((l) => l.key === 'import:externalLoad')!.flows).toEqual(['loadDIP', 'loadDET']);
    expect(b.lines.find((l) => l.key === 'measures:removed')!.perYear[0]).toBe(0); // no removal in 2027
    expect(b.lines.find((l) => l.key === 'measures:removed')!.perYear[1]).toBeGreaterThan(0);
  });
});
