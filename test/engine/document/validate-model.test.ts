/**
 * validateModel(doc): every problem of a model document comes back as data with a stable
 * code, the JSON path, the item's id and a severity; nothing throws, whatever the input.
 * Tests check codes and places, not wording (shared/design/style.md, principles 5-7); the
 * few message checks below look only for the names a modeller needs to see (the suggested
 * id, the units involved), never for whole sentences.
 *
 * The base model is invented: a pond of one million m^3 with dissolved P taken up by
 * phytoplankton, a seasonal temperature table and nothing else.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { validateModel } from '../../../src/lib/engine';
import type { Problem } from '../../../src/lib/engine';

type Doc = any;

function baseModel(): Doc {
  return {
    format: 'lakeledger.model/1',
    id: 'pond',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 1e6, unit: 'm^3' },
      { id: 'A', value: 2e5, unit: 'm^2' },
      { id: 'k1', value: 0.1, unit: '1/d' },
      { id: 'kDIP', value: 3, unit: 'mg/m^3' },
      { id: 'theta', value: 1.07, unit: '1' }
    ],
    forcings: [{ id: 'T', unit: 'degC', table: { t: [0, 100, 200], v: [4, 20, 10] } }],
    states: [
      { id: 'DIP', unit: 'mg/m^3', initial: 10, size: 'V' },
      { id: 'PHY', unit: 'mg/m^3', initial: 1, size: 'V' }
    ],
    flows: [{ id: 'up', from: 'DIP', to: 'PHY', rate: 'k1 * DIP' }]
  };
}

function problemsAfter(change: (d: Doc) => void): Problem[] {
  const d = baseModel();
  change(d);
  return validateModel(d);
}

const errors = (ps: Problem[]) => ps.filter((p) => p.severity === 'error');
/** The message with blanks removed, so `mg / m^3` and `mg/m^3` read the same. */
const squeeze = (s: string) => s.replace(/\s+/g, '');

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
  expect(hit!.document).toBe('model');
  expect(typeof hit!.message).toBe('string');
  expect(hit!.message.length).toBeGreaterThan(0);
  return hit!;
}

describe('validateModel(doc) on the base model', () => {
  it('validateModel(base model) reports nothing', () => {
    expect(validateModel(baseModel())).toEqual([]);
  });
});

describe('validateModel(doc) reports a bad rate expression at flows[0].rate with the flow id', () => {
  // [what, rate, code]; every symbol used is declared, so only the named construct is wrong.
  it.each([
    ['a syntax error', 'k1 * (DIP', 'syntax_error'],
    ['an empty rate', '   ', 'empty_expression'],
    ['property access', 'k1.b * DIP', 'forbidden_construct'],
    ['a function definition', 'f(x) = x', 'forbidden_construct'],
    ['an assignment', 'a = 2', 'forbidden_construct'],
    ['a matrix', '[1, 2] * k1', 'forbidden_construct'],
    ['a string', '"k1 * DIP"', 'forbidden_construct'],
    ['several statements', 'k1 * DIP; 2', 'forbidden_construct'],
    ['a chained comparison', 'k1 * DIP * (1 < DIP < 3)', 'forbidden_construct'],
    ['the modulo operator', 'k1 * (DIP mod kDIP)', 'forbidden_operator'],
    ['unit conversion with to', 'DIP to cm', 'forbidden_operator'],
    ['the transpose operator', "k1' * DIP", 'forbidden_operator'],
    ['implicit multiplication', 'k1 DIP', 'implicit_multiplication'],
    ['a number glued to a unit name', 'k1 * DIP * 2 cm', 'implicit_multiplication'],
    ['an unknown function', 'k1 * foo(DIP)', 'unknown_function'],
    ['a function with the wrong number of arguments', 'k1 * sqrt(DIP, 2)', 'wrong_arity'],
    ['the constant NaN', 'k1 * DIP * NaN', 'forbidden_construct'],
    ['the constant true', 'k1 * DIP * true', 'forbidden_construct']
  ])('%s (%s) → %s', (_what, rate, code) => {
    const ps = problemsAfter((d) => (d.flows[0].rate = rate));
    expect(errors(ps).map((p) => p.code)).toEqual([code]);
    expectProblem(ps, { code, path: 'flows[0].rate', id: 'up' });
  });

  it('implicit multiplication `k1 Xa` is refused with code implicit_multiplication naming both factors', () => {
    const ps = problemsAfter((d) => {
      d.states.push({ id: 'Xa', unit: 'mg/m^3', initial: 1, size: 'V' });
      d.flows[0].rate = 'k1 Xa';
    });
    const p = expectProblem(ps, { code: 'implicit_multiplication', path: 'flows[0].rate', id: 'up' });
    expect(p.message).toContain('k1');
    expect(p.message).toContain('Xa');
  });

  it('a rate that is not text (a number) → not_an_expression', () => {
    const ps = problemsAfter((d) => (d.flows[0].rate = 0.5));
    expectProblem(ps, { code: 'not_an_expression', path: 'flows[0].rate', id: 'up' });
  });
});

describe('validateModel(doc) reports unknown symbols', () => {
  it('an unknown symbol close to a declared one → unknown_symbol with that id suggested', () => {
    const ps = problemsAfter((d) => (d.flows[0].rate = 'k1 * DIP * DIP / kDIPx'));
    const p = expectProblem(ps, { code: 'unknown_symbol', path: 'flows[0].rate', id: 'up' });
    expect(p.message).toContain('kDIPx');
    expect(p.message).toContain('`kDIP`');
  });

  it('an unknown symbol far from every declared one → unknown_symbol with no declared id suggested', () => {
    const ps = problemsAfter((d) => (d.flows[0].rate = 'k1 * DIP * zooplanktonWeight'));
    const p = expectProblem(ps, { code: 'unknown_symbol', path: 'flows[0].rate', id: 'up' });
    for (const id of ['kDIP', 'theta', 'DIP', 'PHY']) expect(p.message).not.toContain(`\`${id}\``);
  });

  it('a state in a size expression (sizes read parameters only) → symbol_not_allowed', () => {
    const ps = problemsAfter((d) => (d.states[1].size = 'V * DIP / DIP'));
    expectProblem(ps, { code: 'symbol_not_allowed', path: 'states[1].size', id: 'PHY' });
  });
});

describe('validateModel(doc) reports duplicate and invalid ids', () => {
  it('validateModel(doc) reports a duplicate id across kinds (a parameter and a state) at the second one', () => {
    const ps = problemsAfter((d) => d.states.push({ id: 'k1', unit: 'mg/m^3', initial: 1, size: 'V' }));
    expectProblem(ps, { code: 'duplicate_id', path: 'states[2].id', id: 'k1' });
  });

  it('a flow with the id of a derived quantity → duplicate_id at the flow', () => {
    const ps = problemsAfter((d) => {
      d.derived = [{ id: 'fT', expression: 'theta^(T - 20)', unit: '1' }];
      d.flows[0].id = 'fT';
    });
    expectProblem(ps, { code: 'duplicate_id', path: 'flows[0].id', id: 'fT' });
  });

  it.each(['t', 'pi', 'e', 'i', 'mod', 'to', 'NaN', 'exp', 'constructor', '__proto__', 'prototype', 'class'])(
    'the reserved id %s → invalid_id',
    (id) => {
      const ps = problemsAfter((d) => d.parameters.push({ id, value: 1, unit: '1' }));
      expect(errors(ps).map((p) => p.code)).toEqual(['invalid_id']);
      expectProblem(ps, { code: 'invalid_id', path: 'parameters[5].id', id });
    }
  );

  it.each(['2x', 'a-b', 'a b', '', 'k€'])('the id %j, against the id pattern → invalid_id', (id) => {
    const ps = problemsAfter((d) => d.parameters.push({ id, value: 1, unit: '1' }));
    expect(errors(ps).map((p) => p.code)).toEqual(['invalid_id']);
    expectProblem(ps, { code: 'invalid_id', path: 'parameters[5].id' });
  });

  it('an id that is not a string → invalid_id', () => {
    const ps = problemsAfter((d) => (d.states[1].id = 7));
    expectProblem(ps, { code: 'invalid_id', path: 'states[1].id' });
  });
});

describe('validateModel(doc) reports unit problems', () => {
  it('a flow rate in mg/m^3 for a mg/m^3 state (missing /d) → unit_mismatch showing both units', () => {
    const ps = problemsAfter((d) => (d.flows[0].rate = 'DIP'));
    const p = expectProblem(ps, { code: 'unit_mismatch', path: 'flows[0].rate', id: 'up' });
    const m = squeeze(p.message);
    expect(m).toContain('mg/m^3/d');
    expect(m.replace('mg/m^3/d', '')).toContain('mg/m^3');
  });

  it('adding mg/m^3 to 1/d → unit_mismatch naming both operands and the concentration unit', () => {
    const ps = problemsAfter((d) => (d.flows[0].rate = 'k1 * (DIP + k1)'));
    const p = expectProblem(ps, { code: 'unit_mismatch', path: 'flows[0].rate', id: 'up' });
    expect(p.message).toContain('DIP');
    expect(p.message).toContain('k1');
    expect(squeeze(p.message)).toContain('mg/m^3');
  });

  it('a state whose unit × size is not an amount of the conserved unit (mg/m^3 over an area) → unit_mismatch at its size', () => {
    const ps = problemsAfter((d) => (d.states[0].size = 'A'));
    expectProblem(ps, { code: 'unit_mismatch', path: 'states[0].size', id: 'DIP' });
  });

  it('an areal density (g/m^2) sized by an area is an amount of kg and validates', () => {
    const ps = problemsAfter((d) => {
      d.states.push({ id: 'SED', unit: 'g/m^2', initial: 2, size: 'A' });
      d.flows.push({ id: 'settle', from: 'PHY', to: 'SED', rate: 'k1 * PHY' });
    });
    expect(ps).toEqual([]);
  });

  it('log of a quantity with a unit → unit_mismatch', () => {
    const ps = problemsAfter((d) => (d.derived = [{ id: 'L', expression: 'log(DIP)', unit: '1' }]));
    expectProblem(ps, { code: 'unit_mismatch', path: 'derived[0].expression', id: 'L' });
  });

  it('log of a ratio of like quantities validates', () => {
    const ps = problemsAfter((d) => (d.derived = [{ id: 'L', expression: 'log(DIP / kDIP)', unit: '1' }]));
    expect(ps).toEqual([]);
  });

  it('an exponent with a unit (theta^k1, k1 in 1/d) → unit_mismatch', () => {
    const ps = problemsAfter((d) => (d.derived = [{ id: 'L', expression: 'theta^k1', unit: '1' }]));
    expectProblem(ps, { code: 'unit_mismatch', path: 'derived[0].expression', id: 'L' });
  });

  it('a non-constant exponent on a base with a unit (X^k, k a state) → exponent_not_constant', () => {
    const ps = problemsAfter((d) => {
      d.states.push({ id: 'K', unit: '1', initial: 1, size: 'V', conserved: false });
      d.derived = [{ id: 'L', expression: 'DIP^K', unit: 'mg/m^3' }];
    });
    expectProblem(ps, { code: 'exponent_not_constant', path: 'derived[0].expression', id: 'L' });
  });

  it('a parameter exponent on a base with a unit is accepted, with the unit raised to it', () => {
    const ps = problemsAfter((d) => {
      d.parameters.push({ id: 'two', value: 2, unit: '1' });
      d.derived = [{ id: 'L', expression: 'DIP^two / kDIP', unit: 'mg/m^3' }];
    });
    expect(ps).toEqual([]);
  });

  it('a derived quantity whose expression does not have its declared unit → unit_mismatch', () => {
    const ps = problemsAfter((d) => (d.derived = [{ id: 'TP', expression: 'DIP + PHY', unit: 'g/m^2' }]));
    expectProblem(ps, { code: 'unit_mismatch', path: 'derived[0].expression', id: 'TP' });
  });

  it('temperature in degC is a plain number: theta^(T - 20) validates', () => {
    const ps = problemsAfter((d) => {
      d.derived = [{ id: 'fT', expression: 'theta^(T - 20)', unit: '1' }];
      d.flows[0].rate = 'k1 * fT * DIP';
    });
    expect(ps).toEqual([]);
  });

  it('1/yr and 1/d are the same dimension: a rate constant in 1/yr validates', () => {
    const ps = problemsAfter((d) => {
      d.parameters.push({ id: 'kYear', value: 36, unit: '1/yr' });
      d.flows[0].rate = 'kYear * DIP';
    });
    expect(ps).toEqual([]);
  });

  it('ug/L and mg/m^3 are interchangeable (a ug/L state, a sum in both units)', () => {
    const ps = problemsAfter((d) => {
      d.states[1].unit = 'ug/L';
      d.derived = [
        { id: 'TPa', expression: 'DIP + PHY', unit: 'ug/L' },
        { id: 'TPb', expression: 'PHY + DIP', unit: 'mg/m^3' }
      ];
    });
    expect(ps).toEqual([]);
  });

  it.each([
    ['a word that is no unit', 'furlongs'],
    ['a quantity instead of a unit', '2 m'],
    ['an empty unit', ''],
    ['a number instead of text', 5]
  ])('a parameter unit that is %s → invalid_unit', (_what, unit) => {
    const ps = problemsAfter((d) => (d.parameters[4].unit = unit));
    expectProblem(ps, { code: 'invalid_unit', path: 'parameters[4].unit', id: 'theta' });
  });
});

describe('validateModel(doc) reports dependency cycles among derived quantities', () => {
  it('a → b → a → one dependency_cycle error at the first of them', () => {
    const ps = problemsAfter(
      (d) =>
        (d.derived = [
          { id: 'a', expression: 'b + 1', unit: '1' },
          { id: 'b', expression: 'a * 2', unit: '1' }
        ])
    );
    expect(errors(ps).filter((p) => p.code === 'dependency_cycle')).toHaveLength(1);
    const p = expectProblem(ps, { code: 'dependency_cycle', path: 'derived[0].expression', id: 'a' });
    expect(p.message).toContain('a');
    expect(p.message).toContain('b');
  });

  it('a self-reference (a = a + 1) → dependency_cycle', () => {
    const ps = problemsAfter((d) => (d.derived = [{ id: 'a', expression: 'a + 1', unit: '1' }]));
    expectProblem(ps, { code: 'dependency_cycle', path: 'derived[0].expression', id: 'a' });
  });

  it('derived quantities listed before what they read are ordered, not refused', () => {
    const ps = problemsAfter(
      (d) =>
        (d.derived = [
          { id: 'c', expression: 'b * 2', unit: '1' },
          { id: 'b', expression: 'a + 1', unit: '1' },
          { id: 'a', expression: 'DIP / kDIP', unit: '1' }
        ])
    );
    expect(ps).toEqual([]);
  });
});

describe('validateModel(doc) reports flows with bad ends', () => {
  it.each<[string, (d: Doc) => void, Expected]>([
    ['a flow from and to the same state', (d) => (d.flows[0].to = 'DIP'), { code: 'flow_self', path: 'flows[0]', id: 'up' }],
    [
      'a flow with neither from nor to',
      (d) => {
        delete d.flows[0].from;
        delete d.flows[0].to;
      },
      { code: 'flow_no_end', path: 'flows[0]', id: 'up' }
    ],
    ['an unknown to state', (d) => (d.flows[0].to = 'PHX'), { code: 'unknown_state', path: 'flows[0].to', id: 'up' }],
    ['a from that names a parameter', (d) => (d.flows[0].from = 'k1'), { code: 'unknown_state', path: 'flows[0].from', id: 'up' }],
    ['a to that is not text', (d) => (d.flows[0].to = ['PHY']), { code: 'unknown_state', path: 'flows[0].to', id: 'up' }],
    [
      'a flow between a conserved and a non-conserved state',
      (d) => (d.states[1].conserved = false),
      { code: 'flow_mixed_conservation', path: 'flows[0]', id: 'up' }
    ]
  ])('%s', (_what, change, expected) => {
    const ps = problemsAfter(change);
    expect(errors(ps)).toHaveLength(1);
    expectProblem(ps, expected);
  });

  it('an unknown to state close to a declared one suggests it', () => {
    const ps = problemsAfter((d) => (d.flows[0].to = 'PHX'));
    const p = expectProblem(ps, { code: 'unknown_state', path: 'flows[0].to', id: 'up' });
    expect(p.message).toContain('PHY');
  });

  it('a flow among non-conserved states validates (it is kept out of the books)', () => {
    const ps = problemsAfter((d) => {
      d.parameters.push({ id: 'kf', value: 0.01, unit: '1/d' });
      d.states.push({ id: 'FRY', unit: '1', initial: 100, size: 'V', conserved: false });
      d.states.push({ id: 'ADULT', unit: '1', initial: 10, size: 'V', conserved: false });
      d.flows.push({ id: 'grow', from: 'FRY', to: 'ADULT', rate: 'kf * FRY' });
    });
    expect(ps).toEqual([]);
  });
});

describe('validateModel(doc) reports bad forcing tables', () => {
  it.each<[string, { t: unknown; v: unknown }, Expected]>([
    ['decreasing times', { t: [0, 100, 50], v: [1, 2, 3] }, { code: 'table_not_increasing', path: 'forcings[0].table.t[2]', id: 'T' }],
    ['a repeated time', { t: [0, 100, 100], v: [1, 2, 3] }, { code: 'table_not_increasing', path: 'forcings[0].table.t[2]', id: 'T' }],
    ['t and v of unequal length', { t: [0, 100], v: [1, 2, 3] }, { code: 'invalid_table', path: 'forcings[0].table', id: 'T' }],
    ['an empty table', { t: [], v: [] }, { code: 'invalid_table', path: 'forcings[0].table.t', id: 'T' }],
    ['a value that is null', { t: [0, 100], v: [1, null] }, { code: 'not_a_number', path: 'forcings[0].table.v[1]', id: 'T' }],
    ['a time given as text', { t: [0, '100'], v: [1, 2] }, { code: 'not_a_number', path: 'forcings[0].table.t[1]', id: 'T' }],
    ['t that is not a list', { t: 'daily', v: [1] }, { code: 'invalid_table', path: 'forcings[0].table', id: 'T' }]
  ])('%s', (_what, table, expected) => {
    const ps = problemsAfter((d) => (d.forcings[0].table = table));
    expectProblem(ps, expected);
  });

  it('a forcing with both a table and an expression → forcing_source', () => {
    const ps = problemsAfter((d) => (d.forcings[0].expression = '12'));
    expectProblem(ps, { code: 'forcing_source', path: 'forcings[0]', id: 'T' });
  });

  it('a table that spans more than its period → invalid_period', () => {
    const ps = problemsAfter((d) => (d.forcings[0].period = 150));
    expectProblem(ps, { code: 'invalid_period', path: 'forcings[0].period', id: 'T' });
  });

  it('an interpolation other than linear or step → invalid_interpolation', () => {
    const ps = problemsAfter((d) => (d.forcings[0].interpolation = 'cubic'));
    expectProblem(ps, { code: 'invalid_interpolation', path: 'forcings[0].interpolation', id: 'T' });
  });
});

describe('validateModel(doc) reports values that are not finite numbers', () => {
  it.each<[string, (d: Doc) => void, Expected]>([
    ['an initial value given as text ("40")', (d) => (d.states[0].initial = '40'), { code: 'not_a_number', path: 'states[0].initial', id: 'DIP' }],
    ['an initial value null (what JSON makes of NaN)', (d) => (d.states[0].initial = null), { code: 'not_a_number', path: 'states[0].initial', id: 'DIP' }],
    ['a parameter value null', (d) => (d.parameters[0].value = null), { code: 'not_a_number', path: 'parameters[0].value', id: 'V' }],
    ['a parameter value given as a list', (d) => (d.parameters[2].value = [0.1]), { code: 'not_a_number', path: 'parameters[2].value', id: 'k1' }],
    ['a parameter value Infinity', (d) => (d.parameters[2].value = Infinity), { code: 'not_a_number', path: 'parameters[2].value', id: 'k1' }]
  ])('%s → not_a_number', (_what, change, expected) => {
    expectProblem(problemsAfter(change), expected);
  });

  it('a size that evaluates to zero → size_not_positive', () => {
    const ps = problemsAfter((d) => (d.states[0].size = 'V - V'));
    expectProblem(ps, { code: 'size_not_positive', path: 'states[0].size', id: 'DIP' });
  });
});

describe('validateModel(doc) reports missing required fields as missing_field at their path', () => {
  it.each<[string, (d: Doc) => void, string]>([
    ['format', (d) => delete d.format, 'format'],
    ['id', (d) => delete d.id, 'id'],
    ['conserved', (d) => delete d.conserved, 'conserved'],
    ['conserved.element', (d) => delete d.conserved.element, 'conserved.element'],
    ['conserved.unit', (d) => delete d.conserved.unit, 'conserved.unit'],
    ['parameters', (d) => delete d.parameters, 'parameters'],
    ['states', (d) => delete d.states, 'states'],
    ['flows', (d) => delete d.flows, 'flows'],
    ['a parameter id', (d) => delete d.parameters[4].id, 'parameters[4].id'],
    ['a parameter value', (d) => delete d.parameters[0].value, 'parameters[0].value'],
    ['a parameter unit', (d) => delete d.parameters[0].unit, 'parameters[0].unit'],
    ['a state unit', (d) => delete d.states[1].unit, 'states[1].unit'],
    ['a state initial value', (d) => delete d.states[1].initial, 'states[1].initial'],
    ['a state size', (d) => delete d.states[1].size, 'states[1].size'],
    ['a flow rate', (d) => delete d.flows[0].rate, 'flows[0].rate'],
    ['a flow id', (d) => delete d.flows[0].id, 'flows[0].id'],
    ['a forcing unit', (d) => delete d.forcings[0].unit, 'forcings[0].unit'],
    ['a derived expression', (d) => (d.derived = [{ id: 'x', unit: '1' }]), 'derived[0].expression']
  ])('missing %s', (_what, change, path) => {
    expectProblem(problemsAfter(change), { code: 'missing_field', path });
  });

  it('a wrong format tag → wrong_format', () => {
    expectProblem(problemsAfter((d) => (d.format = 'lakeledger.model/2')), { code: 'wrong_format', path: 'format' });
  });

  it('an empty list of states → no_states', () => {
    expectProblem(problemsAfter((d) => {
      d.states = [];
      d.flows = [];
    }), { code: 'no_states', path: 'states' });
  });

  it('a list given as an object keyed by id → not_a_list', () => {
    expectProblem(problemsAfter((d) => (d.parameters = { V: { value: 1, unit: 'm^3' } })), { code: 'not_a_list', path: 'parameters' });
  });

  it('a list entry that is not an object → not_an_object at the entry', () => {
    expectProblem(problemsAfter((d) => d.flows.push('k1 * DIP')), { code: 'not_an_object', path: 'flows[1]' });
  });
});

describe('validateModel(doc) warns about unknown fields and names the nearest known one', () => {
  it.each<[string, (d: Doc) => void, string, string, string | undefined]>([
    ['"intial" in a state', (d) => (d.states[0].intial = 3), 'states[0].intial', 'initial', 'DIP'],
    ['"rat" in a flow', (d) => (d.flows[0].rat = 'x'), 'flows[0].rat', 'rate', 'up'],
    ['"parameter" at the top', (d) => (d.parameter = []), 'parameter', 'parameters', undefined],
    ['"vaule" in a parameter', (d) => (d.parameters[0].vaule = 1), 'parameters[0].vaule', 'value', 'V']
  ])('%s → unknown_field warning suggesting %s', (_what, change, path, near, id) => {
    const ps = problemsAfter(change);
    expect(errors(ps)).toEqual([]);
    const p = expectProblem(ps, { code: 'unknown_field', path, severity: 'warning', ...(id ? { id } : {}) });
    expect(p.message).toContain(`'${near}'`);
  });
});

describe('validateModel(doc) never throws', () => {
  const garbage: [string, unknown][] = [
    ['null', null],
    ['undefined', undefined],
    ['42', 42],
    ['a string', 'lakeledger.model/1'],
    ['true', true],
    ['[]', []],
    ['{}', {}],
    ['{ format: 1 }', { format: 1 }],
    ['lists of the wrong things', { parameters: 5, states: {}, flows: [1, null, 'x', [], {}] }],
    [
      'every field of the wrong type',
      {
        format: 'lakeledger.model/1',
        id: ['m'],
        timeOrigin: 20270101,
        conserved: 'kg',
        parameters: [{ id: {}, value: [], unit: 5, range: 'wide' }],
        forcings: [{ id: 'F', unit: '1', table: { t: 'a', v: null } }, { id: 'G', unit: '1' }],
        states: [{ id: 'X', unit: 'kg', initial: {}, size: 7, conserved: 'yes', initialRange: { min: 'a' } }],
        derived: [{ id: 'd', expression: 5, unit: '1', report: 'yes' }],
        flows: [{ id: 'f', from: 3, to: {}, rate: 9 }]
      }
    ],
    ['an object without a prototype', Object.assign(Object.create(null), { format: 'lakeledger.model/1', id: 'm' })],
    ['a __proto__ key from JSON.parse', JSON.parse('{"__proto__": {"id": "x"}, "format": "lakeledger.model/1"}')]
  ];

  it.each(garbage)('validateModel(%s) returns errors, each with a code and a path', (_what, doc) => {
    let ps: Problem[] = [];
    expect(() => (ps = validateModel(doc))).not.toThrow();
    expect(errors(ps).length).toBeGreaterThan(0);
    for (const p of ps) {
      expect(typeof p.code).toBe('string');
      expect(typeof p.path).toBe('string');
      expect(['error', 'warning']).toContain(p.severity);
    }
  });

  it('validateModel(doc) does not throw when any one value of the base model is replaced by null, 42, "x", [] or {}', () => {
    const replacements: unknown[] = [null, 42, 'x', [], {}];
    // Walk every value of the base model by its path.
    const paths: (string | number)[][] = [];
    const walk = (v: unknown, path: (string | number)[]) => {
      if (path.length) paths.push(path);
      if (Array.isArray(v)) v.forEach((x, i) => walk(x, [...path, i]));
      else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
    };
    walk(baseModel(), []);
    expect(paths.length).toBeGreaterThan(40);
    for (const path of paths) {
      for (const r of replacements) {
        const d = baseModel();
        let o = d;
        for (const k of path.slice(0, -1)) o = o[k];
        o[path[path.length - 1]] = r;
        expect(() => validateModel(d), `${path.join('.')} = ${JSON.stringify(r)}`).not.toThrow();
      }
    }
  });
});

describe('validateModel(example) for the example models in static/examples', () => {
  const dir = new URL('../../../static/examples/', import.meta.url);
  const files = readdirSync(dir).filter((f) => f.endsWith('.model.json'));

  it('finds the example models', () => {
    expect(files).toEqual(expect.arrayContaining(['one-box.model.json', 'closed-npzd.model.json']));
  });

  it.each(files)('%s validates with no errors', (file) => {
    const doc = JSON.parse(readFileSync(new URL(file, dir), 'utf8'));
    expect(errors(validateModel(doc))).toEqual([]);
  });
});
