import { describe, expect, it } from 'vitest';
import { lastYearMeans, readoutLayout, READOUT_METRICS } from './readout';
import type { ReportedQuantity } from './scheme-graph';

const reported: ReportedQuantity[] = [
  { id: 'Chl', label: 'Chlorophyll-a', unit: 'ug/L', expression: 'chlP * PHY', role: 'chlorophyll' },
  { id: 'Secchi', label: 'Secchi depth (Poole & Atkins 1929: Kd * SD = 1.7)', unit: 'm', expression: '1.7 / Kd' },
  { id: 'ratio', unit: '', expression: 'a / b' }
];

describe('lastYearMeans(run, ids)', () => {
  it('averages each series over the last 365 days of the run, skipping NaN', () => {
    const times = Array.from({ length: 731 }, (_, i) => i);
    const run = { times, series: { Chl: times.map((t) => (t >= 365 ? 10 : 99)), Secchi: times.map((t) => (t === 700 ? Number.NaN : 2)) } };
    const m = lastYearMeans(run, ['Chl', 'Secchi', 'missing']);
    expect(m.Chl).toBe(10);
    expect(m.Secchi).toBe(2);
    expect('missing' in m).toBe(false);
  });
  it('gives nothing for a run without times', () => {
    expect(lastYearMeans({ times: [], series: {} }, ['Chl'])).toEqual({});
  });
});

describe('readoutLayout(reported, width, values)', () => {
  it('stacks one card per quantity below the heading, without overlaps', () => {
    const l = readoutLayout(reported);
    expect(l.heading).toBe('Reported quantities');
    expect(l.cards.map((c) => c.id)).toEqual(['Chl', 'Secchi', 'ratio']);
    expect(l.cards[0].y).toBe(READOUT_METRICS.headHeight);
    for (let i = 1; i < l.cards.length; i++) expect(l.cards[i].y).toBeGreaterThanOrEqual(l.cards[i - 1].y + l.cards[i - 1].height);
    expect(l.height).toBeGreaterThanOrEqual(l.cards.at(-1)!.y + l.cards.at(-1)!.height);
    expect(l.cards[2]).toMatchObject({ label: [], unit: 'no unit' });
    expect(l.cards[1].label.length).toBe(2);
  });
  it('adds the last year’s mean with its unit after a run', () => {
    const before = readoutLayout(reported);
    const after = readoutLayout(reported, READOUT_METRICS.width, { Chl: 38.72, Secchi: 0.4621 });
    expect(after.cards[0].value).toBe("last year's mean: 38.7 ug/L");
    expect(after.cards[1].value).toBe("last year's mean: 0.462 m");
    expect(after.cards[2].value).toBeUndefined();
    expect(after.cards[0].height).toBeGreaterThan(before.cards[0].height);
  });
  it('says so when nothing is reported', () => {
    expect(readoutLayout([]).heading).toBe('Reported quantities: none');
  });
});
