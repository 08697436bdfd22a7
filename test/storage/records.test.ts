/**
 * Stored records (src/lib/storage/records.ts, archive/records.ts) under fake-indexeddb:
 * ensembles, observation sets and calibrations are sealed with a content id, stored once
 * with a log entry, listed per model, come back whole (an ensemble with its members, kept
 * in their own table), are rechecked by verify, and travel in bundles: exported with the
 * model's runs, imported all or nothing into another library, refused when tampered with.
 */
import { describe, expect, it } from 'vitest';
import { digestOf } from '$lib/engine/document/digest';
import { sha256Hex } from '$lib/engine/document/sha256';
import { verifyBundle } from '$lib/archive/bundle';
import { checkRecord, recordDigestOf, ENSEMBLE_RECORD_FORMAT, OBSERVATIONS_RECORD_FORMAT, CALIBRATION_RECORD_FORMAT, type EnsembleRecord, type ObservationsRecord, type CalibrationRecord } from '$lib/archive/records';
import type { ScenarioDoc } from '$lib/engine/document/types';
import { library, oneBox, withRun } from './archive-fixture';

function ensembleRecord(scenario: ScenarioDoc, keptSeries = true): Omit<EnsembleRecord, 'id'> {
  const member = (j: number) => ({
    member: j,
    runs: [{ status: 'ok' as const, closed: true, relativeResidual: 1e-14, code: null, message: null, values: { 'P.mean': 10 + j }, series: keptSeries ? { totalP: [10 + j, 11 + j, 12 + j] } : null }]
  });
  return {
    format: ENSEMBLE_RECORD_FORMAT,
    model: oneBox.id,
    modelDigest: digestOf(oneBox),
    scenarios: [{ id: scenario.id, title: 'Baseline', digest: digestOf(scenario) }],
    n: 4,
    seed: 7,
    completed: 3,
    partial: true,
    engine: 'test',
    autoStart: 'dp54',
    sampling: 'latin hypercube',
    sampled: { parameters: ['k'], states: [] },
    gridDays: 10,
    columns: [{ key: 'P.mean', role: 'totalP', label: 'Total P', unit: 'mg/m^3', better: 'lower' }],
    roles: { totalP: { id: 'P', label: 'Total P', unit: 'mg/m^3' } },
    members: [member(0), member(1), member(2)],
    keptSeries,
    bands: { totalP: [{ days: [0, 10, 20], p05: [10.1, 11.1, 12.1], p25: [10.5, 11.5, 12.5], p50: [11, 12, 13], p75: [11.5, 12.5, 13.5], p95: [11.9, 12.9, 13.9], members: 3 }] },
    wallMs: 1200
  };
}

const CSV = 'date,variable,value,unit\n2027-05-01,P,12.5,mg/m^3\n2027-06-01,P,<2,mg/m^3\n';

function observationsRecord(): Omit<ObservationsRecord, 'id'> {
  return {
    format: OBSERVATIONS_RECORD_FORMAT,
    model: oneBox.id,
    name: 'monitoring-2027.csv',
    text: CSV,
    textDigest: `sha256:${sha256Hex(CSV)}`,
    mapping: { P: 'P' },
    options: { combine: 'mean', station: null, maxDepth: null },
    rows: 2,
    used: 2,
    wallMs: 3
  };
}

function calibrationRecord(obsId: string, scenario: ScenarioDoc): Omit<CalibrationRecord, 'id'> {
  return {
    format: CALIBRATION_RECORD_FORMAT,
    model: oneBox.id,
    modelDigestBefore: digestOf(oneBox),
    modelDigestAfter: digestOf(oneBox),
    revisionAfter: 2,
    scenario: { id: scenario.id, digest: digestOf(scenario) },
    observations: { id: obsId, name: 'monitoring-2027.csv', textDigest: `sha256:${sha256Hex(CSV)}` },
    objective: { kind: 'weighted squared residuals', before: 1, after: 0.25 },
    params: { k: { before: 0.1, after: 0.12, min: 0.01, max: 1, space: 'log' } },
    variables: { P: { weight: 1 } },
    iterations: 4,
    evaluations: 13,
    converged: true,
    cancelled: false,
    path: [1, 0.5, 0.26, 0.25, 0.25],
    statistics: { P: { n: 2, rmse: 0.5, bias: 0.1, nse: 0.75, logNse: null } },
    warnings: [],
    acceptedAt: '2027-03-01T10:00:00.000Z',
    wallMs: 800
  };
}

describe('record stores', () => {
  it('an ensemble is sealed with a content id, stored once with one log entry, and comes back whole', async () => {
    const { lib, m, scenario, scenarioKey, scenarioRevision } = await withRun();
    const before = (await lib.log.list()).length;
    const rec = ensembleRecord(scenario);
    const { row, added } = await lib.ensembles.save(rec, { modelKey: m.key, modelRevision: 1, scenarios: [{ key: scenarioKey, revision: scenarioRevision }] });
    expect(added).toBe(true);
    expect(row.id).toMatch(/^ens_[0-9a-f]{16}$/);
    expect(row.digest).toBe(recordDigestOf({ ...rec, id: row.id }));
    expect(row.memberCount).toBe(3);
    // the list row is light: the members are apart
    const [listed] = await lib.ensembles.list(m.key);
    expect(listed.record.members).toEqual([]);
    const whole = await lib.ensembles.get(row.id);
    expect(whole).toEqual({ ...rec, id: row.id });
    const log = await lib.log.list();
    expect(log.length).toBe(before + 1);
    expect(log.at(-1)).toMatchObject({ action: 'run', subject: { kind: 'ensemble', id: row.id, digest: row.digest } });
    expect(log.at(-1)!.note).toContain('3 of 4 members');
    // the same content again: nothing new, nothing logged
    const again = await lib.ensembles.save(rec, { modelKey: m.key, modelRevision: 1 });
    expect(again.added).toBe(false);
    expect(again.row.id).toBe(row.id);
    expect((await lib.log.list()).length).toBe(before + 1);
  });

  it('the wall-clock time does not change the id; any result does', async () => {
    const { scenario } = await withRun();
    const a = ensembleRecord(scenario);
    const b = { ...a, wallMs: 99 };
    const c = structuredClone(a);
    c.members[1].runs[0].values['P.mean'] = 11.5;
    expect(recordDigestOf(b)).toBe(recordDigestOf(a));
    expect(recordDigestOf(c)).not.toBe(recordDigestOf(a));
  });

  it('observation sets and calibrations are listed per model, newest first, and removed with a log entry', async () => {
    const { lib, m, scenario } = await withRun();
    const obs = await lib.observations.save(observationsRecord(), { modelKey: m.key, modelRevision: null });
    expect(obs.row.id).toMatch(/^obs_/);
    const cal = await lib.calibrations.save(calibrationRecord(obs.row.id, scenario), { modelKey: m.key, modelRevision: 2 });
    expect(cal.row.id).toMatch(/^cal_/);
    expect((await lib.observations.list(m.key)).map((r) => r.id)).toEqual([obs.row.id]);
    expect((await lib.observations.list('another')).length).toBe(0);
    expect((await lib.calibrations.get(cal.row.id))!.observations.id).toBe(obs.row.id);
    await lib.observations.remove(obs.row.id);
    expect(await lib.observations.get(obs.row.id)).toBeUndefined();
    expect((await lib.log.list()).at(-1)).toMatchObject({ action: 'delete', subject: { kind: 'observations', id: obs.row.id } });
  });
});

describe('verify rechecks records', () => {
  it('a library with records verifies clean and counts them', async () => {
    const { lib, m, scenario } = await withRun();
    await lib.ensembles.save(ensembleRecord(scenario), { modelKey: m.key, modelRevision: 1 });
    const obs = await lib.observations.save(observationsRecord(), { modelKey: m.key, modelRevision: null });
    await lib.calibrations.save(calibrationRecord(obs.row.id, scenario), { modelKey: m.key, modelRevision: 2 });
    const v = await lib.archive.verify();
    expect(v.findings).toEqual([]);
    expect(v.checked).toMatchObject({ ensembles: 1, observations: 1, calibrations: 1, runs: 1 });
  });

  it('a member value changed in the database, an edited observation text and a lost members row are each named', async () => {
    const { db, lib, m, scenario } = await withRun();
    const ens = await lib.ensembles.save(ensembleRecord(scenario), { modelKey: m.key, modelRevision: 1 });
    const ens2 = await lib.ensembles.save({ ...ensembleRecord(scenario), seed: 8 }, { modelKey: m.key, modelRevision: 1 });
    const obs = await lib.observations.save(observationsRecord(), { modelKey: m.key, modelRevision: null });
    const members = (await db.ensembleMembers.get(ens.row.id))!;
    members.members[0].runs[0].values['P.mean'] = 99;
    await db.ensembleMembers.put(members);
    await db.ensembleMembers.delete(ens2.row.id);
    const o = (await db.observations.get(obs.row.id))!;
    await db.observations.put({ ...o, record: { ...o.record, text: o.record.text.replace('12.5', '125') } });
    const { findings } = await lib.archive.verify();
    const got = findings.map((f) => `${f.kind}:${f.code}:${f.id}`).sort();
    expect(got).toEqual([`ensemble:members_missing:${ens2.row.id}`, `ensemble:record_digest:${ens.row.id}`, `observations:record_digest:${obs.row.id}`].sort());
  });
});

describe('bundles carry records', () => {
  async function full() {
    const a = await withRun();
    const ens = await a.lib.ensembles.save(ensembleRecord(a.scenario), { modelKey: a.m.key, modelRevision: 1, scenarios: [{ key: a.scenarioKey, revision: a.scenarioRevision }] });
    const obs = await a.lib.observations.save(observationsRecord(), { modelKey: a.m.key, modelRevision: null });
    const cal = await a.lib.calibrations.save(calibrationRecord(obs.row.id, a.scenario), { modelKey: a.m.key, modelRevision: 1 });
    return { ...a, ens, obs, cal };
  }

  it('export holds the ensembles, observation sets and calibrations with digests; import adds them with their members', async () => {
    const a = await full();
    const bundle = await a.lib.archive.bundleOf(a.m.key);
    expect(verifyBundle(bundle)).toEqual([]);
    expect(bundle.ensembles!.map((e) => e.id)).toEqual([a.ens.row.id]);
    expect(bundle.ensembles![0].members).toHaveLength(3);
    expect(bundle.observations!.map((e) => e.id)).toEqual([a.obs.row.id]);
    expect(bundle.calibrations!.map((e) => e.id)).toEqual([a.cal.row.id]);
    expect(bundle.digests.ensembles![a.ens.row.id]).toBe(a.ens.row.digest);
    expect((await a.lib.log.list()).at(-1)!.note).toContain('1 ensembles');

    const b = library();
    const r = await b.lib.archive.importBundle(structuredClone(bundle));
    expect(r.ok).toBe(true);
    expect(r.plan!.added.map((i) => i.kind).sort()).toEqual(['calibration', 'ensemble', 'model', 'observations', 'run', 'scenario']);
    const [entry] = await b.lib.list();
    const [row] = await b.lib.ensembles.list(entry.key);
    expect(row.provenance.modelRevision).toBe(1);
    expect(row.provenance.scenarios![0].revision).toBe(1);
    expect(await b.lib.ensembles.get(a.ens.row.id)).toEqual(await a.lib.ensembles.get(a.ens.row.id));
    expect(await b.lib.observations.get(a.obs.row.id)).toEqual(await a.lib.observations.get(a.obs.row.id));
    expect((await b.lib.archive.verify()).findings).toEqual([]);
    const again = await b.lib.archive.importBundle(structuredClone(bundle));
    expect(again.plan!.added).toEqual([]);
    expect(again.plan!.skipped.map((i) => i.kind)).toContain('ensemble');
  });

  it('a member value changed in the bundle is refused with the ensemble named, and nothing is written', async () => {
    const a = await full();
    const bundle = structuredClone(await a.lib.archive.bundleOf(a.m.key));
    bundle.ensembles![0].members[2].runs[0].values['P.mean'] = 0;
    const findings = verifyBundle(bundle);
    expect(findings.map((f) => `${f.kind}:${f.code}:${f.id}`)).toContain(`ensemble:digest_mismatch:${a.ens.row.id}`);
    const b = library();
    const r = await b.lib.archive.importBundle(bundle);
    expect(r).toMatchObject({ ok: false, reason: 'invalid' });
    expect(await b.lib.list()).toEqual([]);
    expect(await b.db.ensembles.count()).toBe(0);
  });

  it('an ensemble whose scenario is not in the bundle, and a digest table without its record, are named', async () => {
    const a = await full();
    const bundle = structuredClone(await a.lib.archive.bundleOf(a.m.key));
    bundle.ensembles![0].scenarios[0].digest = 'sha256:' + '0'.repeat(64);
    // re-seal so that only the missing scenario is wrong
    const { id: _old, ...content } = bundle.ensembles![0];
    const digest = recordDigestOf(content);
    bundle.ensembles![0].id = `ens_${digest.slice(7, 23)}`;
    bundle.digests.ensembles = { [bundle.ensembles![0].id]: digest };
    bundle.digests.observations!['obs_ffffffffffffffff'] = 'sha256:1';
    const codes = verifyBundle(bundle).map((f) => `${f.kind}:${f.code}`);
    expect(codes).toContain('ensemble:unknown_input');
    expect(codes).toContain('observations:missing_document');
  });

  it('a bundle written before records existed (no lists, no tables) is still read', async () => {
    const a = await withRun();
    const bundle = structuredClone(await a.lib.archive.bundleOf(a.m.key)) as unknown as Record<string, unknown>;
    delete bundle.ensembles;
    delete bundle.observations;
    delete bundle.calibrations;
    const d = bundle.digests as Record<string, unknown>;
    delete d.ensembles;
    delete d.observations;
    delete d.calibrations;
    expect(verifyBundle(bundle)).toEqual([]);
    const b = library();
    expect((await b.lib.archive.importBundle(bundle)).ok).toBe(true);
  });

  it('checkRecord names a wrong format, a missing field and an id that does not match', () => {
    expect(checkRecord('ensemble', { format: 'x' })[0]).toMatch(/format 'x'/);
    expect(checkRecord('observations', { format: OBSERVATIONS_RECORD_FORMAT, id: 'obs_1' })[0]).toMatch(/'model' must be a string/);
    const rec = { ...observationsRecord(), id: 'obs_0000000000000000' };
    expect(checkRecord('observations', rec)[0]).toMatch(/does not match its content/);
  });
});

describe('records follow their model', () => {
  it("a model's removal takes its ensembles, observation sets and calibrations along, and Undo restores them", async () => {
    const { db, lib, m, scenario } = await withRun();
    const ens = await lib.ensembles.save(ensembleRecord(scenario), { modelKey: m.key, modelRevision: 1 });
    const obs = await lib.observations.save(observationsRecord(), { modelKey: m.key, modelRevision: null });
    const cal = await lib.calibrations.save(calibrationRecord(obs.row.id, scenario), { modelKey: m.key, modelRevision: 1 });
    const whole = await lib.ensembles.get(ens.row.id);
    const { undo } = await lib.remove(m.key);
    expect([await db.ensembles.count(), await db.ensembleMembers.count(), await db.observations.count(), await db.calibrations.count()]).toEqual([0, 0, 0, 0]);
    await undo();
    expect(await lib.ensembles.get(ens.row.id)).toEqual(whole);
    expect(await lib.calibrations.row(cal.row.id)).toEqual(cal.row);
    expect((await lib.archive.verify()).findings).toEqual([]);
  });
});

describe('sweeps travel in bundles', () => {
  it('a stored sweep of the bundle revision is exported, verified and imported; a changed one is refused', async () => {
    const a = await withRun();
    const doc = { format: 'lakeledger.sweep/1', modelDigest: digestOf(oneBox), target: 'k', values: [1, 2], switchPoints: [] } as never;
    const settings = { startLowFrom: 'a', startHighFrom: 'b', refine: 0, indicatorLabel: 'P', indicatorUnit: 'mg/m^3', targetLabel: 'k', targetUnit: '1/d' };
    const sw = await a.lib.sweeps.save(doc, { modelKey: a.m.key, modelRevision: 1, modelDigest: digestOf(oneBox) }, settings, 5);
    const bundle = await a.lib.archive.bundleOf(a.m.key);
    expect(bundle.sweeps!.map((s) => s.id)).toEqual([sw.id]);
    expect(bundle.digests.sweeps![sw.id]).toBe(sw.digest);
    expect(verifyBundle(bundle)).toEqual([]);
    const b = library();
    const r = await b.lib.archive.importBundle(structuredClone(bundle));
    expect(r.ok).toBe(true);
    const [entry] = await b.lib.list();
    const got = await b.lib.sweeps.get(sw.id);
    expect(got).toMatchObject({ modelKey: entry.key, modelRevision: 1, digest: sw.digest, settings, doc });
    expect((await b.lib.archive.verify()).findings).toEqual([]);

    const bad = structuredClone(bundle);
    (bad.sweeps![0].doc as Record<string, unknown>).values = [1, 3];
    expect(verifyBundle(bad).map((f) => `${f.kind}:${f.code}:${f.id}`)).toEqual([`sweep:digest_mismatch:${sw.id}`]);
  });
});
