import { describe, expect, test } from 'vitest';
import type { Problem } from '$lib/engine/document/types';
import { countWords, indexProblems, messageParts } from './problem-index';

const doc = { flows: [{ id: 'a', rate: 'x' }], forcings: [{ id: 'T', table: { t: [0, 0], v: [1, 2] } }] };
const problems: Problem[] = [
  { severity: 'warning', code: 'unknown_field', path: 'flows[0].colour', id: 'a', message: "unknown field 'colour'" },
  { severity: 'error', code: 'unknown_symbol', path: 'flows[0].rate', id: 'a', message: 'unknown symbol `x`' },
  { severity: 'error', code: 'table_not_increasing', path: 'forcings[0].table.t[1]', id: 'T', message: 'times must increase' },
  { severity: 'error', code: 'not_an_object', path: '', message: 'whole document' }
];

describe('indexProblems', () => {
  const index = indexProblems(problems, doc);

  test('indexProblems(problems) lists errors before warnings, keeping their order', () => {
    expect(index.summary.map((e) => e.problem.code)).toEqual(['unknown_symbol', 'table_not_increasing', 'not_an_object', 'unknown_field']);
    expect([index.errors, index.warnings]).toEqual([3, 1]);
  });

  test('indexProblems(problems) puts each problem at its control and table cells also at their table', () => {
    expect(index.byField.get('bf-flows-0-rate')?.map((p) => p.code)).toEqual(['unknown_symbol']);
    expect(index.byField.get('bf-flows-0-id')?.map((p) => p.code)).toEqual(['unknown_field']);
    expect(index.byField.get('bf-forcings-0-table-t-1')?.map((p) => p.code)).toEqual(['table_not_increasing']);
    expect(index.byContainer.get('bf-forcings-0-table')?.length).toBe(1);
  });

  test('indexProblems(problems) says where in words and gives no target for a document problem', () => {
    expect(index.summary[0].place).toBe('Flow a, rate');
    expect(index.summary[1].target).toEqual({ field: 'bf-forcings-0-table-t-1', table: 0, container: 'bf-forcings-0-table' });
    expect(index.summary[2].target).toBeNull();
    expect(new Set(index.summary.map((e) => e.key)).size).toBe(4);
  });
});

describe('countWords', () => {
  test.each([
    [0, 0, 'No problems'],
    [1, 0, '1 error'],
    [0, 2, '2 warnings'],
    [2, 1, '2 errors and 1 warning']
  ])('countWords(%i, %i) is %j', (e, w, words) => expect(countWords(e, w)).toBe(words));
});

describe('messageParts', () => {
  test('messageParts(message) marks backticked symbols as code', () => {
    expect(messageParts('unknown symbol `kP`; did you mean `kDIP`?')).toEqual([
      { text: 'unknown symbol ', code: false },
      { text: 'kP', code: true },
      { text: '; did you mean ', code: false },
      { text: 'kDIP', code: true },
      { text: '?', code: false }
    ]);
  });
  test('messageParts(message) leaves an unmatched backtick as written', () => {
    expect(messageParts('a `b')).toEqual([
      { text: 'a ', code: false },
      { text: '`b', code: false }
    ]);
  });
});
