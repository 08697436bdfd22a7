/**
 * The library as an archive (src/lib/storage/archive.ts) under fake-indexeddb: verify
 * names a changed run, revision or log entry; a bundle exported from one library imports
 * into another all or nothing, the same bundle again is skipped, a tampered or conflicting
 * one is refused with nothing written, and the import is logged with the bundle's own log.
 */
import { describe, expect, it } from 'vitest';
import { verifyBundle } from '$lib/archive/bundle';
import { library, oneBox, withRun } from './archive-fixture';

describe('archive: verify', () => {
  it('a library as written verifies with no findings, counting what it checked', async () => {
    const { lib } = await withRun();
    const v = await lib.archive.verify();
    expect(v.findings).toEqual([]);
    expect(v.checked).toMatchObject({ runs: 1, revisions: 3 });
    expect(v.checked.entries).toBeGreaterThanOrEqual(4);
  });

  it('a run changed in the database, a changed revision and a changed log entry are each named', async () => {
    const { db, lib, run } = await withRun();
    const data = (await db.runData.get(run.id))!;
    data.columns[0][10] += 1;
    await db.runData.put(data);
    const rev = (await db.revisions.toArray())[0];
    await db.revisions.put({ ...rev, doc: { ...rev.doc, title: 'changed quietly' } });
    const first = (await db.log.get(1))!;
    await db.log.put({ ...first, by: 'someone else' });
    const { findings } = await lib.archive.verify();
    expect(findings.map((f) => `${f.kind}:${f.code}`).sort()).toEqual(['log:entry_digest', 'model:revision_digest', 'run:record_digest', 'run:run_id']);
    expect(findings.find((f) => f.code === 'record_digest')!.id).toBe(run.id);
  });
});

describe('archive: bundles', () => {
  it('export → import into another library adds everything; importing again skips it; both logged', async () => {
    const a = await withRun();
    const bundle = await a.lib.archive.bundleOf(a.m.key);
    expect(verifyBundle(bundle)).toEqual([]);
    expect((await a.lib.log.list()).at(-1)!.action).toBe('export');

    const b = library();
    const first = await b.lib.archive.importBundle(structuredClone(bundle));
    expect(first.ok).toBe(true);
    expect(first.plan!.added.map((i) => i.kind)).toEqual(['model', 'scenario', 'run']);
    const entries = await b.lib.list();
    expect(entries.map((e) => e.modelId)).toEqual([oneBox.id]);
    expect(await b.lib.runs.load(a.run.id)).toEqual(a.run);
    const runs = await b.lib.runs.list(entries[0].key);
    expect(runs[0]).toMatchObject({ modelRevision: 1, scenarioRevision: 1 });
    const again = await b.lib.archive.importBundle(structuredClone(bundle));
    expect(again.ok).toBe(true);
    expect(again.plan!.added).toEqual([]);
    expect(again.plan!.skipped).toHaveLength(3);
    const log = await b.lib.log.list();
    expect(log.map((e) => e.action)).toEqual(['import', 'import']);
    expect(await b.db.importedLogs.count()).toBe(2);
    expect((await b.lib.archive.verify()).findings).toEqual([]);
  });

  it('a tampered bundle is refused with its findings, and nothing is written', async () => {
    const a = await withRun();
    const bundle = structuredClone(await a.lib.archive.bundleOf(a.m.key));
    bundle.runs[0].series[Object.keys(bundle.runs[0].series)[0]][5] = 42;
    const b = library();
    const r = await b.lib.archive.importBundle(bundle);
    expect(r).toMatchObject({ ok: false, reason: 'invalid' });
    expect(r.findings.map((f) => f.code)).toContain('digest_mismatch');
    expect(await b.lib.list()).toEqual([]);
    expect(await b.lib.log.list()).toEqual([]);
  });

  it('a run id already stored with another record is a conflict: nothing of the bundle is written', async () => {
    const a = await withRun();
    const bundle = await a.lib.archive.bundleOf(a.m.key);
    const b = library();
    // the second library holds another model under the same id
    await b.lib.create({ ...structuredClone(oneBox), title: 'Another lake with the same id' }, 'import');
    const before = await b.db.log.count();
    const r = await b.lib.archive.importBundle(bundle);
    expect(r).toMatchObject({ ok: false, reason: 'conflict' });
    expect(r.plan!.conflicts.map((c) => c.kind)).toContain('model');
    expect(await b.db.runs.count()).toBe(0);
    expect(await b.db.scenarios.count()).toBe(0);
    expect(await b.db.log.count()).toBe(before);
  });

  it('a note is a log entry about its subject; an empty note is refused', async () => {
    const { lib, run } = await withRun();
    const e = await lib.archive.note('run', run.id, 'Figure 3 of the 2027 advice');
    expect(e).toMatchObject({ action: 'note', subject: { kind: 'run', id: run.id }, note: 'Figure 3 of the 2027 advice' });
    await expect(lib.archive.note('run', run.id, '  ')).rejects.toThrow(/empty/);
  });
});
