/**
 * CSV exports read back with papaparse (Papa.parse, header: true, comments: '#'): what goes
 * in comes out, field for field (RFC 4180 quoting is papaparse's; checked here with a
 * title holding a comma and a quote).
 */
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { csvFileName, indicatorCsv, seriesColumnName, seriesCsv, type CsvContext } from './compare-csv';

const ctx: CsvContext = {
  modelId: 'demo_lake',
  modelTitle: 'Lake "Wendmoor", invented',
  engine: 'lakeledger 0.1.0',
  exportedAt: '2027-05-01T10:00:00.000Z',
  runs: [
    {
      runId: 'run_aaaa',
      scenarioId: 'baseline',
      scenarioTitle: 'Baseline, no measures',
      scenarioRevision: 1,
      scenarioDigest: 'sha256:11',
      modelRevision: 3,
      modelDigest: 'sha256:33',
      status: 'ok',
      closure: 'closed, residual 3e-12 of throughput',
      baseline: true
    },
    {
      runId: 'run_bbbb',
      scenarioId: 'fish',
      scenarioTitle: 'Fish removal',
      scenarioRevision: 2,
      scenarioDigest: 'sha256:22',
      modelRevision: 3,
      modelDigest: 'sha256:33',
      status: 'ok',
      closure: 'closed, residual 1e-13 of throughput',
      baseline: false
    }
  ],
  notes: ['growing season April–September; Carlson TSI, exact coefficients']
};

const parse = (text: string) => Papa.parse<Record<string, string>>(text, { header: true, comments: '#', skipEmptyLines: true });

describe('indicatorCsv(ctx, rows)', () => {
  const text = indicatorCsv(ctx, [
    { runId: 'run_aaaa', scenario: 'Baseline, no measures', key: 'chlorophyll.last', label: 'Chlorophyll-a, growing-season mean, last 5 years', unit: 'ug/L', value: 64.123456789012 },
    { runId: 'run_bbbb', scenario: 'Fish removal', key: 'chlorophyll.last', label: 'Chlorophyll-a, growing-season mean, last 5 years', unit: 'ug/L', value: 48.1, change: -16.023456789012, percent: -24.99 },
    { runId: 'run_bbbb', scenario: 'Fish removal', key: 'dissolvedP.last', label: 'Dissolved P', unit: '', value: null, note: 'the model has no derived quantity with role `dissolvedP`' }
  ]);

  it('names the model, each run with scenario, revisions and digests, in comment lines first', () => {
    const head = text.split('\n').filter((l) => l.startsWith('#'));
    expect(head[1]).toBe('# model: Lake "Wendmoor", invented (id demo_lake)');
    expect(head.some((l) => l.includes('run run_aaaa (baseline): scenario Baseline, no measures (id baseline) revision 1 sha256:11; model revision 3 sha256:33'))).toBe(true);
    expect(head.some((l) => l.includes('run run_bbbb: scenario Fish removal (id fish) revision 2 sha256:22'))).toBe(true);
    expect(head.at(-1)).toMatch(/Carlson TSI, exact/);
  });

  it('reads back with Papa.parse: fields, full-precision numbers, empty values with their note', () => {
    const r = parse(text);
    expect(r.errors).toEqual([]);
    expect(r.meta.fields).toEqual(['run', 'scenario', 'indicator', 'label', 'unit', 'value', 'change_vs_baseline', 'change_percent', 'note']);
    expect(r.data).toHaveLength(3);
    expect(r.data[0].scenario).toBe('Baseline, no measures');
    expect(Number(r.data[0].value)).toBe(64.123456789012);
    expect(r.data[0].change_vs_baseline).toBe('');
    expect(Number(r.data[1].change_vs_baseline)).toBe(-16.023456789012);
    expect(r.data[2].value).toBe('');
    expect(r.data[2].note).toMatch(/dissolvedP/);
  });
});

describe('seriesCsv(ctx, columns)', () => {
  const text = seriesCsv(ctx, [
    { runId: 'run_aaaa', seriesId: 'Chl', unit: 'ug/L', start: '2027-01-01', times: [0, 1, 2], values: [10, 11.5, NaN] },
    { runId: 'run_bbbb', seriesId: 'Chl', unit: 'ug/L', start: '2027-01-01', times: [1, 2, 3], values: [9, 8, 7] },
    { runId: 'run_bbbb', seriesId: 'Secchi', unit: 'm', start: '2027-01-01', times: [0, 1, 2, 3], values: [0.5, 0.6, 0.7, 0.8] }
  ]);

  it('has one row per date over all runs, ISO dates, and empty fields where a run has no value', () => {
    const r = parse(text);
    expect(r.errors).toEqual([]);
    expect(r.meta.fields).toEqual(['date', 'Chl [ug/L] run_aaaa', 'Chl [ug/L] run_bbbb', 'Secchi [m] run_bbbb']);
    expect(r.data.map((d) => d.date)).toEqual(['2027-01-01', '2027-01-02', '2027-01-03', '2027-01-04']);
    expect(r.data[0]['Chl [ug/L] run_bbbb']).toBe('');
    expect(Number(r.data[1]['Chl [ug/L] run_aaaa'])).toBe(11.5);
    expect(r.data[2]['Chl [ug/L] run_aaaa']).toBe(''); // NaN is written as an empty field
    expect(Number(r.data[3]['Secchi [m] run_bbbb'])).toBe(0.8);
  });

  it('says the units in a comment line', () => {
    expect(text).toMatch(/^# units: Chl in ug\/L, Secchi in m$/m);
  });

  it('names files and columns plainly', () => {
    expect(seriesColumnName({ runId: 'r', seriesId: 'TP', unit: 'mg/m^3' })).toBe('TP [mg/m^3] r');
    expect(csvFileName('demo lake/1', 'indicators')).toBe('demo_lake_1-indicators.csv');
  });
});
