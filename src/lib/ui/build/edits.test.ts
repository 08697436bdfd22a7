import { describe, expect, test } from 'vitest';
import {
  addItem,
  addTableRow,
  forcingKind,
  insertItem,
  insertTableRow,
  newId,
  removeItem,
  removeTableRow,
  replaceTable,
  restoreForcingParts,
  rowOf,
  rowTexts,
  setFlag,
  setFlowEnd,
  setForcingKind,
  setNumber,
  setRangePart,
  setTableCell,
  setText,
  removeField,
  restoreField,
  type Doc
} from './edits';

function model(): Doc {
  return {
    format: 'lakeledger.model/1',
    id: 'm',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [{ id: 'V', value: 10, unit: 'm^3' }, { id: 'param1', value: 1, unit: '1' }],
    states: [{ id: 'S', unit: 'kg/m^3', initial: 1, size: 'V', zone: 'water' }],
    flows: [{ id: 'out', from: 'S', rate: 'S / 10' }]
  };
}

describe('field edits', () => {
  test('setText keeps text as typed and removes an emptied optional field', () => {
    const p: Record<string, unknown> = { id: 'a', label: 'x' };
    setText(p, 'id', ' b');
    setText(p, 'label', '  ', true);
    expect(p).toEqual({ id: ' b' });
  });

  test('setNumber stores a number, the typed text, or removes the field when emptied', () => {
    const p: Record<string, unknown> = {};
    setNumber(p, 'value', '2.5e3');
    expect(p.value).toBe(2500);
    setNumber(p, 'value', 'abc');
    expect(p.value).toBe('abc');
    setNumber(p, 'value', '');
    expect('value' in p).toBe(false);
  });

  test('setRangePart creates the range with its first part and removes it when min and max are emptied', () => {
    const p: Record<string, unknown> = { id: 'k' };
    setRangePart(p, 'range', 'min', '1');
    expect(p.range).toEqual({ min: 1 });
    setRangePart(p, 'range', 'max', '3');
    setRangePart(p, 'range', 'distribution', 'loguniform');
    expect(p.range).toEqual({ min: 1, max: 3, distribution: 'loguniform' });
    setRangePart(p, 'range', 'distribution', 'uniform');
    expect(p.range).toEqual({ min: 1, max: 3 });
    setRangePart(p, 'range', 'min', '');
    setRangePart(p, 'range', 'max', '');
    expect('range' in p).toBe(false);
  });

  test('setFlowEnd with "" makes the end outside the lake', () => {
    const f: Record<string, unknown> = { id: 'f', from: 'S', to: 'X' };
    setFlowEnd(f, 'to', '');
    setFlowEnd(f, 'from', 'Y');
    expect(f).toEqual({ id: 'f', from: 'Y' });
  });

  test('setFlag removes a flag set to its default', () => {
    const s: Record<string, unknown> = { id: 'S' };
    setFlag(s, 'conserved', false, true);
    expect(s.conserved).toBe(false);
    setFlag(s, 'conserved', true, true);
    expect('conserved' in s).toBe(false);
  });
});

describe('rows', () => {
  test('newId(doc) is unique across every kind of symbol', () => {
    expect(newId(model(), 'parameters')).toBe('param2');
    expect(newId(model(), 'flows')).toBe('flow1');
  });

  test('addItem appends a row, creating an absent optional list; a new state copies the last one’s unit, size and zone', () => {
    const doc = model();
    expect(addItem(doc, 'derived')).toBe(0);
    expect(doc.derived).toEqual([{ id: 'derived1', expression: '', unit: '1' }]);
    expect(addItem(doc, 'states')).toBe(1);
    expect((doc.states as unknown[])[1]).toEqual({ id: 'state1', unit: 'kg/m^3', initial: 0, size: 'V', zone: 'water' });
    expect(addItem(doc, 'flows')).toBe(1);
    expect((doc.flows as unknown[])[1]).toEqual({ id: 'flow1', rate: '', from: 'S' });
  });

  test('addItem refuses a section that is not a list', () => {
    const doc = { ...model(), parameters: 'oops' };
    expect(addItem(doc, 'parameters')).toBe(-1);
    expect(doc.parameters).toBe('oops');
  });

  test('removeItem then insertItem puts the row back at its place', () => {
    const doc = model();
    const removed = removeItem(doc, 'parameters', 0);
    expect(removed).toEqual({ id: 'V', value: 10, unit: 'm^3' });
    expect((doc.parameters as { id: string }[]).map((p) => p.id)).toEqual(['param1']);
    insertItem(doc, 'parameters', 0, removed);
    expect(doc).toEqual(model());
    expect(removeItem(doc, 'parameters', 7)).toBeUndefined();
  });
});

describe('forcings', () => {
  test('setForcingKind to a table and back restores the expression on undo', () => {
    const f: Record<string, unknown> = { id: 'T', unit: 'degC', expression: 'Tmean' };
    const removed = setForcingKind(f, 'table');
    expect(f).toEqual({ id: 'T', unit: 'degC', table: { t: [0], v: [0] } });
    expect(forcingKind(f)).toBe('table');
    restoreForcingParts(f, removed);
    expect(f).toEqual({ id: 'T', unit: 'degC', expression: 'Tmean' });
  });

  test('setForcingKind to an expression takes the table, interpolation and period away for undo', () => {
    const f: Record<string, unknown> = { id: 'T', unit: 'degC', table: { t: [0, 1], v: [1, 2] }, interpolation: 'step', period: 365 };
    const removed = setForcingKind(f, 'expression');
    expect(f).toEqual({ id: 'T', unit: 'degC', expression: '' });
    expect(removed).toEqual({ table: { t: [0, 1], v: [1, 2] }, interpolation: 'step', period: 365 });
    restoreForcingParts(f, removed);
    expect(f).toEqual({ id: 'T', unit: 'degC', table: { t: [0, 1], v: [1, 2] }, interpolation: 'step', period: 365 });
  });

  test('table cells: typed text stays text, rows are added one day later and removed with undo', () => {
    const f: Record<string, unknown> = { id: 'T', unit: '1', table: { t: [0, 10], v: [1, 2] } };
    setTableCell(f, 'v', 1, 'x');
    expect(f.table).toEqual({ t: [0, 10], v: [1, 'x'] });
    expect(addTableRow(f)).toBe(2);
    expect(f.table).toEqual({ t: [0, 10, 11], v: [1, 'x', 0] });
    const cells = removeTableRow(f, 0)!;
    expect(f.table).toEqual({ t: [10, 11], v: ['x', 0] });
    insertTableRow(f, 0, cells);
    expect(f.table).toEqual({ t: [0, 10, 11], v: [1, 'x', 0] });
  });

  test('replaceTable sets a new table and returns the old one', () => {
    const f: Record<string, unknown> = { id: 'T', unit: '1', table: { t: [0], v: [1] } };
    expect(replaceTable(f, [0, 5], [2, 3])).toEqual({ t: [0], v: [1] });
    expect(f.table).toEqual({ t: [0, 5], v: [2, 3] });
  });
});

describe('rowTexts', () => {
  test('rowTexts(list) gives equal text for an unchanged row of a fresh copy, and rowOf reads it back', () => {
    const doc = model();
    const before = rowTexts(doc.parameters as unknown[]);
    const copy = structuredClone(doc);
    (copy.parameters as Record<string, unknown>[])[1].value = 2;
    const after = rowTexts(copy.parameters as unknown[]);
    expect(after[0]).toBe(before[0]);
    expect(after[1]).not.toBe(before[1]);
    expect(rowOf(after[1])).toEqual({ id: 'param1', value: 2, unit: '1' });
    expect(rowTexts([null, 'x'])).toEqual(['null', '"x"']);
  });
});

describe('removeField and restoreField (unknown fields named by a problem path)', () => {
  const doc = () => ({
    id: 'lake',
    colour: 'blue',
    conserved: { element: 'P', unit: 'kg', note: 'x' },
    flows: [{ id: 'a', rate: '1' }, { id: 'b', rate: '2', rat: '3', range: { min: 0, max: 1, mni: 5 } }]
  });

  test('removes a top-level, a nested and a listed field, and gives the value back for an undo', () => {
    const d = doc();
    expect(removeField(d, 'colour')).toEqual({ value: 'blue' });
    expect(removeField(d, 'conserved.note')).toEqual({ value: 'x' });
    expect(removeField(d, 'flows[1].rat')).toEqual({ value: '3' });
    expect(removeField(d, 'flows[1].range.mni')).toEqual({ value: 5 });
    expect(d).toEqual({ id: 'lake', conserved: { element: 'P', unit: 'kg' }, flows: [{ id: 'a', rate: '1' }, { id: 'b', rate: '2', range: { min: 0, max: 1 } }] });
    expect(restoreField(d, 'flows[1].range.mni', 5)).toBe(true);
    expect(restoreField(d, 'flows[1].rat', '3')).toBe(true);
    expect(restoreField(d, 'colour', 'blue')).toBe(true);
    expect(d.flows[1]).toEqual({ id: 'b', rate: '2', rat: '3', range: { min: 0, max: 1, mni: 5 } });
    expect((d as Record<string, unknown>).colour).toBe('blue');
  });

  test('changes nothing for a path that names nothing', () => {
    const d = doc();
    expect(removeField(d, 'flows[5].rat')).toBeUndefined();
    expect(removeField(d, 'conserved.none')).toBeUndefined();
    expect(removeField(d, 'flows[x].rat')).toBeUndefined();
    expect(d).toEqual(doc());
    expect(restoreField(d, 'flows[7].rat', 1)).toBe(false);
  });
});
