/**
 * validateScenario(doc, model): a scenario is checked against its model; every problem has a
 * stable code, the JSON path and (for measures) the measure's id. Codes, not wording.
 * The model and scenario are invented.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { validateScenario } from '../../../src/lib/engine';
import type { ModelDoc, Problem } from '../../../src/lib/engine';

type Doc = any;

const model: ModelDoc = {
  format: 'lakeledger.model/1',
  id: 'pond',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'A', value: 2e5, unit: 'm^2' },
    { id: 'k1', value: 0.1, unit: '1/d' },
    { id: 'Pin', value: 100, unit: 'mg/m^3' }
  ],
  forcings: [{ id: 'T', unit: 'degC', table: { t: [0, 100, 200], v: [4, 20, 10] } }],
  states: [
    { id: 'DIP', unit: 'mg/m^3', initial: 10, size: 'V' },
    { id: 'PHY', unit: 'mg/m^3', initial: 1, size: 'V' },
    { id: 'SED', unit: 'g/m^2', initial: 2, size: 'A' },
    { id: 'SEDinert', unit: 'g/m^2', initial: 0, size: 'A' }
  ],
  flows: [{ id: 'up', from: 'DIP', to: 'PHY', rate: 'k1 * DIP' }]
};

function baseScenario(): Doc {
  return {
    format: 'lakeledger.scenario/1',
    id: 'cut_and_fish',
    model: 'pond',
    period: { start: '2027-01-01', end: '2030-01-01', outputStep: 1 },
    measures: [
      { id: 'cut', kind: 'scale', target: 'Pin', factor: 0.5, from: '2028-01-01', rampDays: 365 },
      { id: 'harvest', kind: 'remove', state: 'PHY', fraction: 0.5, on: '2028-03-01', repeat: { everyYears: 1, count: 2 } },
      { id: 'capping', kind: 'transfer', state: 'SED', into: 'SEDinert', fraction: 0.6, on: '2028-05-01' }
    ],
    costs: [{ measure: 'cut', amount: 1000, currency: 'EUR' }]
  };
}

function problemsAfter(change: (d: Doc) => void): Problem[] {
  const d = baseScenario();
  change(d);
  return validateScenario(d, model);
}

const errors = (ps: Problem[]) => ps.filter((p) => p.severity === 'error');

interface Expected {
  code: string;
  path: string;
  id?: string;
  severity?: 'error' | 'warning';
}

function expectProblem(ps: Problem[], e: Expected): Problem {
  const want = { severity: 'error', ...e };
  const hit = ps.find((p) => p.code === want.code && p.path === want.path);
  expect(hit, `expected ${want.code} at ${want.path}, got ${JSON.stringify(ps)}`).toBeDefined();
  expect(hit!.severity).toBe(want.severity);
  if (want.id !== undefined) expect(hit!.id).toBe(want.id);
  expect(hit!.document).toBe('scenario');
  return hit!;
}

describe('validateScenario(doc, model) on the base scenario', () => {
  it('reports nothing', () => {
    expect(validateScenario(baseScenario(), model)).toEqual([]);
  });

  it('a scenario without measures (the baseline) reports nothing', () => {
    expect(problemsAfter((d) => {
      delete d.measures;
      delete d.costs;
    })).toEqual([]);
  });
});

describe('validateScenario(doc, model) reports period problems', () => {
  it.each<[string, (d: Doc) => void, Expected]>([
    ['a missing period', (d) => delete d.period, { code: 'missing_field', path: 'period' }],
    ['a missing end', (d) => delete d.period.end, { code: 'missing_field', path: 'period.end' }],
    ['a date that does not exist (2027-02-30)', (d) => (d.period.start = '2027-02-30'), { code: 'invalid_date', path: 'period.start' }],
    ['a short date (27-1-1)', (d) => (d.period.end = '27-1-1'), { code: 'invalid_date', path: 'period.end' }],
    ['a date with a time of day', (d) => (d.period.end = '2030-01-01T00:00:00Z'), { code: 'invalid_date', path: 'period.end' }],
    ['an end before the start', (d) => (d.period.end = '2026-01-01'), { code: 'invalid_period', path: 'period' }],
    ['an end equal to the start', (d) => (d.period.end = '2027-01-01'), { code: 'invalid_period', path: 'period' }],
    ['an output step of zero', (d) => (d.period.outputStep = 0), { code: 'invalid_output_step', path: 'period.outputStep' }]
  ])('%s', (_what, change, expected) => {
    expectProblem(problemsAfter(change), expected);
  });

  it('29 February of a leap year is a valid date', () => {
    expect(problemsAfter((d) => (d.period.start = '2024-02-29'))).toEqual([]);
  });
});

describe('validateScenario(doc, model) reports measure problems with the measure id', () => {
  it.each<[string, (d: Doc) => void, Expected]>([
    ['an unknown measure kind', (d) => (d.measures[0].kind = 'scal'), { code: 'invalid_measure', path: 'measures[0].kind', id: 'cut' }],
    ['an unknown target', (d) => (d.measures[0].target = 'Pinn'), { code: 'unknown_target', path: 'measures[0].target', id: 'cut' }],
    ['a missing target', (d) => delete d.measures[0].target, { code: 'missing_field', path: 'measures[0].target', id: 'cut' }],
    ['an unknown state', (d) => (d.measures[1].state = 'PHX'), { code: 'unknown_state', path: 'measures[1].state', id: 'harvest' }],
    ['an unknown transfer destination', (d) => (d.measures[2].into = 'SEDx'), { code: 'unknown_state', path: 'measures[2].into', id: 'capping' }],
    ['a scale of a size parameter', (d) => (d.measures[0].target = 'V'), { code: 'measure_on_size', path: 'measures[0].target', id: 'cut' }],
    [
      'a set of a size parameter',
      (d) => (d.measures[0] = { id: 'cut', kind: 'set', target: 'A', value: 1, from: '2028-01-01' }),
      { code: 'measure_on_size', path: 'measures[0].target', id: 'cut' }
    ],
    ['a fraction above 1', (d) => (d.measures[1].fraction = 1.5), { code: 'invalid_measure', path: 'measures[1].fraction', id: 'harvest' }],
    ['a fraction below 0', (d) => (d.measures[2].fraction = -0.1), { code: 'invalid_measure', path: 'measures[2].fraction', id: 'capping' }],
    ['a fraction given as text', (d) => (d.measures[1].fraction = '0.5'), { code: 'not_a_number', path: 'measures[1].fraction', id: 'harvest' }],
    [
      'a repeat with both everyYears and everyDays',
      (d) => (d.measures[1].repeat = { everyYears: 1, everyDays: 30, count: 2 }),
      { code: 'invalid_measure', path: 'measures[1].repeat', id: 'harvest' }
    ],
    ['a repeat with neither', (d) => (d.measures[1].repeat = { count: 2 }), { code: 'invalid_measure', path: 'measures[1].repeat', id: 'harvest' }],
    ['a repeat count of 0', (d) => (d.measures[1].repeat.count = 0), { code: 'invalid_measure', path: 'measures[1].repeat.count', id: 'harvest' }],
    ['a repeat on a scale measure', (d) => (d.measures[0].repeat = { everyYears: 1, count: 2 }), { code: 'invalid_measure', path: 'measures[0].repeat', id: 'cut' }],
    ['a negative scale factor', (d) => (d.measures[0].factor = -1), { code: 'invalid_measure', path: 'measures[0].factor', id: 'cut' }],
    ['until before from', (d) => (d.measures[0].until = '2027-06-01'), { code: 'invalid_measure', path: 'measures[0].until', id: 'cut' }],
    ['a bad measure date', (d) => (d.measures[1].on = '2028-13-01'), { code: 'invalid_date', path: 'measures[1].on', id: 'harvest' }],
    ['a missing date', (d) => delete d.measures[1].on, { code: 'missing_field', path: 'measures[1].on', id: 'harvest' }],
    ['a transfer into the same state', (d) => (d.measures[2].into = 'SED'), { code: 'invalid_measure', path: 'measures[2].into', id: 'capping' }],
    ['a duplicate measure id', (d) => (d.measures[2].id = 'cut'), { code: 'duplicate_id', path: 'measures[2].id', id: 'cut' }],
    ['a measure that is not an object', (d) => d.measures.push('cut'), { code: 'not_an_object', path: 'measures[3]' }]
  ])('%s', (_what, change, expected) => {
    expectProblem(problemsAfter(change), expected);
  });

  it('an unknown measure kind close to a known one suggests it', () => {
    const p = expectProblem(problemsAfter((d) => (d.measures[1].kind = 'remov')), { code: 'invalid_measure', path: 'measures[1].kind', id: 'harvest' });
    expect(p.message).toContain('`remove`');
  });

  it('an unknown target close to a declared parameter suggests it', () => {
    const p = expectProblem(problemsAfter((d) => (d.measures[0].target = 'Pinn')), { code: 'unknown_target', path: 'measures[0].target', id: 'cut' });
    expect(p.message).toContain('`Pin`');
  });

  it('a measure without an id gets the default id m<position> in its problems', () => {
    const p = expectProblem(problemsAfter((d) => {
      delete d.measures[1].id;
      d.measures[1].fraction = 2;
    }), { code: 'invalid_measure', path: 'measures[1].fraction', id: 'm2' });
    expect(p.severity).toBe('error');
  });

  it('a misspelt field in a measure (factr) → unknown_field warning naming factor, and factor missing', () => {
    const ps = problemsAfter((d) => {
      delete d.measures[0].factor;
      d.measures[0].factr = 0.5;
    });
    expect(errors(ps).map((p) => p.code)).toEqual(['missing_field']);
    const w = expectProblem(ps, { code: 'unknown_field', path: 'measures[0].factr', id: 'cut', severity: 'warning' });
    expect(w.message).toContain("'factor'");
  });
});

describe('validateScenario(doc, model) warns about measures outside the period', () => {
  it.each([
    ['after the end', '2035-01-01'],
    ['before the start', '2020-01-01']
  ])('a scale from %s → measure_outside_period warning, no error', (_what, from) => {
    const ps = problemsAfter((d) => (d.measures[0].from = from));
    expect(errors(ps)).toEqual([]);
    expectProblem(ps, { code: 'measure_outside_period', path: 'measures[0].from', id: 'cut', severity: 'warning' });
  });

  it('a measure on the last day of the period is inside it', () => {
    expect(problemsAfter((d) => (d.measures[1].on = '2030-01-01'))).toEqual([]);
  });
});

describe('validateScenario(doc, model) reports cost problems', () => {
  it.each<[string, (d: Doc) => void, Expected]>([
    ['a cost for an unknown measure', (d) => (d.costs[0].measure = 'cutt'), { code: 'unknown_measure', path: 'costs[0].measure' }],
    ['a currency in words', (d) => (d.costs[0].currency = 'euro'), { code: 'invalid_currency', path: 'costs[0].currency' }],
    ['a currency in lower case', (d) => (d.costs[0].currency = 'eur'), { code: 'invalid_currency', path: 'costs[0].currency' }],
    ['a missing currency', (d) => delete d.costs[0].currency, { code: 'invalid_currency', path: 'costs[0].currency' }],
    ['a negative amount', (d) => (d.costs[0].amount = -5), { code: 'not_a_number', path: 'costs[0].amount' }]
  ])('%s', (_what, change, expected) => {
    expectProblem(problemsAfter(change), expected);
  });

  it('a cost for an unknown measure close to a known one suggests it', () => {
    const p = expectProblem(problemsAfter((d) => (d.costs[0].measure = 'cutt')), { code: 'unknown_measure', path: 'costs[0].measure' });
    expect(p.message).toContain('`cut`');
  });

  it('a cost may refer to a measure by its default id', () => {
    expect(problemsAfter((d) => {
      delete d.measures[1].id;
      d.costs.push({ measure: 'm2', amount: 50, currency: 'SEK' });
    })).toEqual([]);
  });
});

describe('validateScenario(doc, model) reports document-level problems', () => {
  it.each<[string, (d: Doc) => void, Expected]>([
    ['a scenario for another model', (d) => (d.model = 'other_lake'), { code: 'wrong_model', path: 'model' }],
    ['a missing model', (d) => delete d.model, { code: 'missing_field', path: 'model' }],
    ['a missing format', (d) => delete d.format, { code: 'missing_field', path: 'format' }],
    ['a wrong format', (d) => (d.format = 'lakeledger.model/1'), { code: 'wrong_format', path: 'format' }],
    ['a missing id', (d) => delete d.id, { code: 'missing_field', path: 'id' }],
    ['an invalid id', (d) => (d.id = 'half load'), { code: 'invalid_id', path: 'id' }],
    ['an unknown solver method', (d) => (d.solver = { method: 'euler' }), { code: 'invalid_solver', path: 'solver.method' }],
    ['a negative rtol', (d) => (d.solver = { rtol: -1 }), { code: 'invalid_solver', path: 'solver.rtol' }],
    ['measures that are not a list', (d) => (d.measures = {}), { code: 'not_a_list', path: 'measures' }],
    ['an initial state that is neither model nor a run id', (d) => (d.initialState = 'warm'), { code: 'invalid_initial_state', path: 'initialState' }],
    ['a run id with too few digits', (d) => (d.initialState = 'run_12ab'), { code: 'invalid_initial_state', path: 'initialState' }],
    ['the settled start, not supported yet', (d) => (d.initialState = 'settled'), { code: 'unsupported_initial_state', path: 'initialState' }]
  ])('%s', (_what, change, expected) => {
    expectProblem(problemsAfter(change), expected);
  });

  it.each<[string, unknown]>([
    ['null', null],
    ['42', 42],
    ['[]', []],
    ['a string', 'cut_and_fish'],
    ['{}', {}],
    ['wrong shapes everywhere', { period: [], measures: [null, 3, { kind: 5 }, { kind: 'remove', repeat: 'yearly' }], costs: [null, { measure: 3 }], solver: 'fast' }]
  ])('validateScenario(%s) returns errors and does not throw', (_what, doc) => {
    let ps: Problem[] = [];
    expect(() => (ps = validateScenario(doc, model))).not.toThrow();
    expect(errors(ps).length).toBeGreaterThan(0);
  });
});

describe('validateScenario(doc, model) accepts the starts it knows', () => {
  it.each([['model'], ['run_0123456789abcdef']])('initialState %s is accepted', (start) => {
    expect(errors(problemsAfter((d) => (d.initialState = start)))).toEqual([]);
  });
});

describe('validateScenario(example, its model) for the example scenarios in static/examples', () => {
  const dir = new URL('../../../static/examples/', import.meta.url);
  const read = (f: string) => JSON.parse(readFileSync(new URL(f, dir), 'utf8'));
  const models = readdirSync(dir).filter((f) => f.endsWith('.model.json')).map(read) as ModelDoc[];
  const scenarios = readdirSync(dir).filter((f) => f.endsWith('.scenario.json'));

  it.each(scenarios)('%s names an example model and validates against it with no errors', (file) => {
    const doc = read(file);
    const own = models.find((m) => m.id === doc.model);
    expect(own, `no example model with id ${doc.model}`).toBeDefined();
    expect(errors(validateScenario(doc, own!))).toEqual([]);
  });
});
