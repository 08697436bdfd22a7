/**
 * Carlson's trophic state index against shared/reference/check-values.md, section 3:
 * Carlson, R.E. (1977) Limnol. Oceanogr. 22: 361–369 (base-2 forms, [C2]) and the rounded
 * natural-log forms (Carlson & Simpson 1996, NALMS, [C2]); the table values are derived
 * there ([D]) from those formulas. The "6.4 at TSI 50" of the printed table is not used
 * (inconsistent with the formula, see check-values 3.2).
 */
import { describe, expect, it } from 'vitest';
import { tsiChlorophyll, tsiSecchi, tsiTotalP, trophicClass } from '../../../src/lib/engine';

describe('tsiSecchi / tsiTotalP / tsiChlorophyll, exact (base-2) forms, Carlson 1977', () => {
  it.each([
    [64, 0],
    [4, 40],
    [2, 50],
    [1, 60],
    [0.5, 70],
    [0.25, 80]
  ])('tsiSecchi(%f m) = %f', (sd, tsi) => expect(tsiSecchi(sd, 'exact')).toBeCloseTo(tsi, 9));

  it.each([
    [0.75, 0],
    [12, 40],
    [24, 50],
    [48, 60],
    [96, 70],
    [192, 80]
  ])('tsiTotalP(%f mg/m^3) = %f', (tp, tsi) => expect(tsiTotalP(tp, 'exact')).toBeCloseTo(tsi, 9));

  it.each([
    [2.6152, 40],
    [7.2476, 50],
    [20.0855, 60],
    [55.664, 70]
  ])('tsiChlorophyll(%f mg/m^3) = %f (formula inverse, check-values 3.2)', (chl, tsi) =>
    expect(tsiChlorophyll(chl, 'exact')).toBeCloseTo(tsi, 3)
  );

  it('whole-lake example SD 5 / Chl 4 / TP 10 gives 36.781, 44.169, 37.370 (check-values 3.2, [D])', () => {
    expect(tsiSecchi(5, 'exact')).toBeCloseTo(36.781, 3);
    expect(tsiChlorophyll(4, 'exact')).toBeCloseTo(44.169, 3);
    expect(tsiTotalP(10, 'exact')).toBeCloseTo(37.37, 3);
  });

  it('each +10 TSI halves Secchi depth and doubles TP (Carlson 1977; NALMS)', () => {
    expect(tsiSecchi(1.5, 'exact') - tsiSecchi(3, 'exact')).toBeCloseTo(10, 12);
    expect(tsiTotalP(60, 'exact') - tsiTotalP(30, 'exact')).toBeCloseTo(10, 12);
  });
});

describe('the rounded natural-log forms (Carlson & Simpson 1996)', () => {
  it('SD 5 / Chl 4 / TP 10 gives 36.808, 44.200, 37.353; SD 0.5 / Chl 40 / TP 80 gives 69.988, 66.788, 67.339 (check-values 3.2)', () => {
    expect(tsiSecchi(5, 'rounded')).toBeCloseTo(36.808, 3);
    expect(tsiChlorophyll(4, 'rounded')).toBeCloseTo(44.2, 3);
    expect(tsiTotalP(10, 'rounded')).toBeCloseTo(37.353, 3);
    expect(tsiSecchi(0.5, 'rounded')).toBeCloseTo(69.988, 3);
    expect(tsiChlorophyll(40, 'rounded')).toBeCloseTo(66.788, 3);
    expect(tsiTotalP(80, 'rounded')).toBeCloseTo(67.339, 3);
  });

  it('a misplaced parenthesis would give 62.189 at Chl 10; the formula gives 53.158 exact / 53.188 rounded (check-values 3.3)', () => {
    expect(tsiChlorophyll(10, 'exact')).toBeCloseTo(53.158, 3);
    expect(tsiChlorophyll(10, 'rounded')).toBeCloseTo(53.188, 3);
  });
});

describe('trophicClass(tsi) and bad input', () => {
  it.each([
    [35, 'oligotrophic'],
    [45, 'mesotrophic'],
    [60, 'eutrophic'],
    [75, 'hypereutrophic'],
    [NaN, 'unknown']
  ])('trophicClass(%f) is %s (Carlson & Simpson 1996 classes)', (t, c) => expect(trophicClass(t)).toBe(c));

  it.each([0, -1, NaN, Infinity])('the index of %f is NaN (a logarithm needs a positive value)', (x) => {
    expect(tsiSecchi(x)).toBeNaN();
    expect(tsiChlorophyll(x)).toBeNaN();
    expect(tsiTotalP(x)).toBeNaN();
  });
});
