import { describe, expect, it } from 'vitest';
import demo from '../../../static/examples/demo-lake.model.json';
import fish from '../../../static/examples/demo-lake.fish-removal.scenario.json';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { validateScenario } from '$lib/engine/document/validate-scenario';
import { CATALOGUE, catalogueItem } from './catalogue';
import { defaultDate, freshMeasureId, newMeasure, usedMeasureIds } from './new-measure';
import { intoTargetsFor, targetsFor } from './targets';

const model = demo as unknown as ModelDoc;
const scenario = (measures: ScenarioDoc['measures'] = []): ScenarioDoc => ({
  format: 'lakeledger.scenario/1',
  id: 's',
  model: 'demo_lake',
  period: { start: '2027-01-01', end: '2047-01-01' },
  measures
});
const item = (id: string) => catalogueItem(CATALOGUE, id)!;

describe('newMeasure(item, target, scenario, model)', () => {
  it.each([
    ['loadCut', 'Pin', { id: 'loadCut', kind: 'scale', target: 'Pin', factor: 0.5, from: '2029-01-01', rampDays: 730 }],
    ['fishRemoval', 'BFI', { id: 'fishRemoval', kind: 'remove', state: 'BFI', fraction: 0.75, on: '2028-02-01', repeat: { everyYears: 1, count: 3 } }],
    ['piscivoreStocking', 'PFI', { id: 'piscivoreStocking', kind: 'add', state: 'PFI', amount: 4.95, on: '2028-04-15' }],
    ['releaseCut', 'kRel', { id: 'releaseCut', kind: 'scale', target: 'kRel', factor: 0.3, from: '2030-05-01' }],
    ['warming', 'T', { id: 'warming', kind: 'offset', target: 'T', amount: 1.5, from: '2027-01-01', rampDays: 7300 }],
    ['setOther', 'Pin', { id: 'setOther', kind: 'set', target: 'Pin', value: 125, from: '2028-01-01' }]
  ])('newMeasure(%s, %s) has the defaults', (id, target, expected) => {
    expect(newMeasure(item(id), { target }, scenario(), model)).toEqual(expected);
  });

  it('newMeasure(sedimentCapping) moves into the chosen state', () => {
    expect(newMeasure(item('sedimentCapping'), { target: 'SED', into: 'SEDinert' }, scenario(), model)).toMatchObject({ kind: 'transfer', state: 'SED', into: 'SEDinert', fraction: 0.6, on: '2030-05-01' });
  });

  it('every item with every allowed target gives a measure the engine accepts', () => {
    for (const it of CATALOGUE.items) {
      for (const t of targetsFor(it, model)) {
        const into = it.kind === 'transfer' ? intoTargetsFor(it, model, t.id)[0]?.id : undefined;
        if (it.kind === 'transfer' && !into) continue;
        const s = scenario();
        s.measures = [newMeasure(it, { target: t.id, into }, s, model)];
        const errors = validateScenario(s, model).filter((p) => p.severity === 'error');
        expect(errors, `${it.id} on ${t.id}`).toEqual([]);
      }
    }
  });

  it('the id is unique in the scenario, implicit ids included', () => {
    const s = scenario([{ id: 'fishRemoval', kind: 'remove', state: 'BFI', fraction: 0.5, on: '2028-01-01' }, { kind: 'add', state: 'PFI', amount: 1, on: '2028-01-01' }]);
    expect([...usedMeasureIds(s)]).toEqual(['fishRemoval', 'm2']);
    expect(newMeasure(item('fishRemoval'), { target: 'BFI' }, s, model).id).toBe('fishRemoval2');
    expect(freshMeasureId('m', new Set(['m', 'm2']))).toBe('m3');
    expect(freshMeasureId('new', new Set())).toBe('new2');
    expect(newMeasure(item('fishRemoval'), { target: 'BFI' }, fish as unknown as ScenarioDoc, model).id).toBe('fishRemoval');
  });

  it.each([
    [{ start: '2027-01-01', end: '2047-01-01' }, '2028-02-01'],
    [{ start: '2030-06-01', end: '2040-01-01' }, '2031-02-01'],
    [{ start: '2027-01-01', end: '2027-12-31' }, '2027-01-01'],
    [{ start: '2027-03-01', end: '2027-12-31' }, '2027-03-01']
  ])('defaultDate(fish removal, %j) = %s, inside the period', (period, iso) => {
    expect(defaultDate(item('fishRemoval'), { period })).toBe(iso);
  });
});
