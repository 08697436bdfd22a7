import { describe, expect, it } from 'vitest';
import demo from '../../../static/examples/demo-lake.model.json';
import both from '../../../static/examples/demo-lake.load-and-fish.scenario.json';
import bundled from './catalogue.json';
import type { MeasureDoc, ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { CATALOGUE, catalogueItem, loadCatalogue } from './catalogue';
import { genericItemOf, matchMeasure } from './match';
import { newMeasure } from './new-measure';
import { intoTargetsFor, targetsFor } from './targets';
import { measureWords } from './words';

const model = demo as unknown as ModelDoc;
const name = (r: ReturnType<typeof matchMeasure>) => (r === 'other' ? 'other' : r.id);

describe('matchMeasure(measure, model, catalogue)', () => {
  const cases: [MeasureDoc, string][] = [
    [{ kind: 'scale', target: 'Pin', factor: 0.5, from: '2029-01-01' }, 'loadCut'],
    [{ kind: 'remove', state: 'BFI', fraction: 0.8, on: '2028-02-01' }, 'fishRemoval'],
    [{ kind: 'add', state: 'PFI', amount: 4, on: '2028-04-15' }, 'piscivoreStocking'],
    [{ kind: 'transfer', state: 'SED', into: 'SEDinert', fraction: 0.6, on: '2030-05-01' }, 'sedimentCapping'],
    [{ kind: 'scale', target: 'kRel', factor: 0.3, from: '2030-05-01' }, 'releaseCut'],
    [{ kind: 'scale', target: 'Q', factor: 1.5, from: '2030-05-01' }, 'flushing'],
    [{ kind: 'offset', target: 'T', amount: 1.5, from: '2027-01-01' }, 'warming'],
    [{ kind: 'remove', state: 'SED', fraction: 0.5, on: '2030-09-01' }, 'dredging'],
    // the same targets with another kind, or other targets: no trade item
    [{ kind: 'add', state: 'BFI', amount: 4, on: '2028-04-15' }, 'other'],
    [{ kind: 'set', target: 'kRel', value: 0.0004, from: '2030-05-01' }, 'other'],
    [{ kind: 'transfer', state: 'SED', into: 'DIP', fraction: 0.6, on: '2030-05-01' }, 'other'],
    [{ kind: 'scale', target: 'muPhy', factor: 1.1, from: '2030-05-01' }, 'other'],
    [{ kind: 'remove', state: 'NOPE', fraction: 0.5, on: '2030-09-01' }, 'other']
  ];
  it.each(cases)('matchMeasure(%j) = %s', (m, id) => {
    expect(name(matchMeasure(m, model, CATALOGUE))).toBe(id);
  });

  it('the demo scenario measures match their trade items', () => {
    expect(((both as unknown as ScenarioDoc).measures ?? []).map((m) => name(matchMeasure(m, model, CATALOGUE)))).toEqual(['loadCut', 'fishRemoval']);
  });

  it('a measure made from a trade item is matched back to that item, for every demo target', () => {
    for (const item of CATALOGUE.items.filter((i) => !i.generic)) {
      for (const t of targetsFor(item, model)) {
        const into = intoTargetsFor(item, model, t.id)[0]?.id;
        const m = newMeasure(item, { target: t.id, into }, { format: 'lakeledger.scenario/1', id: 's', model: 'demo_lake', period: { start: '2027-01-01', end: '2047-01-01' } }, model);
        expect(name(matchMeasure(m, model, CATALOGUE)), `${item.id} on ${t.id}`).toBe(item.id);
      }
    }
  });

  it('genericItemOf gives the catch-all of each kind', () => {
    expect(genericItemOf('remove', CATALOGUE)?.id).toBe('removeOther');
    expect(genericItemOf('set', CATALOGUE)?.id).toBe('setOther');
  });
});

describe('a new trade measure is data only', () => {
  it('an item added to a copy of the catalogue is offered with its targets, made, matched and described', () => {
    const copy = structuredClone(bundled) as unknown as { items: unknown[] };
    copy.items.unshift({
      id: 'plantHarvest',
      name: 'Harvesting of submerged plants',
      kind: 'remove',
      targets: [{ of: 'state', zone: ['plants'], flowInFromZone: ['sediment'] }],
      defaults: { fraction: 0.3, repeat: { everyYears: 1, count: 4 }, date: { afterYears: 2, monthDay: '07-01' } },
      caution: 'Cutting plants in a lake needs permission under local rules; the model only projects.',
      costUnit: 'EUR per campaign',
      sentence: 'harvest {fraction} of {state} {when}'
    });
    const catalogue = loadCatalogue(copy);
    const item = catalogueItem(catalogue, 'plantHarvest')!;
    expect(targetsFor(item, model).map((t) => t.id)).toEqual(['VEG']);
    const m = newMeasure(item, { target: 'VEG' }, { format: 'lakeledger.scenario/1', id: 's', model: 'demo_lake', period: { start: '2027-01-01', end: '2047-01-01' } }, model);
    expect(m).toEqual({ id: 'plantHarvest', kind: 'remove', state: 'VEG', fraction: 0.3, on: '2029-07-01', repeat: { everyYears: 1, count: 4 } });
    expect(name(matchMeasure(m, model, catalogue))).toBe('plantHarvest');
    expect(measureWords(m, model, catalogue)).toBe('harvest 30 % of submerged vegetation P (VEG) each July 2029–2032');
    // The bundled catalogue knows nothing of it: the same measure is "other" there.
    expect(name(matchMeasure(m, model, CATALOGUE))).toBe('other');
    expect(measureWords(m, model)).toBe('remove 30 % of submerged vegetation P (VEG) each July 2029–2032');
  });
});
