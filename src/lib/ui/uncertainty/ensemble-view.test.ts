import { describe, expect, it } from 'vitest';
import type { MemberRun } from '$lib/worker/protocol';
import { wilsonInterval } from '$lib/engine/uncertainty/share';
import {
  bandOf,
  countedPerScenario,
  durationWords,
  indicatorStats,
  parseMembers,
  parseSeed,
  parseTarget,
  problemsOf,
  memberWarningsOf,
  remainingMembers,
  splitMembers,
  timeLeftMs
} from './ensemble-view';

const ok = (chl: number, series: number[] = [chl, chl * 2]): MemberRun => ({ status: 'ok', closed: true, relativeResidual: 1e-13, code: null, message: null, values: { 'chlorophyll.last': chl }, series: { chlorophyll: series } });
const notClosed = (chl: number): MemberRun => ({ ...ok(chl), closed: false, code: 'closure_failed', message: 'mass closure failed' });
const failed: MemberRun = { status: 'failed', closed: false, relativeResidual: null, code: 'solver_failed', message: 'step too small', values: {}, series: null };

describe('remainingMembers and splitMembers', () => {
  it('lists the members not done, in order, and shares them round-robin without empty jobs', () => {
    expect(remainingMembers(6, new Set([0, 2, 3]))).toEqual([1, 4, 5]);
    expect(remainingMembers(3, new Map([[1, [ok(1)]]]))).toEqual([0, 2]);
    expect(splitMembers([1, 4, 5, 7, 8], 2)).toEqual([[1, 5, 8], [4, 7]]);
    expect(splitMembers([3], 4)).toEqual([[3]]);
    expect(splitMembers([0, 1], 0)).toEqual([[0, 1]]);
  });
});

describe('bandOf', () => {
  it('gives type-7 percentiles point by point over the members that ran and closed', () => {
    const members = new Map<number, MemberRun[]>();
    // five closed members with series [k, 10k]; one not closed and one failed do not count
    for (let k = 1; k <= 5; k++) members.set(k, [ok(k, [k, 10 * k])]);
    members.set(6, [notClosed(100)]);
    members.set(7, [failed]);
    const b = bandOf(members, 0, 'chlorophyll', 10);
    expect(b.members).toBe(5);
    expect(b.days).toEqual([0, 10]);
    expect(b.p50).toEqual([3, 30]);
    // h = 4·0.05 = 0.2 → 1 + 0.2·(2 − 1)
    expect(b.p05[0]).toBeCloseTo(1.2, 12);
    expect(b.p95[1]).toBeCloseTo(48, 12);
    expect(b.p25).toEqual([2, 20]);
    expect(b.p75).toEqual([4, 40]);
  });
});

describe('indicatorStats', () => {
  const members = new Map<number, MemberRun[]>([
    [0, [ok(30), ok(20)]],
    [1, [ok(40), ok(25)]],
    [2, [ok(10), failed]],
    [3, [failed, ok(5)]],
    [4, [ok(50), ok(44)]]
  ]);

  it('counts the share meeting the target with its Wilson interval over the members with a value', () => {
    const base = indicatorStats(members, 0, 'chlorophyll.last', 30, 'below');
    expect(base.n).toBe(4);
    expect(base.share).toMatchObject({ met: 2, n: 4, share: 0.5 });
    expect(base.share!.low).toBeCloseTo(wilsonInterval(2, 4).low, 15);
    expect(base.paired).toBeNull();
    expect(base.summary.p50).toBe(35);
    const secchi = indicatorStats(members, 0, 'chlorophyll.last', 30, 'above');
    expect(secchi.share!.met).toBe(3);
    expect(indicatorStats(members, 0, 'chlorophyll.last', null, 'below').share).toBeNull();
  });

  it('pairs the option with the baseline member by member, leaving out members missing on either side', () => {
    const opt = indicatorStats(members, 1, 'chlorophyll.last', 30, 'below');
    // pairs: 0 (−10), 1 (−15), 4 (−6); members 2 and 3 fail on one side
    expect(opt.paired!.n).toBe(3);
    expect(opt.paired!.summary.p50).toBe(-10);
    expect(opt.paired!.summary.mean).toBeCloseTo(-31 / 3, 12);
  });
});

describe('problemsOf and countedPerScenario', () => {
  it('lists every failed and not-closed run with member, scenario and code', () => {
    const members = new Map<number, MemberRun[]>([
      [4, [ok(1), notClosed(2)]],
      [1, [failed, ok(3)]]
    ]);
    expect(problemsOf(members).map((p) => [p.member, p.scenario, p.kind, p.code])).toEqual([
      [1, 0, 'failed', 'solver_failed'],
      [4, 1, 'not closed', 'closure_failed']
    ]);
    expect(countedPerScenario(members, 2)).toEqual([1, 1]);
  });
});

describe('memberWarningsOf', () => {
  it('lists the warnings of runs that count, in member then scenario order, and leaves out runs that do not count', () => {
    const warned = (v: number, code: string): MemberRun => ({ ...ok(v), warnings: [{ code, id: 'PHY', message: `PHY ${code}` }] });
    const members = new Map<number, MemberRun[]>([
      [7, [ok(1), warned(2, 'near_absolute_tolerance')]],
      [2, [warned(3, 'negative_state'), ok(4)]],
      [3, [{ ...notClosed(5), warnings: [{ code: 'negative_state', message: 'x' }] }, ok(6)]]
    ]);
    expect(memberWarningsOf(members).map((w) => [w.member, w.scenario, w.code, w.id])).toEqual([
      [2, 0, 'negative_state', 'PHY'],
      [7, 1, 'near_absolute_tolerance', 'PHY']
    ]);
  });
});

describe('time left and words', () => {
  it('extrapolates the pace of this sitting', () => {
    expect(timeLeftMs(0, 1000, 10)).toBeNull();
    expect(timeLeftMs(4, 8000, 6)).toBe(12000);
    expect(durationWords(null)).toMatch(/working out/);
    expect(durationWords(3000)).toBe('under 5 s');
    expect(durationWords(42000)).toBe('about 42 s');
    expect(durationWords(130000)).toBe('about 2 min 10 s');
    expect(durationWords(120000)).toBe('about 2 min');
  });

  it('parses members, seed and target, refusing what is out of range', () => {
    expect(parseMembers('100')).toBe(100);
    expect(parseMembers('1')).toMatch(/from 2/);
    expect(parseMembers('2.5')).toMatch(/whole/);
    expect(parseSeed('0')).toBe(0);
    expect(parseSeed('4294967296')).toMatch(/4294967295/);
    expect(parseSeed('')).toMatch(/whole/);
    expect(parseTarget('')).toBeNull();
    expect(parseTarget(' 25 ')).toBe(25);
    expect(parseTarget('abc')).toMatch(/number/);
  });
});
