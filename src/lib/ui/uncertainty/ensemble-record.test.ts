import { describe, expect, it } from 'vitest';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { digestOf } from '$lib/engine/document/digest';
import { ENGINE_VERSION } from '$lib/engine/version';
import { checkRecord, sealRecord, type EnsembleRecord } from '$lib/archive/records';
import type { EnsembleColumn, MemberRun } from '$lib/worker/protocol';
import { bandOf, indicatorStats, problemsOf } from './ensemble-view';
import {
  bandFor,
  bandsOfState,
  calibrationRanges,
  sampledModel,
  ensembleRecordOf,
  membersWords,
  recordBytes,
  resumeRefusal,
  restoreEnsemble,
  sampledOf,
  sizeWords,
  storedSentence,
  type EnsembleState
} from './ensemble-record';

// A model document as far as a record reads it: id, and the ranges for `sampled`.
const model = {
  format: 'lakeledger.model/1',
  id: 'tiny_lake',
  title: 'Tiny lake',
  parameters: [
    { id: 'kUp', value: 0.5, unit: '1/d', range: { min: 0.2, max: 1 } },
    { id: 'kSed', value: 0.1, unit: '1/d' },
    { id: 'kRel', value: 0.02, unit: '1/d', range: { min: 0.01, max: 0.05, distribution: 'loguniform' } }
  ],
  states: [
    { id: 'DIP', initial: 20, unit: 'mg/m^3', initialRange: { min: 10, max: 30 } },
    { id: 'PHY', initial: 5, unit: 'mg/m^3' }
  ]
} as unknown as ModelDoc;
const baseline = { format: 'lakeledger.scenario/1', id: 'baseline', model: 'tiny_lake', period: { start: '2027-01-01', end: '2047-01-01' }, measures: [] } as unknown as ScenarioDoc;
const option = { ...baseline, id: 'load_cut', measures: [{ id: 'cut', kind: 'scale', target: 'Pin', factor: 0.5, from: '2028-01-01' }] } as unknown as ScenarioDoc;

const columns: EnsembleColumn[] = [
  { key: 'chlorophyll.last', role: 'chlorophyll', label: 'Chlorophyll-a', unit: 'mg/m^3', better: 'lower' },
  { key: 'secchi.last', role: 'secchi', label: 'Secchi depth', unit: 'm', better: 'higher' }
];
const roles = { chlorophyll: { id: 'CHL', label: 'Chlorophyll-a', unit: 'mg/m^3' }, secchi: { id: 'SD', label: 'Secchi depth', unit: 'm' } };

/** Member j: chlorophyll series [c, 2c, 3c] with c = j + 1 (option: half), Secchi 1/c. */
function run(c: number): MemberRun {
  return {
    status: 'ok',
    closed: true,
    relativeResidual: 1e-13,
    code: null,
    message: null,
    values: { 'chlorophyll.last': c * 2, 'secchi.last': 1 / c },
    series: { chlorophyll: [c, 2 * c, 3 * c], secchi: [1 / c, 1 / (2 * c), 1 / (3 * c)] }
  };
}
const failed: MemberRun = { status: 'failed', closed: false, relativeResidual: null, code: 'step_underflow', message: 'the step size fell below its floor', values: {}, series: null };
const notClosed = (c: number): MemberRun => ({ ...run(c), closed: false, code: 'closure_failed', message: 'mass closure failed' });

function state(): EnsembleState {
  const members = new Map<number, MemberRun[]>();
  for (let j = 0; j < 6; j++) members.set(j, [run(j + 1), run((j + 1) / 2)]);
  members.set(7, [run(8), failed]);
  members.set(9, [notClosed(10), run(5)]);
  return {
    model,
    scenarios: [
      { title: 'Baseline', doc: baseline },
      { title: 'Load cut', doc: option }
    ],
    n: 12,
    seed: 4242,
    members,
    columns,
    roles,
    gridDays: 10,
    sampled: { parameters: ['kUp', 'kRel'], states: ['DIP'] },
    storedBands: null,
    wallMs: 1234.6
  };
}

/** Sealed, then through JSON text as a bundle would carry it. */
function throughArchive(rec: Omit<EnsembleRecord, 'id'>): EnsembleRecord {
  return JSON.parse(JSON.stringify(sealRecord<EnsembleRecord>('ensemble', rec).record)) as EnsembleRecord;
}

describe('ensembleRecordOf(state, { keepSeries: true })', () => {
  it('writes the identity of the design, every member in order, and bands from bandOf', () => {
    const s = state();
    const rec = ensembleRecordOf(s, { keepSeries: true });
    expect(rec.model).toBe('tiny_lake');
    expect(rec.modelDigest).toBe(digestOf(model));
    expect(rec.scenarios).toEqual([
      { id: 'baseline', title: 'Baseline', digest: digestOf(baseline) },
      { id: 'load_cut', title: 'Load cut', digest: digestOf(option) }
    ]);
    expect(rec.scenarios[0].digest).not.toBe(rec.scenarios[1].digest);
    expect([rec.n, rec.seed, rec.completed, rec.partial, rec.engine, rec.autoStart, rec.keptSeries, rec.wallMs]).toEqual([12, 4242, 8, true, ENGINE_VERSION, 'dp54', true, 1235]);
    expect(rec.members.map((m) => m.member)).toEqual([0, 1, 2, 3, 4, 5, 7, 9]);
    expect(rec.members[2].runs[1].series!.chlorophyll).toEqual([1.5, 3, 4.5]);
    // the baseline counts 7 members (member 9 did not close), the option 7 (member 7 failed)
    expect(rec.bands.chlorophyll.map((b) => b.members)).toEqual([7, 7]);
    // baseline chlorophyll on day 0: members 1…6 and 8 → median 4
    expect(rec.bands.chlorophyll[0].p50[0]).toBe(4);
    expect(rec.bands.chlorophyll[0].days).toEqual([0, 10, 20]);
    expect(rec.bands.secchi[1]).toEqual(bandOf(s.members, 1, 'secchi', 10));
    expect(checkRecord('ensemble', sealRecord('ensemble', rec).record)).toEqual([]);
  });

  it('restores the same members, bands and indicator statistics, and stores again under the same id', () => {
    const s = state();
    const rec = ensembleRecordOf(s, { keepSeries: true });
    const back = restoreEnsemble(throughArchive(rec));
    expect(back.storedBands).toBeNull();
    expect([...back.members.keys()]).toEqual([0, 1, 2, 3, 4, 5, 7, 9]);
    expect(back.members).toEqual(s.members);
    expect([back.n, back.seed, back.gridDays, back.wallMs]).toEqual([12, 4242, 10, 1235]);
    expect(back.columns).toEqual(columns);
    expect(back.roles).toEqual(roles);
    for (const role of ['chlorophyll', 'secchi'])
      for (const si of [0, 1]) expect(bandFor(back.members, back.storedBands, si, role, back.gridDays)).toEqual(bandOf(s.members, si, role, 10));
    const before = indicatorStats(s.members, 1, 'chlorophyll.last', 5, 'below');
    const after = indicatorStats(back.members, 1, 'chlorophyll.last', 5, 'below');
    expect(after).toEqual(before);
    // option values 1, 2, …, 6 and 10 (member 9); member 7 failed: 5 of 7 at most 5
    expect(after.share).toMatchObject({ met: 5, n: 7 });
    expect(after.paired!.n).toBe(6);
    expect(problemsOf(back.members)).toEqual(problemsOf(s.members));
    expect(problemsOf(back.members).map((p) => [p.member, p.scenario, p.code])).toEqual([
      [7, 1, 'step_underflow'],
      [9, 0, 'closure_failed']
    ]);
    const again = ensembleRecordOf({ ...s, members: back.members, sampled: back.sampled, storedBands: back.storedBands }, { keepSeries: true });
    expect(sealRecord('ensemble', again).record.id).toBe(sealRecord('ensemble', rec).record.id);
  });
});

describe('ensembleRecordOf(state, { keepSeries: false })', () => {
  it("sets every member's series to null and keeps bandOf's bands and every indicator value", () => {
    const s = state();
    const rec = ensembleRecordOf(s, { keepSeries: false });
    expect(rec.keptSeries).toBe(false);
    expect(rec.members.flatMap((m) => m.runs.map((r) => r.series))).toEqual(new Array(16).fill(null));
    expect(rec.members[0].runs[0].values).toEqual({ 'chlorophyll.last': 2, 'secchi.last': 1 });
    for (const role of ['chlorophyll', 'secchi']) expect(rec.bands[role]).toEqual([0, 1].map((si) => bandOf(s.members, si, role, 10)));
    // the page's members keep their series
    expect(s.members.get(0)![0].series).not.toBeNull();
    expect(recordBytes(rec)).toBeLessThan(recordBytes(ensembleRecordOf(s, { keepSeries: true })));
  });

  it('reopens with the stored bands and the same shares, paired differences and problems', () => {
    const s = state();
    const back = restoreEnsemble(throughArchive(ensembleRecordOf(s, { keepSeries: false })));
    expect(back.keptSeries).toBe(false);
    expect(back.storedBands).not.toBeNull();
    // bandOf over the reopened members has nothing to go on; bandFor takes the stored bands
    expect(bandOf(back.members, 0, 'chlorophyll', 10).members).toBe(0);
    const band = bandFor(back.members, back.storedBands, 0, 'chlorophyll', 10);
    expect(band).toEqual(bandOf(s.members, 0, 'chlorophyll', 10));
    // day 20, baseline values 3c for c = 1…6 and 8: h = 6·0.95 = 5.7 → 3·(6 + 0.7·(8 − 6))
    expect(band.p95[2]).toBeCloseTo(22.2, 12);
    expect(bandsOfState({ ...s, members: back.members, storedBands: back.storedBands })).toEqual(bandsOfState(s));
    for (const si of [0, 1]) {
      expect(indicatorStats(back.members, si, 'secchi.last', 0.3, 'above')).toEqual(indicatorStats(s.members, si, 'secchi.last', 0.3, 'above'));
      expect(indicatorStats(back.members, si, 'chlorophyll.last', 6, 'below')).toEqual(indicatorStats(s.members, si, 'chlorophyll.last', 6, 'below'));
    }
    expect(indicatorStats(back.members, 0, 'chlorophyll.last', 6, 'below').share).toMatchObject({ met: 3, n: 7 });
    expect(problemsOf(back.members)).toHaveLength(2);
  });

  it('stores a reopened ensemble without series again under the same id, and refuses to keep series it does not have', () => {
    const s = state();
    const rec = ensembleRecordOf(s, { keepSeries: false });
    const back = restoreEnsemble(throughArchive(rec));
    const reopened: EnsembleState = { ...s, members: back.members, sampled: back.sampled, storedBands: back.storedBands };
    expect(sealRecord('ensemble', ensembleRecordOf(reopened, { keepSeries: false })).record.id).toBe(sealRecord('ensemble', rec).record.id);
    expect(() => ensembleRecordOf(reopened, { keepSeries: true })).toThrow(/series/);
  });
});

describe('numbers that are not finite', () => {
  it('writes indicator values that are not finite as null and reads null percentiles back as NaN', () => {
    const s = state();
    const members = new Map(s.members);
    members.set(0, [{ ...run(1), values: { 'chlorophyll.last': Number.NaN, 'secchi.last': 1 } }, run(0.5)]);
    // a scenario with no member counted has NaN percentiles, null in JSON
    const onlyFailed = new Map<number, MemberRun[]>([[0, [run(1), failed]]]);
    const rec = ensembleRecordOf({ ...s, members }, { keepSeries: false });
    expect(rec.members[0].runs[0].values['chlorophyll.last']).toBeNull();
    const empty = ensembleRecordOf({ ...s, members: onlyFailed }, { keepSeries: false });
    expect(empty.bands.chlorophyll[1].members).toBe(0);
    const back = restoreEnsemble(throughArchive(empty));
    expect(back.storedBands!.chlorophyll[0].p50).toEqual([1, 2, 3]);
    expect(back.storedBands!.chlorophyll[1].days).toEqual([]);
  });

  it('reads a null percentile inside a band as NaN (a gap in the chart)', () => {
    const rec = throughArchive(ensembleRecordOf(state(), { keepSeries: false }));
    (rec.bands.chlorophyll[0].p05 as unknown[])[1] = null;
    const back = restoreEnsemble(rec);
    expect(back.storedBands!.chlorophyll[0].p05[1]).toBeNaN();
    expect(back.storedBands!.chlorophyll[0].p05[0]).toBeCloseTo(1.3, 12);
  });
});

describe('sampledOf(model)', () => {
  it('names the parameters and the states with a range, in model order', () => {
    expect(sampledOf(model)).toEqual({ parameters: ['kUp', 'kRel'], states: ['DIP'] });
    const rec = ensembleRecordOf({ ...state(), sampled: null }, { keepSeries: false });
    expect(rec.sampled).toEqual({ parameters: ['kUp', 'kRel'], states: ['DIP'] });
  });
});

describe('resumeRefusal and the words', () => {
  const facts = { partial: true, keptSeries: true, missingModelRevision: null, missingScenarios: [] as string[], n: 100, seed: 4242 };
  it('offers resume for a partial ensemble with its series and revisions, and says why not otherwise', () => {
    expect(resumeRefusal(facts)).toBeNull();
    expect(resumeRefusal({ ...facts, partial: false, keptSeries: false })).toBeNull();
    expect(resumeRefusal({ ...facts, keptSeries: false })).toMatch(/stored without its members' series.*100 members with seed 4242/);
    expect(resumeRefusal({ ...facts, missingModelRevision: 3 })).toMatch(/model revision 3, which this ensemble ran on, is no longer in the library/);
    expect(resumeRefusal({ ...facts, missingScenarios: ['Load cut'] })).toMatch(/revision this ensemble ran of Load cut is no longer/);
  });

  it('says what was stored, its size and where it is logged', () => {
    expect(membersWords(37, 100, true)).toBe('37 of 100 members (partial)');
    expect(sizeWords(412_345)).toBe('about 412 kB as JSON text');
    const f = { id: 'ens_0123456789abcdef', added: true, completed: 100, n: 100, partial: false, scenarios: 2, keptSeries: false, bytes: 1_234_567, logSeq: 57 };
    expect(storedSentence(f)).toBe(
      "Stored as ens_0123456789abcdef: 100 of 100 members under 2 scenarios, about 1.2 MB as JSON text, bands and each member's indicator values, without the members' series. It is in the archive log (entry 57), and Verify on the Archive screen rechecks it."
    );
    expect(storedSentence({ ...f, added: false, keptSeries: true })).toMatch(/^Already stored as ens_0123456789abcdef \(.*with each member's series\); nothing new was written\.$/);
  });
});

describe('ranges from a calibration', () => {
  const cal = {
    id: 'cal_0123456789abcdef',
    params: { kUp: { before: 0.5, after: 0.612345, min: 0.2, max: 1, space: 'linear' }, kRel: { before: 0.02, after: 0.03, min: 0.01, max: 0.05, space: 'log' } },
    intervals: { kUp: { low: 0.55, high: 0.61234, bounded: true }, kRel: { low: 0.01, high: 0.05, bounded: false } }
  };

  it('takes the bounded intervals, widened to hold the value written (rounded), and leaves the unbounded ones to the model', () => {
    const r = calibrationRanges(cal);
    expect(typeof r).toBe('object');
    if (typeof r === 'string') return;
    expect(r.replaced).toEqual(['kUp']);
    expect(r.values.kUp).toEqual({ value: 0.612345, low: 0.55, high: 0.612345 });
    const m = sampledModel(model, r);
    expect(m.parameters.find((p) => p.id === 'kUp')).toMatchObject({ value: 0.612345, range: { min: 0.55, max: 0.612345, distribution: 'triangular' } });
    expect(m.parameters.find((p) => p.id === 'kRel')!.range).toEqual(model.parameters.find((p) => p.id === 'kRel')!.range);
    expect(sampledModel(model, null)).toBe(model);
  });

  it('says why a calibration without intervals, or with none bounded, gives no ranges', () => {
    expect(calibrationRanges({ ...cal, intervals: undefined })).toMatch(/before intervals were kept/);
    expect(calibrationRanges({ ...cal, intervals: { kUp: { low: 0.2, high: 1, bounded: false } } })).toMatch(/bounds none of its parameters/);
  });

  it('a record names the calibration and its triangles, and reopening gives them back', () => {
    const r = calibrationRanges(cal);
    if (typeof r === 'string') throw new Error(r);
    const rec = throughArchive(ensembleRecordOf({ ...state(), ranges: r }, { keepSeries: false }));
    expect(rec.ranges).toEqual({ source: 'calibration', calibration: cal.id, replaced: ['kUp'], values: r.values });
    expect(restoreEnsemble(rec).ranges).toEqual(r);
    // without a calibration the record has no ranges field, so older records keep their ids
    expect('ranges' in ensembleRecordOf(state(), { keepSeries: false })).toBe(false);
    expect(checkRecord('ensemble', rec)).toEqual([]);
  });
});
