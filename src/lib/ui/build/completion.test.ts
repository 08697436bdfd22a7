import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { acceptCandidate, candidatesFor, EXPRESSION_CONTEXTS, filterCandidates, wordAt } from './completion';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));

describe('wordAt', () => {
  test.each([
    ['muPhy * kD', 10, { start: 8, end: 10, prefix: 'kD' }],
    ['muPhy * kDxx + 1', 10, { start: 8, end: 12, prefix: 'kD' }],
    ['monod(DI', 8, { start: 6, end: 8, prefix: 'DI' }],
    ['_a', 2, { start: 0, end: 2, prefix: '_a' }]
  ])('wordAt(%j, %i) is the identifier being typed', (text, caret, range) => {
    expect(wordAt(text, caret)).toEqual(range);
  });

  test.each([
    ['a + ', 4],
    ['1e5', 3],
    ['2.5e', 4],
    ['3', 1],
    ['', 0]
  ])('wordAt(%j, %i) is null outside a name or inside a number', (text, caret) => {
    expect(wordAt(text, caret)).toBeNull();
  });
});

describe('candidatesFor and filterCandidates', () => {
  const rate = candidatesFor(demo, EXPRESSION_CONTEXTS.rate);

  test('typing kD in a rate offers kDIP first, with its kind and unit', () => {
    const hits = filterCandidates('kD', rate);
    expect(hits[0]).toEqual({ name: 'kDIP', kind: 'parameter', detail: 'mg/m^3', insert: 'kDIP' });
    expect(hits.every((c) => c.name.toLowerCase().includes('kd'))).toBe(true);
  });

  test('states, forcings and derived quantities are offered in a rate, functions with a parenthesis', () => {
    expect(filterCandidates('DI', rate).map((c) => [c.name, c.kind])).toContainEqual(['DIP', 'state']);
    expect(filterCandidates('Secc', rate).map((c) => [c.name, c.kind])).toEqual([['Secchi', 'derived']]);
    expect(filterCandidates('mon', rate)[0]).toMatchObject({ name: 'monod', kind: 'function', insert: 'monod(' });
    expect(filterCandidates('t', rate).map((c) => c.name)).toContain('t');
  });

  test('a size offers parameters and functions only, and no t', () => {
    const size = candidatesFor(demo, EXPRESSION_CONTEXTS.size);
    expect(size.filter((c) => c.kind !== 'parameter' && c.kind !== 'function' && c.kind !== 'constant')).toEqual([]);
    expect(size.map((c) => c.name)).not.toContain('t');
    expect(filterCandidates('DI', size).map((c) => c.kind)).not.toContain('state');
  });

  test('a derived quantity is not offered to itself', () => {
    const own = candidatesFor(demo, { ...EXPRESSION_CONTEXTS.derived, self: 'Secchi' });
    expect(own.map((c) => c.name)).not.toContain('Secchi');
  });

  test('filterCandidates puts exact-case prefixes before other case and before substrings, and caps the list', () => {
    const all = [
      { name: 'Ka', kind: 'parameter', detail: '', insert: 'Ka' },
      { name: 'kab', kind: 'parameter', detail: '', insert: 'kab' },
      { name: 'xkay', kind: 'parameter', detail: '', insert: 'xkay' },
      { name: 'ka', kind: 'parameter', detail: '', insert: 'ka' }
    ] as const;
    expect(filterCandidates('ka', [...all]).map((c) => c.name)).toEqual(['ka', 'kab', 'Ka', 'xkay']);
    expect(filterCandidates('k', rate, 5)).toHaveLength(5);
  });

  test('nothing is offered when the word is already the only complete name, or empty', () => {
    expect(filterCandidates('kDIP', rate)).toEqual([]);
    expect(filterCandidates('', rate)).toEqual([]);
  });

  test('a draft with broken items offers only the items with usable ids', () => {
    const c = candidatesFor({ parameters: [{ id: 'ok', unit: '1' }, { id: '9x' }, null, { value: 1 }], states: 'oops' }, EXPRESSION_CONTEXTS.rate);
    expect(c.filter((x) => x.kind !== 'function' && x.kind !== 'constant').map((x) => x.name)).toEqual(['ok']);
  });
});

describe('acceptCandidate', () => {
  const kDIP = { name: 'kDIP', kind: 'parameter', detail: 'mg/m^3', insert: 'kDIP' } as const;
  const monod = { name: 'monod', kind: 'function', detail: '', insert: 'monod(' } as const;

  test('acceptCandidate replaces the whole word and puts the caret after it', () => {
    const text = 'monod(DIP, kD) * x';
    expect(acceptCandidate(text, wordAt(text, 13)!, kDIP)).toEqual({ text: 'monod(DIP, kDIP) * x', caret: 15 });
  });

  test('acceptCandidate of a function opens its parenthesis once', () => {
    expect(acceptCandidate('mon', wordAt('mon', 3)!, monod)).toEqual({ text: 'monod(', caret: 6 });
    expect(acceptCandidate('mon(DIP, k)', wordAt('mon(DIP, k)', 3)!, monod)).toEqual({ text: 'monod(DIP, k)', caret: 6 });
  });
});
