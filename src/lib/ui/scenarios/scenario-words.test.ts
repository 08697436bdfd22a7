import { describe, expect, it } from 'vitest';
import type { ScenarioCommitResult, StoredRunSummary } from '$lib/storage/types';
import { costBasisWords, costTotalWords, rampUnitFor, scenarioCommitWords, startRunOptions } from './scenario-words';

describe('scenario words', () => {
  it('scenarioCommitWords says the revision number and short digest, or why not', () => {
    const digest = 'sha256:' + 'ab'.repeat(32);
    const saved = { ok: true, unchanged: false, revision: { number: 3, digest } } as unknown as ScenarioCommitResult;
    expect(scenarioCommitWords(saved).text).toBe('Saved as revision 3, digest sha256:abababababab.');
    const same = { ...saved, unchanged: true } as ScenarioCommitResult;
    expect(scenarioCommitWords(same).text).toMatch(/^No new revision: revision 3/);
    const refused = { ok: false, problems: [{ severity: 'error' }, { severity: 'warning' }, { severity: 'error' }] } as unknown as ScenarioCommitResult;
    expect(scenarioCommitWords(refused)).toEqual({ ok: false, text: expect.stringMatching(/has 2 errors/) });
  });

  it('startRunOptions offers finished runs only, as a spin-up', () => {
    const runs = [
      { id: 'run_a', status: 'ok', scenarioTitle: 'Baseline', startedAt: '2027-03-01T10:05:00Z' },
      { id: 'run_b', status: 'failed', scenarioTitle: 'Broken', startedAt: '2027-03-01T11:00:00Z' },
      { id: 'run_c', status: 'cancelled', scenarioTitle: 'Stopped', startedAt: '2027-03-01T12:00:00Z' }
    ] as StoredRunSummary[];
    expect(startRunOptions(runs)).toEqual([{ id: 'run_a', text: 'start from the end of run “Baseline” (2027-03-01 10:05 UTC), spin-up' }]);
  });

  it.each([
    [730, 'years'],
    [182.5, 'years'],
    [90, 'days'],
    [undefined, 'days']
  ])('rampUnitFor(%s) = %s', (d, unit) => expect(rampUnitFor(d)).toBe(unit));

  it('costTotalWords sums by currency and skips what is not a number', () => {
    expect(costTotalWords([{ amount: 2400000, currency: 'EUR' }, { amount: 210000, currency: 'EUR' }])).toBe('EUR 2,610,000');
    expect(costTotalWords([{ amount: 1, currency: 'EUR' }, { amount: 5, currency: 'SEK' }, { amount: 'x', currency: 'EUR' }])).toBe('EUR 1 + SEK 5');
    expect(costTotalWords(undefined)).toBe('no costs entered');
  });

  it('costBasisWords names the basis and the number of campaigns', () => {
    expect(costBasisWords('EUR per campaign', 3)).toBe('Usually reckoned in EUR per campaign; enter the total for the scenario (3 campaigns).');
    expect(costBasisWords('EUR', 3)).toBe('Enter the total for the scenario.');
  });
});
