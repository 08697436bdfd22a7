import { describe, expect, test } from 'vitest';
import { analyzeModel } from '$lib/engine/document/validate-model';
import { numberFieldText, parseNumberText, textMatchesValue } from './number-text';

describe('parseNumberText', () => {
  test.each([
    ['3.8e6', 3.8e6],
    [' -0.5 ', -0.5],
    ['.25', 0.25],
    ['1.', 1],
    ['+2E-3', 0.002]
  ])('parseNumberText(%j) reads the number %d', (text, value) => {
    expect(parseNumberText(text)).toEqual({ kind: 'number', value });
  });

  test.each(['abc', '1,5', '0x10', 'Infinity', '1e999', '1e', '5 mg'])('parseNumberText(%j) keeps the text as typed', (text) => {
    expect(parseNumberText(text)).toEqual({ kind: 'text', value: text });
  });

  test('parseNumberText of blank text is empty', () => {
    expect(parseNumberText('  ')).toEqual({ kind: 'empty' });
  });

  test('a value typed as text makes the engine report not_a_number at that field', () => {
    const entry = parseNumberText('abc');
    const doc = {
      format: 'lakeledger.model/1', id: 'm', conserved: { element: 'P', unit: 'kg' },
      parameters: [{ id: 'V', value: entry.kind === 'text' ? entry.value : 0, unit: 'm^3' }],
      states: [{ id: 'S', unit: 'kg/m^3', initial: 1, size: 'V' }], flows: []
    };
    const p = analyzeModel(doc).problems;
    expect(p.map((x) => [x.code, x.path])).toEqual([['not_a_number', 'parameters[0].value']]);
    expect(p[0].message).toContain("'abc'");
  });
});

describe('numberFieldText and textMatchesValue', () => {
  test('numberFieldText(value) shows numbers, typed text and nothing', () => {
    expect([numberFieldText(3800000), numberFieldText('abc'), numberFieldText(undefined), numberFieldText(1e-7)]).toEqual(['3800000', 'abc', '', '1e-7']);
  });
  test('textMatchesValue keeps `1.` and `1.50` while the draft holds 1 and 1.5', () => {
    expect(textMatchesValue('1.', 1)).toBe(true);
    expect(textMatchesValue('1.50', 1.5)).toBe(true);
    expect(textMatchesValue('1.5', 2)).toBe(false);
    expect(textMatchesValue('', undefined)).toBe(true);
    expect(textMatchesValue('ab', 'ab')).toBe(true);
  });
});
