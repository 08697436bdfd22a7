import { describe, expect, it } from 'vitest';
import demo from '../../../../static/examples/demo-lake.model.json';
import both from '../../../../static/examples/demo-lake.load-and-fish.scenario.json';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { validateScenario } from '$lib/engine/document/validate-scenario';
import {
  addMeasure,
  costOf,
  emptyScenario,
  freeScenarioId,
  measureIdAt,
  removeMeasure,
  restoreMeasure,
  setCostField,
  setMeasureField,
  setPath,
  setRepeat,
  setRepeatUnit,
  type Draft
} from './scenario-edits';

const model = demo as unknown as ModelDoc;
const copy = () => structuredClone(both) as unknown as Draft;

describe('scenario edits', () => {
  it('setPath sets and removes nested fields', () => {
    const d: Draft = {};
    setPath(d, 'solver.rtol', 1e-7);
    expect(d).toEqual({ solver: { rtol: 1e-7 } });
    setPath(d, 'solver.rtol', undefined);
    expect(d).toEqual({ solver: {} });
  });

  it('renaming a measure carries its cost along', () => {
    const d = copy();
    setMeasureField(d, 1, 'id', 'winterNets');
    expect(measureIdAt(d, 1)).toBe('winterNets');
    expect(costOf(d, 'winterNets')?.amount).toBe(210000);
    expect(costOf(d, 'fishOut')).toBeUndefined();
    expect(validateScenario(d, model).filter((p) => p.severity === 'error')).toEqual([]);
  });

  it('removing a measure takes its cost; restoring brings both back in place', () => {
    const d = copy();
    const before = structuredClone(d);
    const r = removeMeasure(d, 0)!;
    expect((d.measures as unknown[]).length).toBe(1);
    expect(costOf(d, 'loadCut')).toBeUndefined();
    expect(r.costs.map((c) => c.index)).toEqual([0]);
    restoreMeasure(d, r);
    expect(d).toEqual(before);
    expect(removeMeasure(d, 5)).toBeNull();
  });

  it('setCostField makes a row on first entry and drops it when emptied', () => {
    const d: Draft = { measures: [{ id: 'a', kind: 'remove', state: 'BFI', fraction: 0.5, on: '2028-01-01' }] };
    setCostField(d, 'a', 'note', '', 'SEK');
    expect(d.costs).toEqual([]);
    setCostField(d, 'a', 'amount', 5000, 'SEK');
    expect(d.costs).toEqual([{ measure: 'a', amount: 5000, currency: 'SEK' }]);
    setCostField(d, 'a', 'note', 'two boats');
    setCostField(d, 'a', 'amount', undefined);
    expect(d.costs).toEqual([{ measure: 'a', currency: 'SEK', note: 'two boats' }]);
    setCostField(d, 'a', 'note', '');
    expect(d.costs).toEqual([]);
  });

  it('repeat on, its unit switched, off', () => {
    const d: Draft = { measures: [{ kind: 'remove', state: 'BFI', fraction: 0.5, on: '2028-01-01' }] };
    setRepeat(d, 0, true);
    expect((d.measures as Draft[])[0].repeat).toEqual({ everyYears: 1, count: 2 });
    setRepeatUnit(d, 0, 'days');
    expect((d.measures as Draft[])[0].repeat).toEqual({ everyDays: 1, count: 2 });
    setMeasureField(d, 0, 'repeat.everyDays', 30);
    setRepeatUnit(d, 0, 'years');
    expect((d.measures as Draft[])[0].repeat).toEqual({ everyYears: 30, count: 2 });
    setRepeat(d, 0, false);
    expect((d.measures as Draft[])[0].repeat).toBeUndefined();
  });

  it('addMeasure appends a copy and returns its index', () => {
    const d = copy();
    const m = { id: 'x', kind: 'add' as const, state: 'PFI', amount: 1, on: '2028-04-15' };
    expect(addMeasure(d, m)).toBe(2);
    m.amount = 99;
    expect((d.measures as Draft[])[2].amount).toBe(1);
  });

  it('emptyScenario is valid, has no measures and an id not taken', () => {
    const s = emptyScenario(model, new Set(['scenario', 'scenario_2']), both as unknown as ScenarioDoc);
    expect(s.id).toBe('scenario_3');
    expect(s.period).toEqual({ start: '2027-01-01', end: '2047-01-01', outputStep: 1 });
    expect(validateScenario(s, model)).toEqual([]);
    expect(freeScenarioId('baseline', new Set())).toBe('baseline');
  });
});
