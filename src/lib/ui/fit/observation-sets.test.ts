import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { ModelDoc } from '$lib/engine/document/types';
import { parseObservations } from '$lib/engine/fit/observations';
import { checkRecord, sealRecord, type ObservationsRecord } from '$lib/archive/records';
import type { KeyValueStore } from './observation-mapping';
import {
  MIXED_WATER_COLUMN,
  chooseSet,
  engineOptions,
  fileDepths,
  fileStations,
  normaliseOptions,
  observationRecord,
  optionsWords,
  readChosenSet,
  rememberChosenSet,
  settingsChanges,
  storedMapping,
  workingMapping
} from './observation-sets';

const model = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8')) as ModelDoc;
const demo = readFileSync('static/examples/demo-lake.observations.csv', 'utf8');

describe('engineOptions(map, options)', () => {
  it('averages everything by default, and passes a station and a depth limit to the engine', () => {
    expect(engineOptions({ a: 'Chl' }, MIXED_WATER_COLUMN)).toEqual({ map: { a: 'Chl' }, combine: 'mean' });
    expect(engineOptions({}, { combine: 'station', station: 'Deep', maxDepth: 2 })).toEqual({ map: {}, combine: 'station', station: 'Deep', maxDepth: 2 });
  });
  it('keeps only the chosen station and the rows down to the depth, counted in filtered', () => {
    const set = parseObservations(demo, model, engineOptions({}, { combine: 'station', station: 'Deep', maxDepth: null }));
    const all = parseObservations(demo, model, engineOptions({}, MIXED_WATER_COLUMN));
    expect(set.filtered.station).toBeGreaterThan(0);
    expect(set.used + set.filtered.station).toBe(all.used);
    expect(set.points.every((p) => p.stations.every((s) => s === 'Deep'))).toBe(true);
    const shallow = parseObservations(demo, model, engineOptions({}, { combine: 'mean', station: null, maxDepth: 0.1 }));
    // the demo samples at 0.5 m; Secchi rows have no depth and stay
    expect(shallow.filtered.depth).toBeGreaterThan(0);
    expect(Object.keys(shallow.variables)).toEqual(['Secchi']);
  });
});

describe('storedMapping(mapping) / workingMapping(names, stored)', () => {
  it('leaves names mapped to nothing out of the record, and reads them back as nothing', () => {
    expect(storedMapping({ TP: 'TP', Chla: 'Chl', O2: '' })).toEqual({ Chla: 'Chl', TP: 'TP' });
    const names = [{ name: 'TP', rows: 1 }, { name: 'Chla', rows: 2 }, { name: 'O2', rows: 1 }];
    expect(workingMapping(names, { TP: 'TP', Chla: 'Chl' })).toEqual({ TP: 'TP', Chla: 'Chl', O2: '' });
  });
});

describe('settingsChanges(stored, working) and optionsWords(options)', () => {
  const stored = { mapping: { Chl: 'Chl' }, options: MIXED_WATER_COLUMN };
  it('says nothing when the working settings are the stored ones', () => {
    expect(settingsChanges(stored, { mapping: { Chl: 'Chl', O2: '' }, options: { ...MIXED_WATER_COLUMN } })).toEqual([]);
  });
  it('names what changed: the mapping, the station, the depth', () => {
    expect(settingsChanges(stored, { mapping: { Chl: 'Chl', chla: 'Chl' }, options: { combine: 'station', station: 'Deep', maxDepth: 3 } })).toEqual([
      'which series each name means',
      'the station choice',
      'the depth limit'
    ]);
  });
  it('words the choice', () => {
    expect(optionsWords(MIXED_WATER_COLUMN)).toBe('all stations averaged, all depths (mixed water column)');
    expect(optionsWords({ combine: 'station', station: 'Deep', maxDepth: null })).toBe('station Deep only, all depths averaged');
    expect(optionsWords({ combine: 'mean', station: null, maxDepth: 2.5 })).toBe('all stations averaged, samples down to 2.5 m');
  });
  it('normalises: a station only with combine station, a depth only when it is a number ≥ 0', () => {
    expect(normaliseOptions({ combine: 'mean', station: 'Deep', maxDepth: -1 })).toEqual(MIXED_WATER_COLUMN);
    expect(normaliseOptions({ combine: 'station', station: null, maxDepth: NaN })).toEqual({ combine: 'station', station: '', maxDepth: null });
  });
});

describe('observationRecord(input)', () => {
  it('makes a record that seals and checks, with the rows read and used under the choice', () => {
    const options = { combine: 'station' as const, station: 'Deep', maxDepth: null };
    const set = parseObservations(demo, model, engineOptions({}, options));
    const input = observationRecord({ model, name: 'demo.csv', text: demo, textDigest: 'sha256:x', mapping: { Chl: 'Chl', O2: '' }, options, set, wallMs: 3.4 });
    expect(input).toMatchObject({ format: 'lakeledger.observations-record/1', model: 'demo_lake', mapping: { Chl: 'Chl' }, options, rows: set.rows, used: set.used, wallMs: 3 });
    const { record } = sealRecord<ObservationsRecord>('observations', input);
    expect(record.id).toMatch(/^obs_[0-9a-f]{16}$/);
    expect(checkRecord('observations', record)).toEqual([]);
    // the same file read another way is another set
    const other = sealRecord<ObservationsRecord>('observations', { ...input, options: MIXED_WATER_COLUMN }).record;
    expect(other.id).not.toBe(record.id);
  });
});

describe('fileStations(text) / fileDepths(text)', () => {
  it('lists the stations of the demo file in order of first use, with their rows', () => {
    expect(fileStations(demo).map((s) => s.station)).toEqual(['Deep', 'North', 'Bay']);
    expect(fileStations(demo).reduce((n, s) => n + s.rows, 0)).toBe(270);
  });
  it('gives the distinct depths, and nothing for a file without such columns', () => {
    expect(fileDepths(demo)).toEqual([0.5]);
    expect(fileDepths('Date,Depth,variable\n2027-01-01,2,a\n2027-01-02,0.5,a\n2027-01-02,,a\n2027-01-03,x,a\n')).toEqual([0.5, 2]);
    expect(fileStations('date,variable,value\n2027-01-01,Chl,1\n')).toEqual([]);
    expect(fileDepths('')).toEqual([]);
  });
});

describe('chooseSet / readChosenSet / rememberChosenSet', () => {
  const store = (): KeyValueStore => {
    const m = new Map<string, string>();
    return { getItem: (k) => m.get(k) ?? null, setItem: (k, v) => void m.set(k, v), removeItem: (k) => void m.delete(k) };
  };
  it('uses the remembered set while it is stored, else the newest', () => {
    const rows = [{ id: 'obs_b' }, { id: 'obs_a' }];
    expect(chooseSet(rows, 'obs_a')).toBe('obs_a');
    expect(chooseSet(rows, 'obs_gone')).toBe('obs_b');
    expect(chooseSet([], null)).toBeNull();
  });
  it('remembers per model, and forgets', () => {
    const s = store();
    rememberChosenSet(s, 'm1', 'obs_a');
    expect(readChosenSet(s, 'm1')).toBe('obs_a');
    expect(readChosenSet(s, 'm2')).toBeNull();
    rememberChosenSet(s, 'm1', null);
    expect(readChosenSet(s, 'm1')).toBeNull();
    expect(readChosenSet(undefined, 'm1')).toBeNull();
  });
});
