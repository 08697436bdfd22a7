import { describe, expect, test } from 'vitest';
import { daysSince, parseCellNumber, parseDate, parseTableText } from './table-import';

describe('parseTableText with day numbers', () => {
  test('parseTableText(pasted tab-separated rows) reads days and values without a header', () => {
    const r = parseTableText('0\t4\n91\t12\n182\t21\n');
    expect(r.ok).toBe(true);
    expect([r.t, r.v]).toEqual([[0, 91, 182], [4, 12, 21]]);
    expect([r.header, r.timeKind, r.delimiter]).toEqual([false, 'days', '\t']);
  });

  test('parseTableText(CSV with a header) finds the day column and the column named after the forcing', () => {
    const r = parseTableText('site,day,Q,T\nA,0,1.5,4\nA,30,2.5,6\n', { forcingId: 'T' });
    expect(r.ok).toBe(true);
    expect([r.columns, r.timeColumn, r.valueColumn]).toEqual([['site', 'day', 'Q', 'T'], 1, 3]);
    expect([r.t, r.v]).toEqual([[0, 30], [4, 6]]);
  });

  test('parseTableText with a chosen value column reads that column', () => {
    const r = parseTableText('day,Q,T\n0,1.5,4\n30,2.5,6\n', { valueColumn: 1 });
    expect(r.v).toEqual([1.5, 2.5]);
  });

  test('parseTableText accepts decimal commas when semicolons separate the columns', () => {
    const r = parseTableText('t;v\n0;4,5\n10,5;5\n');
    expect(r.ok).toBe(true);
    expect([r.t, r.v]).toEqual([[0, 10.5], [4.5, 5]]);
  });

  test('parseTableText reports every bad row by its line number and is not ok', () => {
    const text = 't,v\n0,1\n\n5,abc\nten,2\n5,3\n8,\n4,4\n';
    const r = parseTableText(text);
    expect(r.ok).toBe(false);
    // Line 3 is empty (skipped); line 6 follows the last good row (line 2, day 0).
    expect(r.errors.map((e) => e.message)).toEqual([
      "line 4: value 'abc' is not a number",
      "line 5: 'ten' is not a number of days",
      "line 7: no value in column 'v'",
      'line 8: day 4 comes before day 5 of line 6; times must increase from row to row'
    ]);
  });

  test('parseTableText tells a decimal comma between comma-separated columns apart', () => {
    const r = parseTableText('t\tv\n0\t1\n');
    expect(r.ok).toBe(true);
    expect(parseTableText('0,"1,5"\n1,2\n').errors[0].message).toContain('decimal comma needs tabs or semicolons');
  });

  test('parseTableText refuses one column and a header without rows', () => {
    expect(parseTableText('1\n2\n').errors[0].message).toContain('one column');
    expect(parseTableText('t,v\n').errors[0].message).toContain('only a header row');
    expect(parseTableText('\n \n').errors[0].message).toBe('there are no rows to read');
  });
});

describe('parseTableText with dates', () => {
  test('dates become days since the model’s time origin, as UTC', () => {
    const r = parseTableText('date,T\n2027-01-01,4\n2027-03-01,6\n2028-01-01,4\n', { timeOrigin: '2027-01-01' });
    expect(r.ok).toBe(true);
    expect(r.t).toEqual([0, 59, 365]);
    expect([r.timeKind, r.origin, r.originAssumed, r.firstDate, r.lastDate]).toEqual(['dates', '2027-01-01', false, '2027-01-01', '2028-01-01']);
  });

  test('dates before the origin give negative days; a time of day gives a fraction', () => {
    const r = parseTableText('date,v\n2026-12-31,1\n2027-01-02T06:00,2\n01.02.2027,3\n', { timeOrigin: '2027-01-01' });
    expect(r.ok).toBe(true);
    expect(r.t).toEqual([-1, 1.25, 31]);
  });

  test('without a time origin the first date is taken and the caller is told to ask', () => {
    const r = parseTableText('2027-03-01\t5\n2027-03-11\t7\n');
    expect([r.origin, r.originAssumed, r.t]).toEqual(['2027-03-01', true, [0, 10]]);
  });

  test('bad dates, slash dates and a day number among dates are reported by line', () => {
    const r = parseTableText('date,v\n2027-01-01,1\n2027-02-30,2\n03/04/2027,3\n45,4\n2027-01-01T10:00+02:00,5\n', { timeOrigin: '2027-01-01' });
    expect(r.ok).toBe(false);
    expect(r.errors.map((e) => e.message)).toEqual([
      "line 3: '2027-02-30' is not a calendar date",
      "line 4: '03/04/2027' is ambiguous (day or month first?); write dates as YYYY-MM-DD, e.g. 2027-03-01",
      "line 5: '45' is a number, but the column holds dates (as on line 2)",
      "line 6: '2027-01-01T10:00+02:00' has a time-zone offset; give times in UTC (no offset, or Z)"
    ]);
  });

  test('a repeated date is an error naming both lines', () => {
    const r = parseTableText('2027-01-01,1\n2027-01-01,2\n', { timeOrigin: '2027-01-01' });
    expect(r.errors).toEqual([{ line: 2, message: 'line 2: 2027-01-01 (day 0) repeats 2027-01-01 (day 0) of line 1; times must increase from row to row' }]);
  });
});

describe('dates and cells', () => {
  test('parseDate(text) reads ISO dates as UTC midnight, with a BOM-free day count across a leap year', () => {
    expect(parseDate('2028-03-01')).toEqual({ ms: Date.UTC(2028, 2, 1) });
    expect(daysSince('2028-01-01', Date.UTC(2028, 2, 1))).toBe(60);
  });
  test('parseCellNumber(text, delimiter) accepts a decimal comma only where commas do not separate columns', () => {
    expect([parseCellNumber('1,5', ';'), parseCellNumber('1,5', ','), parseCellNumber('2e3', ',')]).toEqual([1.5, null, 2000]);
  });
  test('a byte-order mark at the start of a file is ignored', () => {
    expect(parseTableText('\uFEFFday,v\n0,1\n1,2\n').columns).toEqual(['day', 'v']);
  });
});
