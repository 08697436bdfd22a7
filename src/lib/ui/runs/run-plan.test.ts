import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';
import { EXAMPLES, EXAMPLE_BASELINES } from '$lib/storage/examples';
import { baselineFor, chartPicks } from './run-plan';

const [demo, oneBox, npzd] = EXAMPLES;

/** A run document with just the series and units the picks read. */
function runWith(series: Record<string, number[]>, units: Record<string, string>): RunDoc {
  return { series, units, times: [0, 1], start: '2027-01-01' } as unknown as RunDoc;
}

describe('baselineFor(model)', () => {
  it('gives the demo lake its shipped 20-year baseline', () => {
    const s = baselineFor(demo, EXAMPLE_BASELINES);
    expect(s.model).toBe('demo_lake');
    expect(s.period).toMatchObject({ start: '2027-01-01', end: '2047-01-01' });
    expect(s).toBe(EXAMPLE_BASELINES.demo_lake);
  });

  it("gives any other model the engine's default baseline from its time origin", () => {
    const s = baselineFor(oneBox, EXAMPLE_BASELINES);
    expect(s).toMatchObject({ id: 'baseline', model: 'ambrel_one_box', period: { start: '2027-01-01', end: '2047-01-01', outputStep: 1 } });
    expect(s.measures ?? []).toEqual([]);
  });
});

describe('chartPicks(model, run)', () => {
  it('charts chlorophyll and total P by role for the demo lake', () => {
    const chl = demo.derived!.find((d) => d.role === 'chlorophyll')!;
    const tp = demo.derived!.find((d) => d.role === 'totalP')!;
    const run = runWith({ [chl.id]: [1, 2], [tp.id]: [3, 4], DIP: [5, 6] }, { [chl.id]: 'ug/L', [tp.id]: 'mg/m^3', DIP: 'mg/m^3' });
    expect(chartPicks(demo, run).map((p) => [p.role, p.id, p.unit])).toEqual([
      ['chlorophyll', chl.id, 'ug/L'],
      ['totalP', tp.id, 'mg/m^3']
    ]);
  });

  it('charts the states of a model without a chlorophyll role (one box: its one state)', () => {
    const run = runWith({ TP: [60, 59] }, { TP: 'mg/m^3' });
    expect(chartPicks(oneBox, run)).toEqual([{ id: 'TP', title: 'Total phosphorus in the lake water', unit: 'mg/m^3', values: [60, 59] }]);
  });

  it('takes reported quantities before states, and skips what the run did not record', () => {
    const model = {
      ...oneBox,
      states: [{ id: 'A', unit: 'mg/m^3', initial: 1, size: 'V' }, { id: 'B', unit: 'mg/m^3', initial: 1, size: 'V', label: 'Bee' }],
      derived: [{ id: 'Q1', expression: 'A', unit: 'mg/m^3', report: false }, { id: 'Q2', expression: 'A+B', unit: 'mg/m^3', report: true, label: 'Sum' }]
    } as ModelDoc;
    const run = runWith({ Q2: [2], B: [1] }, { Q2: 'mg/m^3', B: 'mg/m^3' });
    expect(chartPicks(model, run).map((p) => [p.id, p.title])).toEqual([['Q2', 'Sum'], ['B', 'Bee']]);
  });

  it('the closed pond has chlorophyll and total P roles', () => {
    const ids = npzd.derived!.filter((d) => d.role).map((d) => d.id);
    const run = runWith(Object.fromEntries(ids.map((id) => [id, [0]])), {});
    expect(chartPicks(npzd, run).map((p) => p.role)).toEqual(['chlorophyll', 'totalP']);
  });
});
