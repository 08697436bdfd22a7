/**
 * CSV edge cases of `parseObservations`: each is read right or refused with its line. Every
 * check names its source: RFC 4180 (CSV: records, CRLF, quoting), ISO 8601-1:2019 (date and
 * time forms), RFC 3339 §5.6 (a space for T, lower-case t/z), or common practice of
 * monitoring exports and data tools where no standard speaks. All data are invented.
 */
import { describe, expect, it } from 'vitest';
import { detectDelimiter, observationDate, parseObservations, type ObservationSet } from '../../../src/lib/engine/fit/observations';
import { smallLake } from './fixtures';

/** smallLake (P in mg/m^3, Chl in ug/m^3 by role chlorophyll) with a reported Secchi depth in m. */
function lake() {
  const m = smallLake();
  m.derived!.push({ id: 'Secchi', expression: '1 m + P * 0 m^4/mg', unit: 'm', report: true, role: 'secchi' });
  return m;
}
const read = (text: string) => parseObservations(text, lake());
const problems = (s: ObservationSet) => s.problems.map((p) => [p.line, p.code]);
const point = (s: ObservationSet, date: string, variable = 'P') => s.points.find((p) => p.variable === variable && p.date === date);

describe('separator: comma by default, or the one of , ; tab of the header line', () => {
  it('reads a semicolon file (common practice: spreadsheet exports where the decimal sign is a comma)', () => {
    const s = read('date;variable;value;unit;depth\n2027-05-01;P;12.5;mg/m^3;0.5\n2027-05-02;P;0.040;mg/L;1\n');
    expect(s.problems).toEqual([]);
    expect(s.points.map((p) => [p.date, p.lines])).toEqual([
      ['2027-05-01', [2]],
      ['2027-05-02', [3]]
    ]);
    expect(s.points[0].value).toBe(12.5);
    expect(s.points[1].value).toBeCloseTo(40, 10); // 0.040 mg/L = 40 mg/m^3
  });

  it('refuses a decimal comma in a semicolon file with its line, never reading 125 or 12.5 (common practice: one decimal sign)', () => {
    const s = read('date;variable;value;unit;depth\n2027-05-01;P;12,5;mg/m^3;\n2027-05-02;P;<0,5;mg/m^3;\n2027-05-03;P;1,234.5;mg/m^3;\n2027-05-04;P;7;mg/m^3;0,5\n2027-05-05;P;8;mg/m^3;\n');
    expect(problems(s)).toEqual([
      [2, 'invalid_value'],
      [3, 'invalid_value'],
      [4, 'invalid_value'],
      [5, 'invalid_depth']
    ]);
    const m2 = s.problems[0].message;
    expect(m2).toContain("'12,5'");
    expect(m2).toMatch(/decimal comma .*not read/);
    expect(m2).toContain('decimal point (12.5)');
    expect(s.problems[3].message).toContain('(0.5)');
    expect(s.points.map((p) => [p.date, p.value])).toEqual([['2027-05-05', 8]]);
  });

  it('reads a tab-separated file (common practice: TSV exports)', () => {
    const s = read('date\tvariable\tvalue\tunit\n2027-05-01\tP\t 3.5 \tmg/m^3\n');
    expect(s.points.map((p) => [p.date, p.value])).toEqual([['2027-05-01', 3.5]]);
  });

  it('a header with none of , ; tab is one column: missing_column at line 1', () => {
    const s = read('date variable value\n2027-05-01 P 3\n');
    expect(problems(s)).toEqual([[1, 'missing_column']]);
    expect(s.problems[0].message).toContain("','");
    expect(s.problems[0].message).toContain("';'");
    expect(s.points).toEqual([]);
  });

  it('picks the separator most frequent outside quotes, comma on a tie or none (RFC 4180 §2.6: a quoted field may hold a separator)', () => {
    expect(detectDelimiter('date;variable;value\n1,2,3,4,5')).toBe(';'); // only the header line counts
    expect(detectDelimiter('"a;b;c",variable,value')).toBe(',');
    expect(detectDelimiter('date,variable;value')).toBe(',');
    expect(detectDelimiter('\n\n  \ndate\tvariable\tvalue')).toBe('\t');
    expect(detectDelimiter('date')).toBe(',');
  });

  it('a comma-separated file keeps refusing a quoted "12,5" with its line (RFC 4180 §2.6 quoting; one decimal sign)', () => {
    const s = read('date,variable,value,unit\n2027-05-01,P,"12,5",mg/m^3\n2027-05-02,P,"12.5",mg/m^3\n');
    expect(problems(s)).toEqual([[2, 'invalid_value']]);
    expect(s.problems[0].message).toMatch(/decimal comma .*not read.*decimal point \(12\.5\)/);
    expect(s.points.map((p) => [p.date, p.value])).toEqual([['2027-05-02', 12.5]]);
  });

  it('an unquoted 12,5 in a comma file splits into more fields than the header: refused, not read as 12 (RFC 4180 §2.4: same number of fields in each record)', () => {
    const s = read('date,variable,value\n2027-05-01,P,12,5\n2027-05-02,P,6,\n');
    expect(problems(s)).toEqual([[2, 'invalid_value']]);
    expect(s.problems[0].message).toContain('4 fields but the header has 3');
    expect(s.problems[0].message).toContain('decimal comma');
    // an empty field after the last column (a trailing separator) is harmless
    expect(s.points.map((p) => [p.date, p.value])).toEqual([['2027-05-02', 6]]);
  });
});

describe('dates: ISO 8601 calendar dates with an optional time of day, read as the UTC date', () => {
  it.each([
    ['2027-05-03', '2027-05-03', 'ISO 8601-1:2019 calendar date, extended format'],
    ['2027-05-03T10:30', '2027-05-03', 'ISO 8601-1:2019 date and time, hh:mm'],
    ['2027-05-03T10:30:15', '2027-05-03', 'ISO 8601-1:2019 hh:mm:ss'],
    ['2027-05-03T10:30:15.250', '2027-05-03', 'ISO 8601-1:2019 decimal fraction of a second, full stop'],
    ['2027-05-03T10:30:15,250', '2027-05-03', 'ISO 8601-1:2019 decimal fraction of a second, comma'],
    ['2027-05-03T10:30Z', '2027-05-03', 'ISO 8601-1:2019 UTC designator Z'],
    ['2027-05-03T23:30:00-02:00', '2027-05-04', 'ISO 8601-1:2019 offset −02:00: 23:30 − (−2 h) = 01:30 UTC next day'],
    ['2027-05-03T00:30+02:00', '2027-05-02', 'ISO 8601-1:2019 offset +02:00: 00:30 − 2 h = 22:30 UTC day before'],
    ['2027-12-31T23:00-01:30', '2028-01-01', 'offset across the year: 23:00 + 1:30 = 00:30 UTC'],
    ['2028-03-01T00:15+01:00', '2028-02-29', 'Gregorian leap year 2028: 23:15 UTC on 29 February'],
    ['2027-05-03T23:59:59.999+00:00', '2027-05-03', 'a fraction never moves the date (offsets are whole minutes)'],
    ['2027-05-03 10:30', '2027-05-03', 'RFC 3339 §5.6 note: a space instead of T'],
    ['2027-05-03t10:30z', '2027-05-03', 'RFC 3339 §5.6 note: lower-case t and z']
  ])('%s → %s (%s)', (text, date) => {
    expect(observationDate(text)).toEqual({ date });
  });

  it.each([
    ['20270503', /not read.*basic forms/, 'ISO 8601-1:2019 basic format: not read'],
    ['2027-W18-1', /not read.*week/, 'ISO 8601-1:2019 week date: not read'],
    ['2027-123', /not read.*ordinal/, 'ISO 8601-1:2019 ordinal date: not read'],
    ['2027-05', /not read/, 'ISO 8601-1:2019 reduced precision (a month): not read'],
    ['2027-05-03T10', /not read/, 'a time with hours only: not read'],
    ['03.05.2027', /not read.*YYYY-MM-DD/, 'common practice (a local form): not read'],
    ['2027-5-3', /not read/, 'ISO 8601-1:2019: months and days have two digits'],
    ['2027-02-30', /month 02 of 2027 has 28 days/, 'Gregorian calendar: no 30 February'],
    ['2027-02-29', /has 28 days/, 'Gregorian calendar: 2027 is no leap year'],
    ['2027-13-01', /no month 13/, 'Gregorian calendar: 12 months'],
    ['2027-04-31', /has 30 days/, 'Gregorian calendar: April has 30 days'],
    ['2027-05-03T24:61', /no such time of day/, 'ISO 8601-1:2019 hour 00–23, minute 00–59'],
    ['2027-05-03T24:00', /no such time of day/, 'hour 24 is not read'],
    ['2027-05-03T10:30:60', /no such time of day/, 'seconds 00–59 (no leap second)'],
    ['2027-05-03T10:30+25:00', /no such offset/, 'an offset hour beyond 23'],
    ['2027-05-03Z', /not read/, 'an offset without a time of day'],
    ['', /no date/, 'an empty date cell']
  ])('%s is refused (%s)', (text, message) => {
    const r = observationDate(text);
    expect('error' in r && r.error).toMatch(message as RegExp);
  });

  it('refuses each bad date with invalid_date at its line, naming the accepted forms, and reads the rest', () => {
    const s = read(['date,variable,value', '2027-05-03T23:30-02:00,P,4', '20270503,P,5', '2027-02-30,P,6', '2027-13-01,P,7', '2027-05-03T24:61,P,8', '2027-05-04,P,6'].join('\n'));
    expect(problems(s)).toEqual([
      [3, 'invalid_date'],
      [4, 'invalid_date'],
      [5, 'invalid_date'],
      [6, 'invalid_date']
    ]);
    expect(s.problems[0].message).toContain('YYYY-MM-DD');
    expect(s.problems[0].message).toContain('±hh:mm');
    // line 2 is 01:30 UTC on 4 May, so it joins line 7's 4 May: (4 + 6)/2 = 5
    expect(s.points).toHaveLength(1);
    expect(s.points[0]).toMatchObject({ date: '2027-05-04', value: 5, n: 2, lines: [2, 7] });
  });
});

describe('missing values: a row without a measurement is listed, the other rows read', () => {
  it('empty, NA, N/A, NaN and - are missing_value with their line (common practice: R NA, pandas na_values)', () => {
    const s = read(['date,variable,value,unit,flag', '2027-05-01,P,,mg/m^3,', '2027-05-02,P,NA,mg/m^3,', '2027-05-03,P,na,mg/m^3,', '2027-05-04,P,N/A,mg/m^3,', '2027-05-05,P,NaN,mg/m^3,', '2027-05-06,P,-,mg/m^3,', '2027-05-07,P,  ,mg/m^3,<DL', '2027-05-08,P,9,mg/m^3,'].join('\n'));
    expect(problems(s)).toEqual([2, 3, 4, 5, 6, 7, 8].map((l) => [l, 'missing_value']));
    expect(s.problems[0].message).toBe('P on 2027-05-01: no value; the row is not used');
    expect(s.problems[1].message).toContain("value 'NA' marks no measurement");
    expect(s.problems[6].message).toContain('the limit is not given');
    expect(s.rows).toBe(8);
    expect(s.used).toBe(1);
    expect(s.points.map((p) => [p.date, p.value, p.censored])).toEqual([['2027-05-08', 9, null]]);
  });
});

describe('detection limits and lower bounds (common practice of water-quality reporting)', () => {
  const s = read(
    [
      'date,variable,value,unit,flag',
      '2027-06-01,P,<0.5,mg/m^3,', //   2
      '2027-06-02,P,< 0.5,mg/m^3,', //  3: a space after <
      '2027-06-03,P,0.5,mg/m^3,<DL', // 4
      '2027-06-04,P,0.5,mg/m^3,below', // 5
      '2027-06-05,P,0.5,mg/m^3,bdl', // 6
      '2027-06-06,P,0.5,mg/m^3,BDL', // 7: flags in any case
      '2027-06-07,Secchi,>1.9,m,', //   8: the disk on the bottom
      '2027-06-08,Secchi,> 190,cm,', // 9
      '2027-06-09,Secchi,1.9,m,bottom', // 10
      '2027-06-10,P,<,mg/m^3,', //      11: no limit
      '2027-06-11,P,<abc,mg/m^3,', //   12
      '2027-06-12,Secchi,>,m,', //      13
      '2027-06-13,P,<<1,mg/m^3,', //    14
      '2027-06-14,P,<0.5,mg/m^3,bottom', // 15
      '2027-06-15,P,<-1,mg/m^3,', //    16
      '2027-06-16,P,1e400,mg/m^3,' //   17: not a finite number
    ].join('\n')
  );

  it('reads <x, < x and the flags <DL, below, bdl as below the limit x', () => {
    for (const d of ['2027-06-01', '2027-06-02', '2027-06-03', '2027-06-04', '2027-06-05', '2027-06-06']) {
      expect(point(s, d)).toMatchObject({ value: 0.5, censored: 'below', n: 1 });
    }
  });

  it('reads >x and the flag bottom as a lower bound of a Secchi depth (190 cm = 1.9 m)', () => {
    for (const d of ['2027-06-07', '2027-06-08', '2027-06-09']) {
      const p = point(s, d, 'Secchi')!;
      expect(p.censored).toBe('above');
      expect(p.value).toBeCloseTo(1.9, 12);
    }
  });

  it('refuses a malformed marker with its line', () => {
    expect(problems(s)).toEqual([
      [11, 'invalid_value'],
      [12, 'invalid_value'],
      [13, 'invalid_value'],
      [14, 'invalid_value'],
      [15, 'conflicting_flag'],
      [16, 'negative_value'],
      [17, 'invalid_value']
    ]);
    expect(s.problems[0].message).toContain("no detection limit after '<'");
    expect(s.problems[2].message).toContain("no bound after '>'");
    expect(s.problems[1].message).toContain("'<abc' is not a number");
    expect(s.points).toHaveLength(9);
  });
});

describe('the text around the values', () => {
  it('drops a UTF-8 byte order mark and reads CRLF with blank lines at the end (Unicode U+FEFF; RFC 4180 §2.1, §2.2)', () => {
    const s = read('\uFEFFdate,variable,value,unit\r\n2027-05-01,P,3,mg/m^3\r\n2027-05-02,P,x,mg/m^3\r\n2027-05-03,P,4,mg/m^3\r\n\r\n\r\n  \r\n');
    expect(s.ignoredColumns).toEqual([]);
    expect(problems(s)).toEqual([[3, 'invalid_value']]);
    expect(s.points.map((p) => [p.date, p.value, p.lines])).toEqual([
      ['2027-05-01', 3, [2]],
      ['2027-05-03', 4, [4]]
    ]);
    expect(s.rows).toBe(3);
  });

  it('reads old CR and mixed line endings with the same line numbers (common practice)', () => {
    const s = read('date,variable,value\r2027-05-01,P,3\n2027-05-02,P,x\r\n2027-05-03,P,4');
    expect(problems(s)).toEqual([[3, 'invalid_value']]);
    expect(s.points.map((p) => [p.date, p.lines])).toEqual([
      ['2027-05-01', [2]],
      ['2027-05-03', [4]]
    ]);
  });

  it('reads quoted fields, doubled quotes and a quoted line break, keeping file lines (RFC 4180 §2.5–§2.7)', () => {
    const s = read(['"date","variable","value","unit","note"', '"2027-05-01","P","3.5","mg/m^3","lab ""A"", room 2"', '2027-05-02,P,4,mg/m^3,"first line', 'second line"', '2027-05-03,P,bad,mg/m^3,', '2027-05-04,P,5,mg/m^3,'].join('\r\n'));
    expect(s.ignoredColumns).toEqual(['note']);
    expect(problems(s)).toEqual([[5, 'invalid_value']]); // the record on lines 3–4 counts as one row
    expect(s.points.map((p) => [p.date, p.value, p.lines])).toEqual([
      ['2027-05-01', 3.5, [2]],
      ['2027-05-02', 4, [3]],
      ['2027-05-04', 5, [6]]
    ]);
    expect(s.rows).toBe(4);
  });

  it('refuses a quote that is never closed, naming the lines it swallowed, and reads the rows before (RFC 4180 §2.5)', () => {
    const s = read('date,variable,value,note\n2027-05-01,P,3,ok\n2027-05-02,P,4,"open\n2027-05-03,P,5,\n2027-05-04,P,6,\n');
    expect(problems(s)).toEqual([[3, 'invalid_quote']]);
    expect(s.problems[0].message).toContain('lines 3–5 were read as one row') // the last line, 5, ends the file;
    expect(s.points.map((p) => p.date)).toEqual(['2027-05-01']);
  });

  it('drops spaces around values and around quoted values (common practice; RFC 4180 §2.4 would keep them)', () => {
    const s = read('  Date , Variable ,VALUE , unit \n  2027-05-01 ,  P ,  12.5  , mg/m^3 \n2027-05-02, "P" , "13.5" ,"mg/m^3"\n\t2027-05-03\t,P,< 0.5 ,mg/m^3\n');
    expect(s.problems).toEqual([]);
    expect(s.points.map((p) => [p.date, p.value, p.censored])).toEqual([
      ['2027-05-01', 12.5, null],
      ['2027-05-02', 13.5, null],
      ['2027-05-03', 0.5, 'below']
    ]);
  });

  it('counts file lines from the top when blank lines come before the header (common practice)', () => {
    const s = read('\n\ndate,variable,amount\n');
    expect(problems(s)).toEqual([[3, 'missing_column']]);
    const t = read('\n\ndate,variable,value\n2027-05-01,P,x\n');
    expect(problems(t)).toEqual([[4, 'invalid_value']]);
  });
});
