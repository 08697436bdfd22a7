import { describe, expect, it } from 'vitest';
import demo from '../../../static/examples/demo-lake.model.json';
import oneBox from '../../../static/examples/one-box.model.json';
import type { ModelDoc } from '$lib/engine/document/types';
import { CATALOGUE, catalogueItem, type Selector } from './catalogue';
import { intoTargetsFor, itemAllows, selectorAllows, shortLabel, targetsFor } from './targets';

const model = demo as unknown as ModelDoc;
const item = (id: string) => catalogueItem(CATALOGUE, id)!;
const ids = (id: string, m: ModelDoc = model) => targetsFor(item(id), m).map((t) => t.id);

describe('targetsFor(item, demo lake)', () => {
  it.each([
    ['loadCut', ['Pin']],
    ['fishRemoval', ['BFI']],
    ['piscivoreStocking', ['PFI']],
    ['sedimentCapping', ['SED']],
    ['releaseCut', ['kRel']],
    ['flushing', ['Qmean', 'Q']],
    ['warming', ['T']],
    ['dredging', ['SED']],
    ['removeOther', ['DIP', 'PHY', 'ZOO', 'DET', 'BFI', 'PFI', 'VEG', 'SED', 'SEDinert']]
  ])('targetsFor(%s) finds %j by role, zone and unit', (id, expected) => {
    expect(ids(id)).toEqual(expected);
  });

  it('intoTargetsFor(sedimentCapping, from SED) offers the inert pool, never SED itself', () => {
    expect(intoTargetsFor(item('sedimentCapping'), model, 'SED').map((t) => t.id)).toEqual(['SEDinert']);
    expect(intoTargetsFor(item('transferOther'), model, 'SED').map((t) => t.id)).not.toContain('SED');
  });

  it('size parameters are never targets (A and zMean make up the sizes)', () => {
    const all = ids('scaleOther');
    expect(all).not.toContain('A');
    expect(all).not.toContain('zMean');
    expect(all).toContain('kRel');
    expect(all).toContain('T');
    expect(all.length).toBe(model.parameters.length - 2 + (model.forcings ?? []).length);
  });

  it('an option names the symbol by its label, id and unit', () => {
    expect(targetsFor(item('loadCut'), model)[0]).toMatchObject({ id: 'Pin', kind: 'parameter', unit: 'mg/m^3', text: 'Total P concentration of the inflow (Pin), mg/m^3' });
    expect(targetsFor(item('fishRemoval'), model)[0]).toMatchObject({ kind: 'state', zone: 'biota', text: 'Benthivorous fish P (BFI), mg/m^2' });
  });
});

describe('targets in a model lacking the roles or zones', () => {
  const withoutRoles = (): ModelDoc => {
    const m = structuredClone(model);
    m.flows = m.flows.map((f) => ({ ...f, role: f.role === 'externalLoad' ? undefined : f.role }));
    m.states = m.states.map((s) => ({ ...s, zone: s.zone === 'biota' ? 'animals' : s.zone }));
    return m;
  };
  it.each(['loadCut', 'fishRemoval', 'piscivoreStocking'])('targetsFor(%s) is empty once the role or zone is gone', (id) => {
    expect(ids(id)).not.toEqual([]);
    expect(ids(id, withoutRoles())).toEqual([]);
  });
  it('the one-box example (no zones, no fish) offers no fish measure and no capping', () => {
    const box = oneBox as unknown as ModelDoc;
    expect(ids('fishRemoval', box)).toEqual([]);
    expect(ids('sedimentCapping', box)).toEqual([]);
    expect(ids('removeOther', box).length).toBe(box.states.length);
  });
});

describe('targets are found by what the model says, whatever the ids', () => {
  // A small model of its own: nothing is called as in the demo lake.
  const tiny: ModelDoc = {
    format: 'lakeledger.model/1',
    id: 'tiny',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'Vol', value: 1e6, unit: 'm^3' },
      { id: 'Area', value: 5e5, unit: 'm^2' },
      { id: 'cIn', value: 0.2, unit: 'g/m^3' },
      { id: 'qIn', value: 3, unit: 'm^3/s' },
      { id: 'kOut', value: 0.001, unit: '1/d' },
      { id: 'eat', value: 0.01, unit: '1/d' },
      { id: 'share', value: 0.5, unit: '1' }
    ],
    forcings: [{ id: 'Tw', unit: 'degC', expression: '10' }],
    states: [
      { id: 'Pw', unit: 'g/m^3', initial: 0.1, size: 'Vol', zone: 'water' },
      { id: 'Mud', unit: 'g/m^2', initial: 2, size: 'Area', zone: 'sediment' },
      { id: 'Deep', unit: 'g/m^2', initial: 20, size: 'Area', zone: 'sediment' },
      { id: 'Carp', unit: 'g/m^2', initial: 0.5, size: 'Area', zone: 'biota' }
    ],
    derived: [{ id: 'qd', expression: 'qIn', unit: 'm^3/s' }],
    flows: [
      { id: 'inP', to: 'Pw', rate: 'qd / Vol * cIn * share', role: 'externalLoad' },
      { id: 'outP', from: 'Pw', rate: 'qd / Vol * Pw', role: 'outflow' },
      { id: 'rel', from: 'Mud', to: 'Pw', rate: 'kOut * Mud', role: 'release' },
      { id: 'root', from: 'Mud', to: 'Carp', rate: 'eat * Mud', role: 'feeding' }
    ]
  };
  it.each([
    ['loadCut', ['cIn']],
    ['flushing', ['qIn']],
    ['releaseCut', ['kOut']],
    ['fishRemoval', ['Carp']],
    ['piscivoreStocking', []],
    ['sedimentCapping', ['Mud']],
    ['warming', ['Tw']]
  ])('targetsFor(%s, a model with other ids) = %j', (id, expected) => {
    expect(ids(id, tiny)).toEqual(expected);
  });
  it('itemAllows checks kind, target and into', () => {
    expect(itemAllows(item('sedimentCapping'), tiny, { kind: 'transfer', state: 'Mud', into: 'Deep', fraction: 0.5, on: '2028-01-01' })).toBe(true);
    expect(itemAllows(item('sedimentCapping'), tiny, { kind: 'transfer', state: 'Mud', into: 'Pw', fraction: 0.5, on: '2028-01-01' })).toBe(false);
    expect(itemAllows(item('fishRemoval'), tiny, { kind: 'add', state: 'Carp', amount: 1, on: '2028-01-01' })).toBe(false);
  });
});

describe('selectorAllows', () => {
  // [selector, symbol, allowed?]
  const cases: [Selector, string, boolean][] = [
    [{ of: 'parameter', unit: ['mg/m^3'] }, 'Pin', true],
    [{ of: 'parameter', unit: ['ug/L'] }, 'Pin', false],
    [{ of: 'parameter', dimensionOf: 'ug/L' }, 'Pin', true],
    [{ of: 'parameter', dimensionless: true }, 'fDisIn', true],
    [{ of: 'parameter', dimensionless: false }, 'fDisIn', false],
    [{ of: 'forcing' }, 'Pin', false],
    [{ of: 'parameterOrForcing', feedsDerivedRole: ['secchi'] }, 'kdW', true],
    [{ of: 'parameterOrForcing', feedsDerivedRole: ['secchi'] }, 'kRel', false],
    [{ of: 'parameter', feedsFlowRole: ['release'] }, 'thetaMin', true],
    [{ of: 'state', zone: ['sediment'], notFlowOutRole: ['release'] }, 'SEDinert', true],
    [{ of: 'state', zone: ['sediment'], notFlowOutRole: ['release'] }, 'SED', false],
    [{ of: 'state', conserved: false }, 'BFI', false],
    [{ of: 'state' }, 'kRel', false]
  ];
  it.each(cases)('selectorAllows(%j, %s) = %s', (sel, id, ok) => {
    expect(selectorAllows(sel, model, id)).toBe(ok);
  });
});

describe('shortLabel', () => {
  it.each([
    ['Benthivorous fish P (1 mg/m^2 is about 1.25 kg/ha fresh weight)', 'Benthivorous fish P'],
    ['Release of mobile sediment P to the water at 20 degC', 'Release of mobile sediment P to the water at 20 degC'],
    ['(all in brackets)', '(all in brackets)'],
    [undefined, undefined]
  ])('shortLabel(%s) = %s', (label, expected) => {
    expect(shortLabel(label)).toBe(expected);
  });
});
