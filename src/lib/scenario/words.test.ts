import { describe, expect, it } from 'vitest';
import demo from '../../../static/examples/demo-lake.model.json';
import baseline from '../../../static/examples/demo-lake.baseline.scenario.json';
import fish from '../../../static/examples/demo-lake.fish-removal.scenario.json';
import half from '../../../static/examples/demo-lake.half-load.scenario.json';
import both from '../../../static/examples/demo-lake.load-and-fish.scenario.json';
import type { MeasureDoc, ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { capitalise, datesWords, dateWords, durationWords, measureWords, numberWords, percentWords, periodWords, symbolWords } from './words';

const model = demo as unknown as ModelDoc;

describe('measureWords(measure, demo lake)', () => {
  // Every kind, with and without repeat, ramp and until.
  const cases: [MeasureDoc, string][] = [
    [{ kind: 'scale', target: 'Pin', factor: 0.5, from: '2029-01-01', rampDays: 730 }, 'cut total P concentration of the inflow (Pin) to 50 % from 2029, phased in over 2 years'],
    [{ kind: 'scale', target: 'Q', factor: 1.5, from: '2029-06-15', until: '2031-01-01' }, 'flush the lake: raise inflow (Q) to 150 % from 15 June 2029 to the end of 2030'],
    [{ kind: 'scale', target: 'kRel', factor: 0.3, from: '2030-05-01', until: '2035-05-01' }, 'cut release of mobile sediment P to the water at 20 degC (kRel) to 30 % from 1 May 2030 until 1 May 2035'],
    [{ kind: 'scale', target: 'muPhy', factor: 1, from: '2030-01-01' }, 'keep maximum phytoplankton growth rate at 20 degC (muPhy) to 100 % from 2030'],
    [{ kind: 'offset', target: 'T', amount: 1.5, from: '2027-01-01', rampDays: 7305 }, 'raise water temperature (T) by 1.5 degC from 2027, phased in over 20 years'],
    [{ kind: 'offset', target: 'T', amount: -2, from: '2028-03-01', rampDays: 90 }, 'lower water temperature (T) by 2 degC from 1 March 2028, phased in over 90 days'],
    [{ kind: 'set', target: 'kRel', value: 0.0004, from: '2030-05-01', until: '2035-05-01' }, 'set release of mobile sediment P to the water at 20 degC (kRel) to 0.0004 1/d from 1 May 2030 until 1 May 2035'],
    [{ kind: 'remove', state: 'BFI', fraction: 0.7, on: '2028-03-01', repeat: { everyYears: 1, count: 3 } }, 'remove 70 % of benthivorous fish P (BFI) each March 2028–2030'],
    [{ kind: 'remove', state: 'BFI', fraction: 0.7, on: '2028-03-15', repeat: { everyYears: 2, count: 3 } }, 'remove 70 % of benthivorous fish P (BFI) every 2 years on 15 March 2028–2032 (3 times)'],
    [{ kind: 'remove', state: 'SED', fraction: 0.5, on: '2030-09-01' }, 'dredge away 50 % of mobile sediment P (SED) on 1 September 2030'],
    [{ kind: 'remove', state: 'PHY', fraction: 0.25, on: '2030-07-01', repeat: { everyDays: 14, count: 4 } }, 'remove 25 % of phytoplankton P (PHY) 4 times every 14 days from 1 July 2030 to 12 August 2030'],
    [{ kind: 'add', state: 'PFI', amount: 4, on: '2028-04-15' }, 'stock piscivorous fish P (PFI) with 4 mg/m^2 on 15 April 2028'],
    [{ kind: 'add', state: 'DIP', amount: 12.5, on: '2028-04-15', repeat: { everyYears: 1, count: 1 } }, 'add 12.5 mg/m^3 to dissolved inorganic P (DIP) on 15 April 2028'],
    [{ kind: 'transfer', state: 'SED', into: 'SEDinert', fraction: 0.6, on: '2030-05-01' }, 'cap the sediment: lock 60 % of mobile sediment P (SED) into inert (buried) sediment P (SEDinert) on 1 May 2030'],
    [{ kind: 'transfer', state: 'DET', into: 'SED', fraction: 0.1, on: '2030-05-01', repeat: { everyYears: 1, count: 2 } }, 'move 10 % of detrital and resuspended particulate P (DET) into mobile sediment P (SED) each May 2030–2031'],
    [{ kind: 'remove', state: 'NOPE', fraction: 0.1, on: '2030-05-01' }, 'remove 10 % of NOPE (not in the model) on 1 May 2030']
  ];
  it.each(cases)('measureWords(%j)', (m, words) => {
    expect(measureWords(m, model)).toBe(words);
  });

  // Every measure of the shipped demo scenarios reads as a manager would say it.
  const demoScenarios = [baseline, fish, half, both] as unknown as ScenarioDoc[];
  const expected: Record<string, string> = {
    loadCut: 'cut total P concentration of the inflow (Pin) to 50 % from 2029, phased in over 2 years',
    fishOut: 'remove 80 % of benthivorous fish P (BFI) each February 2028–2030'
  };
  it('measureWords describes every measure of the demo scenarios', () => {
    let n = 0;
    for (const s of demoScenarios) {
      for (const m of s.measures ?? []) {
        expect(measureWords(m, model), `${s.id}/${m.id}`).toBe(expected[m.id!]);
        n++;
      }
    }
    expect(n).toBe(4);
  });
});

describe('words for parts', () => {
  it.each([
    ['2030-05-01', '1 May 2030'],
    ['2028-12-31', '31 December 2028'],
    ['soon', 'soon']
  ])('dateWords(%s) = %s', (iso, words) => expect(dateWords(iso)).toBe(words));

  it.each([
    [730, '2 years'],
    [365, '1 year'],
    [548, '1.5 years'],
    [7305, '20 years'],
    [400, '400 days'],
    [90, '90 days'],
    [1, '1 day']
  ])('durationWords(%s) = %s', (d, words) => expect(durationWords(d)).toBe(words));

  it.each([
    [0.5, '50 %'],
    [0.125, '12.5 %'],
    [1.2, '120 %'],
    [0.07, '7 %']
  ])('percentWords(%s) = %s', (x, words) => expect(percentWords(x)).toBe(words));

  it.each([
    [210000, '210,000'],
    [0.0004, '0.0004'],
    [3.14159, '3.142'],
    [2e-7, '2e-7']
  ])('numberWords(%s) = %s', (x, words) => expect(numberWords(x)).toBe(words));

  it('periodWords and datesWords', () => {
    expect(periodWords('2029-01-01')).toBe('from 2029');
    expect(periodWords('2029-01-01', '2035-01-01', 0)).toBe('from 2029 to the end of 2034');
    expect(datesWords('2028-02-01')).toBe('on 1 February 2028');
    expect(datesWords('2028-02-01', { count: 3, everyYears: 1 })).toBe('each February 2028–2030');
  });

  it('symbolWords keeps acronyms and lower-cases ordinary words', () => {
    expect(symbolWords(model, 'DIP')).toBe('dissolved inorganic P (DIP)');
    expect(symbolWords(model, 'year')).toBe('length of the seasonal cycle (year)');
    expect(symbolWords(model, '')).toBe('(nothing chosen)');
    expect(capitalise('remove 80 %')).toBe('Remove 80 %');
  });
});
