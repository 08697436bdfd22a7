import { describe, expect, it } from 'vitest';
import { fitStatistics, scores } from '../../../src/lib/engine/fit/statistics';
import type { Matched, Pair } from '../../../src/lib/engine/fit/match';

const pair = (date: string, obs: number, sim: number, censored: Pair['censored'] = null): Pair => ({ date, month: Number(date.slice(5, 7)), obs, sim, censored });

describe('scores (hand-computed)', () => {
  it('obs 1,2,3,4 and sim 1.5,2,2.5,5: RMSE √(1.5/4), bias 0.25, NSE 1 − 1.5/5 = 0.7', () => {
    // residuals 0.5, 0, −0.5, 1: Σe² = 1.5; mean obs 2.5, Σ(obs − 2.5)² = 5 (Nash & Sutcliffe 1970 efficiency)
    const s = scores([1, 2, 3, 4], [1.5, 2, 2.5, 5]);
    expect(s.rmse).toBeCloseTo(Math.sqrt(0.375), 14);
    expect(s.bias).toBeCloseTo(0.25, 14);
    expect(s.nse).toBeCloseTo(0.7, 14);
  });
  it('NSE is 0 when the simulation is the observed mean, and null for constant observations', () => {
    expect(scores([1, 2, 3], [2, 2, 2]).nse).toBeCloseTo(0, 14);
    expect(scores([2, 2], [1, 3]).nse).toBeNull();
    expect(scores([], []).rmse).toBeNull();
  });
});

describe('fitStatistics', () => {
  const matched: Matched = {
    pairs: {
      P: [
        pair('2027-05-01', 1, 1.5),
        pair('2027-06-01', 2, 2),
        pair('2027-11-01', 3, 2.5),
        pair('2027-12-01', 4, 5),
        pair('2027-07-01', 5, 3, 'below'), // simulation under the limit: agrees, left out
        pair('2027-08-01', 5, 6, 'below') // above the limit: counts at the limit, e = 1
      ],
      Chl: [pair('2027-05-01', 1, 10), pair('2027-06-01', 10, 10), pair('2027-07-01', 100, 10), pair('2027-08-01', 0, 10)]
    },
    outside: { P: 2 }
  };
  const st = fitStatistics(matched, { logVariables: ['Chl'] });

  it('censored pairs count only when the simulation is on the wrong side of the limit', () => {
    // counted: (1,1.5) (2,2) (3,2.5) (4,5) (5,6): e = .5 0 −.5 1 1 → Σe² = 2.5, mean e = 0.4
    expect(st.P.all.n).toBe(5);
    expect(st.P.all.consistent).toBe(1);
    expect(st.P.all.rmse).toBeCloseTo(Math.sqrt(2.5 / 5), 14);
    expect(st.P.all.bias).toBeCloseTo(0.4, 14);
    // mean obs 3, Σ(obs − 3)² = 4+1+0+1+4 = 10 → NSE 0.75
    expect(st.P.all.nse).toBeCloseTo(0.75, 14);
    expect(st.P.outside).toBe(2);
  });

  it('splits the growing season (April–September) from the rest', () => {
    expect(st.P.growing.pairs).toBe(4);
    expect(st.P.growing.n).toBe(3); // e = .5, 0, 1
    expect(st.P.growing.bias).toBeCloseTo(0.5, 14);
    expect(st.P.rest.n).toBe(2); // e = −.5, 1
    expect(st.P.rest.rmse).toBeCloseTo(Math.sqrt(1.25 / 2), 14);
  });

  it('log10 scores for chlorophyll: obs 1, 10, 100 vs 10 → e = 1, 0, −1, RMSE √(2/3), NSE 0; a zero left out', () => {
    const l = st.Chl.all.log10!;
    expect(l.n).toBe(3);
    expect(l.nonPositive).toBe(1);
    expect(l.rmse).toBeCloseTo(Math.sqrt(2 / 3), 14);
    expect(l.bias).toBeCloseTo(0, 14);
    expect(l.nse).toBeCloseTo(0, 14);
    expect(st.P.all.log10).toBeUndefined();
  });
});
