/**
 * parseJson(text): JSON text (RFC 8259) to a value, plus the two checks JSON.parse skips:
 * a key repeated inside one object (RFC 8259 Sect. 4 leaves duplicate names to the
 * implementation; JSON.parse silently keeps the last) is reported with its JSON path, line
 * and column, and a syntax error is reported with the line and column where it was found.
 * Lines and columns count from 1; the expected positions were worked out by hand from the
 * texts below (the first character the grammar cannot accept).
 */
import { describe, expect, it } from 'vitest';
import { parseJson } from '../../../src/lib/engine/document/json';

describe('parseJson(text) accepts valid JSON', () => {
  it.each<[string, string, unknown]>([
    ['an object', '{"a": 1, "b": [true, null, "x"]}', { a: 1, b: [true, null, 'x'] }],
    ['the same key in two different objects', '{"a": {"b": 1}, "c": {"b": 2}}', { a: { b: 1 }, c: { b: 2 } }],
    ['the same key in two list entries', '[{"id": "X"}, {"id": "X"}]', [{ id: 'X' }, { id: 'X' }]],
    ['escapes inside strings and keys', '{"a\\"b": "c\\\\d", "e": "\\u00e9"}', { 'a"b': 'c\\d', e: 'é' }],
    ['a scalar document', ' 42 ', 42],
    ['empty containers', '{"a": {}, "b": []}', { a: {}, b: [] }],
    ['white space of all four kinds', '{\t"a"\r\n:\n 1 }', { a: 1 }]
  ])('%s', (_what, text, value) => {
    expect(parseJson(text)).toEqual({ ok: true, value });
  });
});

describe('parseJson(text) reports duplicate keys with their path', () => {
  it.each<[string, string, string, number, number]>([
    ['at the top', '{"a":1,"a":2}', 'a', 1, 8],
    ['inside a list entry', '{"states":[{"id":"X","id":"Y"}]}', 'states[0].id', 1, 22],
    ['in the second list entry, on a later line', '{"flows": [\n  {"id": "f"},\n  {"id": "g", "rate": "1", "rate": "2"}\n]}', 'flows[1].rate', 3, 28],
    ['written with an escape (a\\u0062 is ab)', '{"ab": 1, "a\\u0062": 2}', 'ab', 1, 11],
    ['nested two objects deep', '{"conserved": {"unit": "kg", "element": "P", "unit": "g"}}', 'conserved.unit', 1, 46]
  ])('%s', (_what, text, path, line, column) => {
    const r = parseJson(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems).toHaveLength(1);
    expect(r.problems[0]).toMatchObject({ code: 'duplicate_key', path, line, column });
  });

  it('reports every duplicate, not only the first', () => {
    const r = parseJson('{"a": 1, "a": 2, "b": {"c": 1, "c": 2}}');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => [p.code, p.path])).toEqual([
      ['duplicate_key', 'a'],
      ['duplicate_key', 'b.c']
    ]);
  });
});

describe('parseJson(text) reports syntax errors with line and column', () => {
  it.each<[string, string, number, number]>([
    ['a missing comma between members, on line 3', '{\n  "a": 1\n  "b": 2\n}', 3, 3],
    ['a missing comma between list elements', '[1 2]', 1, 4],
    ['a trailing comma in an object', '{"a":1,}', 1, 8],
    ['a missing colon', '{"a" 1}', 1, 6],
    ['single quotes', "{'a':1}", 1, 2],
    ['an unterminated string', '"abc', 1, 5],
    ['text after the document', '{"a":1}x', 1, 8],
    ['an object that never closes', '{"a":1', 1, 7],
    ['a number with a leading zero', '{"a":01}', 1, 7]
  ])('%s', (_what, text, line, column) => {
    const r = parseJson(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems).toHaveLength(1);
    expect(r.problems[0]).toMatchObject({ code: 'json_syntax', line, column });
  });

  it.each([
    ['an empty text', ''],
    ['a bare word', 'lake'],
    ['NaN, which JSON does not have', '{"a": NaN}'],
    ['a trailing comma in a list', '[1,]']
  ])('%s → json_syntax', (_what, text) => {
    const r = parseJson(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => p.code)).toEqual(['json_syntax']);
  });
});

describe('parseJson(text) gives line and column where V8 gives no position (regressions)', () => {
  it.each([
    ['{"a": }', 1, 7],
    ['[1,]', 1, 4],
    ['{"a": tru}', 1, 7],
    ['{"a":NaN}', 1, 6],
    ['', 1, 1],
    ['{\n "x": [1, 2\n}', 3, 1]
  ])('parseJson(%j) reports line %i, column %i and does not echo the document', (text, line, column) => {
    const r = parseJson(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems[0].code).toBe('json_syntax');
    expect(r.problems[0].line).toBe(line);
    expect(r.problems[0].column).toBe(column);
    expect(r.problems[0].message).not.toContain('\n');
  });

  it('parseJson(text) ignores a leading byte-order mark (RFC 8259, section 8.1)', () => {
    const r = parseJson('\uFEFF{"a": 1}');
    expect(r.ok && (r.value as { a: number }).a).toBe(1);
  });
});
