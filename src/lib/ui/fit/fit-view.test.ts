import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { parseObservations } from '$lib/engine/fit/observations';
import type { CalibrationResult } from '$lib/engine/fit/calibrate';
import type { VariableStatistics } from '$lib/engine/fit/statistics';
import type { StoredRunSummary } from '$lib/storage/types';
import { applyFitted, calibrationNote, calibrationScenario, fitRunChoices, placeInRange, statisticsRows } from './fit-view';

const model = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8')) as ModelDoc;
const baseline = JSON.parse(readFileSync('static/examples/demo-lake.baseline.scenario.json', 'utf8')) as ScenarioDoc;
const demo = readFileSync('static/examples/demo-lake.observations.csv', 'utf8');

const summary = (id: string, scenarioKey: string, storedAt: string, status: 'ok' | 'failed' = 'ok') => ({ id, scenarioKey, storedAt, status }) as StoredRunSummary;

describe('fitRunChoices(runs, isBaseline)', () => {
  it('offers finished runs newest first and prefers the newest baseline run', () => {
    const runs = [summary('a', 'base', '2027-01-01T00:00:00Z'), summary('b', 'half', '2027-01-03T00:00:00Z'), summary('c', 'base', '2027-01-02T00:00:00Z'), summary('d', 'base', '2027-01-04T00:00:00Z', 'failed')];
    const r = fitRunChoices(runs, (k) => k === 'base');
    expect(r.choices.map((x) => x.id)).toEqual(['b', 'c', 'a']);
    expect(r.preferred).toBe('c');
  });
  it('falls back to the newest finished run, or none', () => {
    expect(fitRunChoices([summary('a', 'x', '2027-01-01'), summary('b', 'y', '2027-01-02')], () => false).preferred).toBe('b');
    expect(fitRunChoices([], () => true).preferred).toBeNull();
  });
});

describe('calibrationScenario(scenario, set)', () => {
  it("cuts the period to 1 January after the demo file's last date", () => {
    const set = parseObservations(demo, model);
    const last = set.points.reduce((m, p) => (p.date > m ? p.date : m), '');
    const { scenario, note } = calibrationScenario(baseline, set);
    expect(scenario.period.end).toBe(`${Number(last.slice(0, 4)) + 1}-01-01`);
    expect(scenario.period.start).toBe(baseline.period.start);
    expect(note).toBeNull();
    expect(baseline.period.end).toBe('2047-01-01');
  });
  it('starts a spin-up scenario from the model and says so; keeps a period that ends earlier', () => {
    const set = parseObservations('date,variable,value\n2040-06-01,Chl,3\n', model);
    const short = { ...baseline, initialState: 'run_0123456789abcdef', period: { ...baseline.period, end: '2030-01-01' } };
    const { scenario, note } = calibrationScenario(short, set);
    expect(scenario.initialState).toBeUndefined();
    expect(note).toMatch(/initial values/);
    expect(scenario.period.end).toBe('2030-01-01');
  });
});

const stat = (nse: number | null, log = false) => {
  const s = { n: 3, pairs: 4, consistent: 1, rmse: 1.234, bias: -0.5, nse, meanObs: 1, meanSim: 1, ...(log ? { log10: { n: 3, rmse: 0.1, bias: 0.01, nse: 0.5, nonPositive: 0 } } : {}) };
  return { all: s, growing: s, rest: { ...s, nse: null }, outside: 0 } as VariableStatistics;
};

describe('statisticsRows(stats, units, order)', () => {
  it('gives three seasons per series in the given order, with log scores only where computed', () => {
    const rows = statisticsRows({ TP: stat(0.25), Chl: stat(0.8, true) }, { TP: 'mg/m^3', Chl: 'ug/L' }, ['Chl', 'TP']);
    expect(rows.map((r) => `${r.variable}/${r.season}`)).toEqual(['Chl/all', 'Chl/growing', 'Chl/rest', 'TP/all', 'TP/growing', 'TP/rest']);
    expect(rows[0]).toMatchObject({ unit: 'ug/L', rmse: '1.23', bias: '-0.5', nse: '0.8', log: { nse: '0.5' } });
    expect(rows[2].nse).toBe('–');
    expect(rows[3].log).toBeNull();
  });
});

describe('calibrationNote(input)', () => {
  it('names the file and its digest, the values, the objective before and after and the NSE', () => {
    const result = { parameters: { muPhy: 1.4321 }, initial: { muPhy: 1.6 }, objective: { before: 0.62, after: 0.38 }, iterations: 3 } as unknown as CalibrationResult;
    const note = calibrationNote({ fileName: 'lake.csv', digest: 'sha256:abc', result, after: { Chl: stat(0.8, true) } });
    expect(note).toBe('Calibrated to lake.csv (sha256:abc); muPhy 1.6 → 1.43; objective 0.62 → 0.38 after 3 iterations; Chl NSE 0.8 (log 0.5)');
  });
  it('names the stored set and how it was read, and says when the fit was cancelled early', () => {
    const result = { status: 'cancelled', parameters: { muPhy: 1.4321 }, initial: { muPhy: 1.6 }, objective: { before: 0.62, after: 0.5 }, iterations: 1 } as unknown as CalibrationResult;
    const note = calibrationNote({ fileName: 'lake.csv', digest: 'sha256:abc', setId: 'obs_0123', readAs: 'station Deep only, all depths averaged', result, after: null });
    expect(note).toBe('Calibrated to lake.csv (sha256:abc; station Deep only, all depths averaged; set obs_0123); muPhy 1.6 → 1.43; objective 0.62 → 0.5 after 1 iteration (cancelled early: the best point so far)');
  });
});

describe('applyFitted(values) and placeInRange', () => {
  it('writes only the named parameters, to six significant digits', () => {
    const doc = structuredClone(model) as unknown as Record<string, unknown>;
    applyFitted({ muPhy: 1.23456789, nope: 3 })(doc);
    const params = (doc as unknown as ModelDoc).parameters;
    expect(params.find((p) => p.id === 'muPhy')!.value).toBe(1.23457);
    expect(params.find((p) => p.id === 'kDIP')!.value).toBe(model.parameters.find((p) => p.id === 'kDIP')!.value);
  });
  it('places a value on its range, on the log scale when searched there', () => {
    expect(placeInRange(1.5, { min: 1, max: 2, space: 'linear' })).toBe(0.5);
    expect(placeInRange(10, { min: 1, max: 100, space: 'log' })).toBeCloseTo(0.5, 12);
    expect(placeInRange(5, { min: 1, max: 2, space: 'linear' })).toBe(1);
  });
});
