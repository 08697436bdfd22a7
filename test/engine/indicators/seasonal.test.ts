/**
 * Seasonal indicators against values computed by hand in the test (common practice:
 * growing-season means, days above a target, first year a target is met and stays met).
 */
import { describe, expect, it } from 'vitest';
import { annualMeans, daysAbove, firstYearMetAndStays, meanOfLast, seasonalMeans, toDaily } from '../../../src/lib/engine';

/** A daily series from 2027-01-01 whose value on a day is given by f(date). */
function series(days: number, f: (d: Date, i: number) => number) {
  const start = '2027-01-01';
  const times = Array.from({ length: days }, (_, i) => i);
  const values = times.map((i) => f(new Date(Date.UTC(2027, 0, 1 + i)), i));
  return { start, times, values };
}

describe('toDaily(start, times, values)', () => {
  it('keeps a daily series as it is', () => {
    const s = series(10, (_, i) => i * i);
    expect(Array.from(toDaily(s.start, s.times, s.values).values)).toEqual(s.values);
  });
  it('interpolates a 10-day output step linearly to every day', () => {
    const d = toDaily('2027-01-01', [0, 10, 20], [0, 10, 40]);
    expect(d.values.length).toBe(21);
    expect(d.values[5]).toBeCloseTo(5, 12);
    expect(d.values[15]).toBeCloseTo(25, 12);
    expect(d.values[20]).toBe(40);
  });
});

describe('seasonalMeans(series, season)', () => {
  // value = month number (1–12): the April–September mean is (4+…+9)/6 weighted by days.
  const s = series(365 * 3 + 1, (d) => d.getUTCMonth() + 1);
  const daily = toDaily(s.start, s.times, s.values);
  const daysIn = [30, 31, 30, 31, 31, 30]; // April..September
  const expected = daysIn.reduce((a, n, i) => a + n * (4 + i), 0) / daysIn.reduce((a, b) => a + b, 0);

  it('gives the day-weighted April–September mean for each whole year', () => {
    const v = seasonalMeans(daily);
    expect(v.map((x) => x.year)).toEqual([2027, 2028, 2029]);
    for (const y of v) {
      expect(y.value).toBeCloseTo(expected, 12);
      expect(y.days).toBe(183);
    }
  });

  it('takes a season across the new year (November–February)', () => {
    const v = seasonalMeans(daily, { fromMonth: 11, toMonth: 2 });
    // a calendar year's Nov–Feb days: Jan (31) + Feb (28) + Nov (30) + Dec (31) in 2027
    const exp = (31 * 1 + 28 * 2 + 30 * 11 + 31 * 12) / (31 + 28 + 30 + 31);
    expect(v[0].year).toBe(2027);
    expect(v[0].value).toBeCloseTo(exp, 12);
  });

  it('leaves out a year whose season the series does not cover', () => {
    const short = series(200, () => 1); // ends in July 2027
    expect(seasonalMeans(toDaily(short.start, short.times, short.values))).toEqual([]);
  });

  it('annualMeans gives the mean of each whole calendar year', () => {
    const v = annualMeans(daily);
    expect(v[0].value).toBeCloseTo((31 * 1 + 28 * 2 + 31 * 3 + 30 * 4 + 31 * 5 + 30 * 6 + 31 * 7 + 31 * 8 + 30 * 9 + 31 * 10 + 30 * 11 + 31 * 12) / 365, 12);
    expect(v[1].days).toBe(366); // 2028 is a leap year
  });
});

describe('daysAbove, meanOfLast, firstYearMetAndStays', () => {
  it('counts the days above a target per year', () => {
    const s = series(365 * 2, (d) => (d.getUTCMonth() === 6 ? 50 : 10)); // July at 50
    const v = daysAbove(toDaily(s.start, s.times, s.values), 30);
    expect(v.map((x) => x.value)).toEqual([31]);
  });

  it('meanOfLast averages the last n years, NaN when there are fewer', () => {
    const vals = [1, 2, 3, 4, 5, 6].map((v, i) => ({ year: 2030 + i, value: v, days: 1 }));
    expect(meanOfLast(vals, 5)).toBe(4);
    expect(meanOfLast(vals, 7)).toBeNaN();
  });

  it('finds the first year from which the target holds to the end', () => {
    const vals = [50, 30, 20, 45, 25, 22, 20].map((v, i) => ({ year: 2030 + i, value: v, days: 1 }));
    expect(firstYearMetAndStays(vals, (v) => v < 30)).toBe(2034);
    expect(firstYearMetAndStays(vals.slice(0, 4), (v) => v < 30)).toBeNull();
  });
});
