import { describe, expect, it } from 'vitest';
import { parseObservations } from '../../../src/lib/engine/fit/observations';
import { smallLake } from './fixtures';

const csv = [
  'date,variable,value,unit,depth,station,flag,note',
  '2027-05-01,P,0.040,mg/L,0.5,N,,lab A', // line 2: 0.040 mg/L = 40 mg/m^3
  '2027-05-01,P,30,ug/L,0.5,S,,', //         line 3: ug/L = mg/m^3
  '2027-05-01,P,44,mg/m^3,4,N,,deep', //     line 4
  '2027-06-01,P,<5,mg/m^3,0.5,N,,', //       line 5: below a limit of 5
  '2027-06-01,P,9,mg/m^3,0.5,S,,', //        line 6
  '2027-07-01,P,2,mg/m^3,0.5,N,<DL,', //     line 7: flagged below
  '',
  '2027-02-30,P,3,mg/m^3,,,,', //            line 9: no such date
  '2027-08-01,P,abc,mg/m^3,,,,', //          line 10
  '2027-08-01,PX,3,mg/m^3,,,,', //           line 11: unknown variable
  '2027-08-01,P,3,kg,,,,', //                line 12: wrong dimension
  '2027-08-01,chlorophyll,12,ug/L,,,,', //   line 13: by role; ug/L = ug/m^3 × 1000
  '2027-08-01,P,3,mg/m^3,,,weird,', //       line 14: unknown flag
  '2027-09-01,P,<4,mg/m^3,,N,,', //          line 15
  '2027-09-01,P,>6,mg/m^3,,S,,' //           line 16: mixed with a below
].join('\n');

describe('parseObservations', () => {
  const set = parseObservations(csv, smallLake());

  it('lists every unreadable row with its line and reason', () => {
    expect(set.problems.map((p) => [p.line, p.code])).toEqual([
      [9, 'invalid_date'],
      [10, 'invalid_value'],
      [11, 'unknown_variable'],
      [12, 'unit_mismatch'],
      [14, 'invalid_flag'],
      [15, 'mixed_censoring']
    ]);
    expect(set.problems.find((p) => p.line === 11)!.message).toContain("'PX'");
    expect(set.rows).toBe(14);
    expect(set.ignoredColumns).toEqual(['note']);
  });

  it('converts units and averages stations and depths (hand: (40 + 30 + 44)/3 = 38)', () => {
    const may = set.points.find((p) => p.variable === 'P' && p.date === '2027-05-01')!;
    expect(may.value).toBeCloseTo(38, 10);
    expect(may.n).toBe(3);
    expect(may.censored).toBeNull();
    expect(may.stations).toEqual(['N', 'S']);
    expect(may.lines).toEqual([2, 3, 4]);
  });

  it('a mean with a below-limit value enters it at the limit and is an upper bound: (5 + 9)/2 = 7, below', () => {
    const june = set.points.find((p) => p.date === '2027-06-01')!;
    expect(june.value).toBe(7);
    expect(june.censored).toBe('below');
    const july = set.points.find((p) => p.date === '2027-07-01')!;
    expect(july).toMatchObject({ value: 2, censored: 'below' });
  });

  it('maps a role name to the reported series and converts ug/L to ug/m^3', () => {
    const chl = set.points.find((p) => p.variable === 'Chl')!;
    expect(chl.value).toBeCloseTo(12000, 8);
    expect(set.variables.Chl.names).toEqual(['chlorophyll']);
  });

  it('keeps one station and a depth limit when asked, counting what it leaves out', () => {
    const s = parseObservations(csv, smallLake(), { combine: 'station', station: 'N', maxDepth: 1 });
    const may = s.points.find((p) => p.variable === 'P' && p.date === '2027-05-01')!;
    expect(may.value).toBeCloseTo(40, 10);
    expect(s.filtered.station).toBeGreaterThan(0);
    expect(s.filtered.depth).toBe(1);
  });

  it('marks a Secchi reading on the bottom as above, from the flag or a > prefix', () => {
    const m = smallLake();
    m.derived!.push({ id: 'Secchi', expression: '1 m + P * 0 m^4/mg', unit: 'm', report: true, role: 'secchi' });
    const s = parseObservations('date,variable,value,unit,flag\n2027-07-01,Secchi,1.9,m,bottom\n2027-07-02,secchi,>1.9,m,\n2027-07-03,Secchi,190,cm,\n', m);
    expect(s.problems).toEqual([]);
    expect(s.points.map((p) => p.censored)).toEqual(['above', 'above', null]);
    for (const p of s.points) expect(p.value).toBeCloseTo(1.9, 12); // 190 cm = 1.9 m
  });

  it('an explicit map wins, and a header without value is refused at line 1', () => {
    const s = parseObservations('date,variable,value\n2027-01-05,totP,7\n', smallLake(), { map: { totP: 'P' } });
    expect(s.points).toHaveLength(1);
    expect(s.points[0].variable).toBe('P');
    const bad = parseObservations('date,variable,amount\n2027-01-05,P,7\n', smallLake());
    expect(bad.problems[0]).toMatchObject({ line: 1, code: 'missing_column' });
  });
});
