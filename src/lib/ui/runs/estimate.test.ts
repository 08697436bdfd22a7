import { describe, expect, it } from 'vitest';
import type { ScenarioDoc } from '$lib/engine/document/types';
import type { StoredRunSummary } from '$lib/storage/types';
import { estimate, formatSeconds, msPerDayFromHistory, periodDays, probeScenario } from './estimate';

const sc = (start: string, end: string) => ({ format: 'lakeledger.scenario/1', id: 's', model: 'm', period: { start, end } }) as ScenarioDoc;
const run = (wallMs: number, points: number, status: 'ok' | 'failed' = 'ok') => ({ wallMs, points, status }) as StoredRunSummary;

describe('run estimates', () => {
  it('periodDays counts calendar days, leap days included', () => {
    expect(periodDays(sc('2027-01-01', '2047-01-01'))).toBe(7305);
    expect(periodDays(sc('2028-01-01', '2029-01-01'))).toBe(366);
  });

  it('msPerDayFromHistory is the median engine time per simulated day of finished runs', () => {
    expect(msPerDayFromHistory([])).toBeNull();
    expect(msPerDayFromHistory([run(100, 101), run(300, 101), run(200, 101), run(9999, 101, 'failed')])).toBeCloseTo(2, 12);
    expect(msPerDayFromHistory([run(100, 101), run(300, 101)])).toBeCloseTo(2, 12);
  });

  it('probeScenario keeps the first year only, and a shorter period as it is', () => {
    expect(probeScenario(sc('2027-01-01', '2047-01-01')).period.end).toBe('2028-01-01');
    expect(probeScenario(sc('2027-01-01', '2027-03-01')).period.end).toBe('2027-03-01');
  });

  it('estimate spreads whole runs over the workers: the busiest worker sets the time', () => {
    // 4 runs of 1000 days at 2 ms/day: 8 s on one worker, 4 s on two, 2 s on four or more
    expect(estimate([1000, 1000, 1000, 1000], 2, 1, 'x').seconds).toBeCloseTo(8, 12);
    expect(estimate([1000, 1000, 1000, 1000], 2, 2, 'x').seconds).toBeCloseTo(4, 12);
    expect(estimate([1000, 1000, 1000, 1000], 2, 8, 'x').seconds).toBeCloseTo(2, 12);
    // one long and two short runs on two workers: the long one alone
    expect(estimate([3000, 1000, 1000], 1, 2, 'x').seconds).toBeCloseTo(3, 12);
  });

  it('formatSeconds words the time', () => {
    expect(formatSeconds(0.2)).toBe('about 1 s');
    expect(formatSeconds(42)).toBe('about 42 s');
    expect(formatSeconds(600)).toBe('about 10 min');
    expect(formatSeconds(5400)).toBe('about 1 h 30 min');
  });
});
