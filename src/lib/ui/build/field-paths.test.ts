import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { analyzeModel } from '$lib/engine/document/validate-model';
import {
  describePlace,
  hashTarget,
  fieldForPath,
  headerFieldId,
  parsePath,
  rowFieldId,
  ROW_FIELDS,
  sectionId,
  SECTIONS,
  tableCellId
} from './field-paths';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));

describe('parsePath', () => {
  test.each([
    ['', []],
    ['id', ['id']],
    ['flows[3].rate', ['flows', 3, 'rate']],
    ['forcings[0].table.t[12]', ['forcings', 0, 'table', 't', 12]],
    ['parameters[10].range.distribution', ['parameters', 10, 'range', 'distribution']]
  ])('parsePath(%j) splits keys and indexes', (path, parts) => {
    expect(parsePath(path)).toEqual(parts);
  });
});

describe('fieldForPath', () => {
  test.each([
    ['flows[3].rate', 'bf-flows-3-rate'],
    ['parameters[0].value', 'bf-parameters-0-value'],
    ['parameters[2].range', 'bf-parameters-2-range-min'],
    ['parameters[2].range.distribution', 'bf-parameters-2-range-distribution'],
    ['parameters[2].range.mode', 'bf-parameters-2-range-min'],
    ['states[1].initialRange', 'bf-states-1-initialRange-min'],
    ['states[1].size', 'bf-states-1-size'],
    ['flows[4]', 'bf-flows-4-from'],
    ['forcings[1]', 'bf-forcings-1-kind'],
    ['derived[0]', 'bf-derived-0-id'],
    ['flows[2].colour', 'bf-flows-2-id'],
    ['forcings[0].table', 'bf-forcings-0-table'],
    ['forcings[0].table.t', 'bf-forcings-0-table'],
    ['timeOrigin', 'bf-timeOrigin'],
    ['conserved', 'bf-conserved-element'],
    ['conserved.unit', 'bf-conserved-unit'],
    ['notes', 'bf-section-header'],
    ['parameters', 'bf-section-parameters']
  ])('fieldForPath(%j) is the control %j', (path, field) => {
    expect(fieldForPath(path)?.field).toBe(field);
  });

  test('fieldForPath(table cell) names the cell and the table editor to open', () => {
    expect(fieldForPath('forcings[2].table.v[4]')).toEqual({ field: tableCellId(2, 'v', 4), table: 2, container: 'bf-forcings-2-table' });
  });

  test('fieldForPath("") is null: a problem about the whole document has no field', () => {
    expect(fieldForPath('')).toBeNull();
  });

  test('the engine’s problems on a broken demo lake all land on controls the screen has', () => {
    const doc = structuredClone(demo);
    doc.flows[9].rate = 'vsPhy * PHY';
    doc.flows[2].to = 'NOPE';
    doc.parameters[0].value = 'abc';
    doc.parameters[1].range = { min: 5, max: 1 };
    doc.states[0].size = 'A';
    doc.derived[3].expression = 'thetaFish^(T - Tref) + DIP';
    doc.forcings[0] = { id: 'T', unit: 'degC', table: { t: [0, 5, 5], v: [1, 'x', 3] } };
    doc.timeOrigin = '2027-13-01';
    doc.extra = 1;
    const known = new Set<string>([
      ...['format', 'id', 'title', 'description', 'timeOrigin', 'conserved.element', 'conserved.unit'].map(headerFieldId),
      sectionId('header'),
      ...SECTIONS.map((s) => sectionId(s))
    ]);
    for (const s of SECTIONS) doc[s]?.forEach((_: unknown, i: number) => ROW_FIELDS[s].forEach((f) => known.add(rowFieldId(s, i, f))));
    doc.forcings[0].table.t.forEach((_: unknown, j: number) => (known.add(tableCellId(0, 't', j)), known.add(tableCellId(0, 'v', j))));

    const problems = analyzeModel(doc).problems;
    expect(problems.length).toBeGreaterThanOrEqual(8);
    for (const p of problems) {
      const place = fieldForPath(p.path);
      expect(place, p.path).not.toBeNull();
      expect(known.has(place!.field), `${p.path} → ${place!.field}`).toBe(true);
    }
    expect(problems.map((p) => fieldForPath(p.path)!.field)).toEqual(
      expect.arrayContaining(['bf-flows-9-rate', 'bf-flows-2-to', 'bf-parameters-0-value', 'bf-forcings-0-table-t-2', 'bf-forcings-0-table-v-1'])
    );
  });
});

describe('describePlace', () => {
  test.each([
    ['flows[9].rate', 'Flow phySettle, rate'],
    ['parameters[1].range.max', 'Parameter zMean, range maximum'],
    ['forcings[0].expression', 'Forcing T, expression'],
    ['forcings[0].table.t[4]', 'Forcing T, table row 5, t'],
    ['derived[6]', 'Derived quantity Chl'],
    ['timeOrigin', 'Model, time origin'],
    ['conserved.unit', 'Model, conserved unit'],
    ['', 'Model document'],
    ['states', 'List of states']
  ])('describePlace(%j) is %j', (path, words) => {
    expect(describePlace(path, demo)).toBe(words);
  });

  test('describePlace names an item without a usable id by its row number', () => {
    expect(describePlace('flows[0].rate', { flows: [{ rate: 'x' }] })).toBe('Flow #1, rate');
  });
});

describe('hashTarget(hash, doc): links from other screens', () => {
  const doc = {
    parameters: [{ id: 'V' }, { id: 'kDIP' }],
    states: [{ id: 'DIP' }],
    flows: [{ id: 'load' }, { id: 'phyUptake' }],
    derived: [{ id: 'Chl' }],
    forcings: [{ id: 'T' }]
  };
  test.each([
    ['#flow-phyUptake', 'bf-flows-1-rate'],
    ['#state-DIP', 'bf-states-0-id'],
    ['#parameter-kDIP', 'bf-parameters-1-value'],
    ['#derived-Chl', 'bf-derived-0-expression'],
    ['#forcing-T', 'bf-forcings-0-id']
  ])('%s opens %s', (hash, id) => expect(hashTarget(hash, doc)).toBe(id));
  test.each(['#flow-nope', '#widget-DIP', '', '#bf-section-flows'])('%j opens nothing', (hash) => expect(hashTarget(hash, doc)).toBeNull());
});
