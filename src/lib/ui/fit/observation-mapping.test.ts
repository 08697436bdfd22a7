import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { ModelDoc } from '$lib/engine/document/types';
import { parseObservations } from '$lib/engine/fit/observations';
import {
  censoredCounts,
  defaultMapping,
  engineMap,
  fileVariableNames,
  forgetObservations,
  hasKeptObservations,
  previewSummary,
  problemLines,
  readKeptObservations,
  type KeyValueStore
} from './observation-mapping';

const model = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8')) as ModelDoc;
const demo = readFileSync('static/examples/demo-lake.observations.csv', 'utf8');

function memoryStore(): KeyValueStore & { data: Map<string, string> } {
  const data = new Map<string, string>();
  return { data, getItem: (k) => data.get(k) ?? null, setItem: (k, v) => void data.set(k, v), removeItem: (k) => void data.delete(k) };
}

describe('fileVariableNames(text)', () => {
  it('lists the distinct names of the variable column with their row counts, any header case', () => {
    expect(fileVariableNames('Date,VARIABLE,value\n2027-01-01,Chl,1\n2027-01-02,TP,2\n2027-01-03,Chl,3\n\n')).toEqual([
      { name: 'Chl', rows: 2 },
      { name: 'TP', rows: 1 }
    ]);
  });
  it('gives nothing for a file without a variable column', () => {
    expect(fileVariableNames('date,value\n2027-01-01,1')).toEqual([]);
  });
});

describe('defaultMapping(names, model)', () => {
  it('maps a series id as written, a role name to its series, and anything else to nothing', () => {
    const m = defaultMapping([{ name: 'Chl', rows: 1 }, { name: 'secchi', rows: 1 }, { name: 'oxygen', rows: 1 }], model);
    expect(m).toEqual({ Chl: 'Chl', secchi: 'Secchi', oxygen: '' });
  });
  it('gives the demo file a mapping under which every row is read', () => {
    const map = defaultMapping(fileVariableNames(demo), model);
    const set = parseObservations(demo, model, { map: engineMap(map) });
    expect(set.problems).toEqual([]);
    expect(set.used).toBe(set.rows);
  });
});

describe('engineMap(mapping)', () => {
  it('drops names mapped to nothing, so the engine lists their rows as unknown', () => {
    const text = 'date,variable,value\n2027-01-01,Chl,1\n2027-01-02,O2,2\n';
    const set = parseObservations(text, model, { map: engineMap({ Chl: 'Chl', O2: '' }) });
    expect(engineMap({ Chl: 'Chl', O2: '' })).toEqual({ Chl: 'Chl' });
    expect(set.problems.map((p) => [p.line, p.code])).toEqual([[3, 'unknown_variable']]);
  });
  it('sends a renamed column to the chosen series', () => {
    const set = parseObservations('date,variable,value\n2027-03-01,Sichttiefe,1.2\n', model, { map: engineMap({ Sichttiefe: 'Secchi' }) });
    expect(set.points.map((p) => [p.variable, p.value])).toEqual([['Secchi', 1.2]]);
  });
});

describe('censoredCounts(set) and previewSummary(set)', () => {
  it('counts the demo file: dissolved P below the limit, Secchi on the bottom', () => {
    const set = parseObservations(demo, model);
    const byId = Object.fromEntries(censoredCounts(set).map((c) => [c.id, c]));
    expect(byId.DP.below).toBeGreaterThan(0);
    expect(byId.DP.above).toBe(0);
    expect(byId.Secchi.above).toBeGreaterThan(0);
    expect(byId.Chl.below + byId.Chl.above).toBe(0);
    expect(previewSummary(set)).toBe(`${set.rows} data rows, ${set.used} used in ${set.points.length} dated values, no unreadable rows`);
  });
  it('names unreadable rows by line, in line order', () => {
    const set = parseObservations('date,variable,value\n2027-13-01,Chl,1\n2027-01-02,Chl,abc\n2027-01-03,Chl,2\n', model);
    expect(previewSummary(set)).toContain('2 rows could not be read');
    const lines = problemLines(set.problems);
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^line 2: /);
    expect(lines[1]).toMatch(/^line 3: /);
  });
});

describe('readKeptObservations / forgetObservations (moving the old localStorage copy into the library)', () => {
  const obs = { fileName: 'a.csv', digest: 'sha256:00', text: 'date,variable,value\n', mapping: { Chl: 'Chl' }, loadedAt: '2027-01-01T00:00:00Z' };
  it('reads the file an earlier version kept for a model, then forgets it', () => {
    const s = memoryStore();
    s.setItem('lakeledger.fit-observations.m1', JSON.stringify(obs));
    expect(hasKeptObservations(s, 'm1')).toBe(true);
    expect(readKeptObservations(s, 'm1')).toEqual(obs);
    expect(readKeptObservations(s, 'm2')).toBeNull();
    forgetObservations(s, 'm1');
    expect(hasKeptObservations(s, 'm1')).toBe(false);
    expect(readKeptObservations(s, 'm1')).toBeNull();
  });
  it('reads nothing from damaged text, but still sees that something is kept', () => {
    const s = memoryStore();
    s.setItem('lakeledger.fit-observations.m1', '{"fileName": 3');
    expect(readKeptObservations(s, 'm1')).toBeNull();
    expect(hasKeptObservations(s, 'm1')).toBe(true);
    s.setItem('lakeledger.fit-observations.m1', '{"fileName":"a"}');
    expect(readKeptObservations(s, 'm1')).toBeNull();
  });
  it('survives a store that refuses to be read', () => {
    const broken: KeyValueStore = { getItem: () => { throw new DOMException('denied', 'SecurityError'); }, setItem: () => {}, removeItem: () => {} };
    expect(readKeptObservations(broken, 'm1')).toBeNull();
    expect(hasKeptObservations(broken, 'm1')).toBe(false);
    expect(() => forgetObservations(undefined, 'm1')).not.toThrow();
  });
});
