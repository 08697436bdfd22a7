/**
 * structureFindings(model): what the shape of a valid model says before a run. Each case
 * is a small invented model with one thing wrong (or one kind of boundary); the test checks
 * codes, ids and paths, and that a clean model has no warning at all.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeModel, ModelInvalidError, structureFindings } from '../../../src/lib/engine';
import type { FlowDoc, ModelDoc, StructureFinding } from '../../../src/lib/engine';

/** Water and sediment of one invented lake: load in, flushing out, settling and release. */
function lake(edit: (m: ModelDoc) => void = () => {}): ModelDoc {
  const m: ModelDoc = {
    format: 'lakeledger.model/1',
    id: 'small_lake',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 4e6, unit: 'm^3' },
      { id: 'A', value: 1e6, unit: 'm^2' },
      { id: 'Pin', value: 80, unit: 'mg/m^3' },
      { id: 'vs', value: 0.05, unit: 'm/d' },
      { id: 'z', value: 4, unit: 'm' },
      { id: 'kr', value: 0.002, unit: '1/d' }
    ],
    forcings: [{ id: 'Q', unit: 'm^3/d', table: { t: [0, 365], v: [1e4, 1e4] } }],
    states: [
      { id: 'WAT', unit: 'mg/m^3', initial: 50, size: 'V', zone: 'water' },
      { id: 'SED', unit: 'g/m^2', initial: 2, size: 'A', zone: 'sediment' }
    ],
    derived: [{ id: 'flush', expression: 'Q / V', unit: '1/d' }],
    flows: [
      { id: 'load', to: 'WAT', rate: 'flush * Pin' },
      { id: 'out', from: 'WAT', rate: 'flush * WAT' },
      { id: 'settling', from: 'WAT', to: 'SED', rate: 'vs / z * WAT' },
      { id: 'release', from: 'SED', to: 'WAT', rate: 'kr * SED' }
    ]
  };
  edit(m);
  return m;
}

const codes = (fs: StructureFinding[]) => fs.map((f) => [f.code, f.id, f.path]);

describe('structureFindings(model)', () => {
  it('a clean open lake has no finding', () => {
    expect(structureFindings(lake())).toEqual([]);
  });

  it('takes the analysed model as well as the document, with the same answer', () => {
    const doc = lake((m) => m.parameters.push({ id: 'spare', value: 1, unit: '1' }));
    expect(structureFindings(analyzeModel(doc).model!)).toEqual(structureFindings(doc));
  });

  it('refuses an invalid model with ModelInvalidError', () => {
    expect(() => structureFindings(lake((m) => (m.flows[0].rate = 'nope * 2')))).toThrow(ModelInvalidError);
  });

  it('state_no_flows: a state nothing enters or leaves', () => {
    const m = lake((m) => m.states.push({ id: 'FISH', unit: 'mg/m^2', initial: 5, size: 'A', zone: 'biota' }));
    const f = structureFindings(m);
    expect(codes(f)).toEqual([['state_no_flows', 'FISH', 'states[2]']]);
    expect(f[0].level).toBe('warning');
    expect(f[0].message).toContain('FISH');
  });

  it('state_drains_only: a conserved state that flows only leave (release with no settling back)', () => {
    const m = lake((m) => {
      m.flows = m.flows.filter((f) => f.id !== 'settling');
      m.parameters = m.parameters.filter((p) => p.id !== 'vs' && p.id !== 'z');
    });
    const f = structureFindings(m);
    expect(codes(f)).toEqual([
      ['state_drains_only', 'SED', 'states[1]'],
      // With no settling, the sediment is not reachable from the load either.
      ['state_unreachable', 'SED', 'states[1]']
    ]);
    expect(f[0].message).toContain('`release`');
  });

  it('state_drains_only is not raised for a state outside the inventory (conserved: false)', () => {
    const m = lake((m) => {
      m.parameters.push({ id: 'kd', value: 0.1, unit: '1/d' });
      m.states.push({ id: 'O2', unit: 'g/m^3', initial: 9, size: 'V', conserved: false });
      m.flows.push({ id: 'o2Loss', from: 'O2', rate: 'kd * O2' });
    });
    expect(structureFindings(m)).toEqual([]);
  });

  it('a sink that only fills (an inert burial pool) is a normal pool, not a finding', () => {
    const m = lake((m) => {
      m.parameters.push({ id: 'kb', value: 5e-4, unit: '1/d' });
      m.states.push({ id: 'INERT', unit: 'g/m^2', initial: 0, size: 'A' });
      m.flows.push({ id: 'burial', from: 'SED', to: 'INERT', rate: 'kb * SED' });
    });
    expect(structureFindings(m)).toEqual([]);
  });

  it('state_unreachable: a conserved state no chain of flows leads to from an import', () => {
    // A closed side loop (PLANT ⇄ ROOT) beside the open lake: mass from the load never gets there.
    const m = lake((m) => {
      m.parameters.push({ id: 'k1', value: 0.01, unit: '1/d' });
      m.states.push({ id: 'PLANT', unit: 'g/m^2', initial: 1, size: 'A' }, { id: 'ROOT', unit: 'g/m^2', initial: 1, size: 'A' });
      const extra: FlowDoc[] = [
        { id: 'grow', from: 'ROOT', to: 'PLANT', rate: 'k1 * ROOT' },
        { id: 'die', from: 'PLANT', to: 'ROOT', rate: 'k1 * PLANT' }
      ];
      m.flows.push(...extra);
    });
    expect(codes(structureFindings(m))).toEqual([
      ['state_unreachable', 'PLANT', 'states[2]'],
      ['state_unreachable', 'ROOT', 'states[3]']
    ]);
  });

  it('state_unreachable follows flows in their direction: a state that only sends to the water is not reached', () => {
    const m = lake((m) => (m.flows = m.flows.filter((f) => f.id !== 'settling')));
    expect(structureFindings(m).some((f) => f.code === 'state_unreachable' && f.id === 'SED')).toBe(true);
  });

  it('parameter_unused: a parameter no rate, derived quantity, forcing or size reads; sizes count as use', () => {
    const m = lake((m) => m.parameters.push({ id: 'kSpare', value: 1, unit: '1/d' }));
    expect(codes(structureFindings(m))).toEqual([['parameter_unused', 'kSpare', 'parameters[6]']]);
    // V and A are read only through the derived flush and the states' sizes: no finding for them.
    expect(structureFindings(m).map((f) => f.id)).not.toContain('A');
  });

  it('a parameter read only by a forcing expression is used', () => {
    const m = lake((m) => {
      m.parameters.push({ id: 'Qmean', value: 1e4, unit: 'm^3/d' });
      m.forcings = [{ id: 'Q', unit: 'm^3/d', expression: 'Qmean' }];
    });
    expect(structureFindings(m)).toEqual([]);
  });

  it('forcing_unused: a forcing no expression reads', () => {
    const m = lake((m) => m.forcings!.push({ id: 'T', unit: 'degC', table: { t: [0, 365], v: [4, 4] } }));
    expect(codes(structureFindings(m))).toEqual([['forcing_unused', 'T', 'forcings[1]']]);
  });

  it('derived_unused: a derived quantity nobody reads and not reported; reporting it is a use', () => {
    const unused = lake((m) => m.derived!.push({ id: 'TPkg', expression: 'WAT * V', unit: 'mg' }));
    expect(codes(structureFindings(unused))).toEqual([['derived_unused', 'TPkg', 'derived[1]']]);
    const reported = lake((m) => m.derived!.push({ id: 'TPkg', expression: 'WAT * V', unit: 'mg', report: true }));
    expect(structureFindings(reported)).toEqual([]);
  });

  it('derived_unused takes its path from the document, not the evaluation order', () => {
    // `late` is declared first but evaluated after `early`, which it reads.
    const m = lake((m) => m.derived!.unshift({ id: 'late', expression: 'early * 2', unit: '1/d' }, { id: 'early', expression: 'kr', unit: '1/d' }));
    expect(codes(structureFindings(m))).toEqual([['derived_unused', 'late', 'derived[0]']]);
  });

  it('model_closed (info): no flow crosses the boundary', () => {
    const m = lake((m) => {
      m.flows = m.flows.filter((f) => f.from !== undefined && f.to !== undefined);
      m.derived = [];
      m.forcings = [];
      m.parameters = m.parameters.filter((p) => p.id !== 'Pin');
    });
    const f = structureFindings(m);
    expect(codes(f)).toEqual([['model_closed', 'small_lake', '']]);
    expect(f[0].level).toBe('info');
  });

  it('model_export_only (info): mass leaves and none comes in; no reachability finding without imports', () => {
    const m = lake((m) => {
      m.flows = m.flows.filter((f) => f.id !== 'load');
      m.parameters = m.parameters.filter((p) => p.id !== 'Pin');
    });
    expect(codes(structureFindings(m))).toEqual([['model_export_only', 'small_lake', '']]);
  });

  it('model_import_only (info): mass comes in and none leaves', () => {
    const m = lake((m) => (m.flows = m.flows.filter((f) => f.id !== 'out')));
    const f = structureFindings(m);
    expect(codes(f)).toEqual([['model_import_only', 'small_lake', '']]);
    expect(f[0].message).toContain('`load`');
  });

  it('the shipped demo lake has no warning', () => {
    const demo = JSON.parse(readFileSync(join(process.cwd(), 'static', 'examples', 'demo-lake.model.json'), 'utf8')) as ModelDoc;
    expect(structureFindings(demo).filter((f) => f.level === 'warning')).toEqual([]);
  });
});
