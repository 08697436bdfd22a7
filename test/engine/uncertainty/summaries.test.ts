/**
 * Percentiles (Hyndman & Fan 1996, type 7), means, the Wilson (1927) score interval and
 * paired differences.
 */
import { describe, expect, it } from 'vitest';
import { percentile, summarize, mean } from '../../../src/lib/engine/uncertainty/summaries';
import { wilsonInterval, shareMeeting } from '../../../src/lib/engine/uncertainty/share';
import { pairedDifference } from '../../../src/lib/engine/uncertainty/paired';

describe('percentiles, Hyndman & Fan (1996) type 7', () => {
  it('interpolates between order statistics: h = (n − 1)p', () => {
    const x = [10, 1, 9, 2, 8, 3, 7, 4, 6, 5]; // 1…10 shuffled
    // h = 9·0.25 = 2.25 → x(3) + 0.25·(x(4) − x(3)) = 3.25 (hand-computed)
    expect(percentile(x, 0.25)).toBeCloseTo(3.25, 14);
    expect(percentile(x, 0.5)).toBeCloseTo(5.5, 14);
    // h = 9·0.05 = 0.45 → 1 + 0.45 = 1.45; h = 9·0.95 = 8.55 → 9.55
    expect(percentile(x, 0.05)).toBeCloseTo(1.45, 14);
    expect(percentile(x, 0.95)).toBeCloseTo(9.55, 14);
    expect(percentile(x, 0)).toBe(1);
    expect(percentile(x, 1)).toBe(10);
  });
  it('a single value is every percentile; no values give NaN', () => {
    expect(summarize([4])).toEqual({ mean: 4, p05: 4, p25: 4, p50: 4, p75: 4, p95: 4 });
    expect(Number.isNaN(summarize([]).p50)).toBe(true);
  });
  it('the mean is compensated (order does not change it)', () => {
    const v = [1e16, 1, -1e16, 1];
    expect(mean(v)).toBe(0.5);
  });
});

// Binomial reference computed here, independently of the closed form under test.
const logChoose = (n: number, k: number) => {
  let s = 0;
  for (let i = 1; i <= k; i++) s += Math.log(n - k + i) - Math.log(i);
  return s;
};
const pmf = (k: number, n: number, p: number) => Math.exp(logChoose(n, k) + k * Math.log(p) + (n - k) * Math.log1p(-p));

/** The score test's acceptance region inverted by bisection: |x/n − p| ≤ z·√(p(1 − p)/n). */
function scoreInversion(x: number, n: number, z: number): { low: number; high: number } {
  const accepts = (p: number) => Math.abs(x / n - p) <= z * Math.sqrt((p * (1 - p)) / n);
  const edge = (inside: number, outside: number) => {
    let a = inside;
    let b = outside;
    for (let i = 0; i < 200; i++) {
      const m = 0.5 * (a + b);
      if (accepts(m)) a = m;
      else b = m;
    }
    return 0.5 * (a + b);
  };
  const phat = x / n;
  return { low: x === 0 ? 0 : edge(phat, 0), high: x === n ? 1 : edge(phat, 1) };
}

describe('share meeting a target: Wilson score interval (Wilson 1927)', () => {
  const z = 1.959963984540054;
  it.each([
    [0, 20],
    [1, 29],
    [15, 148],
    [81, 263],
    [50, 50],
    [7, 10]
  ])('%i of %i: the closed form equals the inverted score test', (x, n) => {
    const w = wilsonInterval(x, n, z);
    const ref = scoreInversion(x, n, z);
    expect(w.low).toBeCloseTo(ref.low, 10);
    expect(w.high).toBeCloseTo(ref.high, 10);
  });

  it('matches the score intervals of Newcombe (1998, Statistics in Medicine 17: 857–872, Table I; from memory)', () => {
    const r = (v: number) => Math.round(v * 1e4) / 1e4;
    expect([r(wilsonInterval(81, 263).low), r(wilsonInterval(81, 263).high)]).toEqual([0.2553, 0.3662]);
    expect([r(wilsonInterval(15, 148).low), r(wilsonInterval(15, 148).high)]).toEqual([0.0624, 0.1605]);
    expect([r(wilsonInterval(0, 20).low), r(wilsonInterval(0, 20).high)]).toEqual([0, 0.1611]);
  });

  it('covers the true share about 95 % of the time (exact binomial coverage, n = 50, p = 0.3)', () => {
    const n = 50;
    const p = 0.3;
    let coverage = 0;
    for (let k = 0; k <= n; k++) {
      const w = wilsonInterval(k, n);
      if (w.low <= p && p <= w.high) coverage += pmf(k, n, p);
    }
    // Brown, Cai & DasGupta (2001): Wilson's coverage oscillates close to the nominal level
    expect(coverage).toBeGreaterThan(0.93);
    expect(coverage).toBeLessThan(0.97);
  });

  it('counts members at or below an upper limit, or at or above a lower one, skipping non-finite values', () => {
    const s = shareMeeting([10, 20, 30, 40, NaN], 25);
    expect(s).toMatchObject({ met: 2, n: 4, share: 0.5 });
    expect(s.low).toBeCloseTo(wilsonInterval(2, 4).low, 15);
    expect(shareMeeting([0.5, 1, 1.5], 1, 'above')).toMatchObject({ met: 2, n: 3 });
  });
});

describe('paired difference (common random numbers)', () => {
  it('differs member by member and names the members left out', () => {
    const d = pairedDifference([5, 7, null, 10], [4, 4, 3, 9]);
    expect(d.differences).toEqual([1, 3, null, 1]);
    expect(d.missing).toEqual([2]);
    expect(d.n).toBe(3);
    expect(d.summary.p50).toBe(1);
    expect(d.summary.mean).toBeCloseTo(5 / 3, 14);
  });
  it('a 10 % cut on shared draws has the spread of the 10 % effect, not of the members', () => {
    const base = Array.from({ length: 100 }, (_, j) => 10 + j);
    const scen = base.map((b) => 0.9 * b);
    const d = pairedDifference(scen, base);
    expect(d.summary.p95 - d.summary.p05).toBeCloseTo(0.1 * (summarize(base).p95 - summarize(base).p05), 10);
  });
});
