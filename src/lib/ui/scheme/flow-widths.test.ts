import { describe, expect, it } from 'vitest';
import { FLOW_WIDTHS, flowWidths, meanAnnualMasses, runYears, widthForMass } from './flow-widths';
import { LAYOUT_DEFAULTS } from './layout-scheme';

const year = (y: number, flows: Record<string, number>, from = `${y}-01-01`, to = `${y + 1}-01-01`) => ({
  year: y,
  from,
  to,
  flows,
  measures: {},
  imported: 0,
  exported: 0,
  storageChange: 0,
  residual: 0
});

describe('runYears(run)', () => {
  it('measures the budget from its first day to its last in years of 365.25 days', () => {
    expect(runYears({ budget: [year(2027, {}), year(2028, {})] })).toBeCloseTo(731 / 365.25, 12);
    expect(runYears({ budget: [year(2027, {}, '2027-07-01', '2028-01-01')] })).toBeCloseTo(184 / 365.25, 12);
    expect(runYears({ budget: [] })).toBe(0);
  });
});

describe('meanAnnualMasses(run, ids)', () => {
  it('divides the mass moved over the whole run by its length in years', () => {
    const run = { budget: [year(2027, { a: 100, b: -4 }), year(2028, { a: 300, b: -2 })] };
    const m = meanAnnualMasses(run, ['a', 'b', 'missing']);
    const years = 731 / 365.25;
    expect(m.a).toBeCloseTo(400 / years, 10);
    expect(m.b).toBeCloseTo(-6 / years, 10);
    expect('missing' in m).toBe(false);
  });

  it('counts a partial year for what it is', () => {
    const run = { budget: [year(2027, { a: 50 }, '2027-07-02', '2028-01-01')] };
    expect(meanAnnualMasses(run, ['a']).a).toBeCloseTo(50 / (183 / 365.25), 10);
  });

  it('skips non-finite entries and ids such as `constructor` that the budget lacks', () => {
    const run = { budget: [year(2027, { a: Number.NaN }), year(2028, { a: 10 })] };
    expect(meanAnnualMasses(run, ['a']).a).toBeCloseTo(10 / (731 / 365.25), 10);
    expect(meanAnnualMasses(run, ['constructor'])).toEqual({});
  });
});

describe('widthForMass(mass, largest)', () => {
  const { min, max, decades } = FLOW_WIDTHS;
  it('gives the largest flow the widest stroke and takes a step off per factor of ten', () => {
    expect(widthForMass(1000, 1000)).toBe(max);
    expect(widthForMass(100, 1000)).toBeCloseTo(max - (max - min) / decades, 12);
    expect(widthForMass(1000 / 10 ** decades, 1000)).toBeCloseTo(min, 12);
  });
  it('floors at the smallest width below the scale, at zero and for bad values', () => {
    expect(widthForMass(1e-9, 1000)).toBe(min);
    expect(widthForMass(0, 1000)).toBe(min);
    expect(widthForMass(Number.NaN, 1000)).toBe(min);
    expect(widthForMass(5, 0)).toBe(min);
  });
  it('follows the size of a net mass moved against the arrow', () => {
    expect(widthForMass(-100, 1000)).toBe(widthForMass(100, 1000));
  });
});

describe('FLOW_WIDTHS', () => {
  it('keeps the widest arrow narrower than the room the layout leaves between parallel flows', () => {
    expect(FLOW_WIDTHS.max).toBeLessThan(LAYOUT_DEFAULTS.edgeEdge);
    expect(FLOW_WIDTHS.min).toBeLessThan(FLOW_WIDTHS.even);
  });
});

describe('flowWidths(run, ids)', () => {
  it('gives every arrow one width before a run', () => {
    expect(flowWidths(null, ['a', 'b'])).toEqual({ a: FLOW_WIDTHS.even, b: FLOW_WIDTHS.even });
  });
  it('orders the widths as the masses, on a log scale, with missing flows thinnest', () => {
    const run = { budget: [year(2027, { big: 20000, mid: 200, small: 0.2 })] };
    const w = flowWidths(run, ['big', 'mid', 'small', 'gone']);
    expect(w.big).toBe(FLOW_WIDTHS.max);
    expect(w.mid).toBeCloseTo(FLOW_WIDTHS.max - (2 * (FLOW_WIDTHS.max - FLOW_WIDTHS.min)) / FLOW_WIDTHS.decades, 10);
    expect(w.small).toBe(FLOW_WIDTHS.min);
    expect(w.gone).toBe(FLOW_WIDTHS.min);
  });
});
