/**
 * The database schema, one test per Dexie version: each version opens over an empty
 * IndexedDB with exactly its tables, primary keys and indexes (read back through Dexie and
 * through IndexedDB itself), and the newest schema opens a database an older one wrote.
 */
import { describe, expect, it } from 'vitest';
import { DB_NAME, DB_VERSION, SCHEMA, openDatabase } from '$lib/storage/db';
import { freshEnvironment } from './fixture';

/** Object stores, their key paths and index names, as IndexedDB itself reports them. */
async function rawStructure(factory: IDBFactory, name: string) {
  const idb = await new Promise<IDBDatabase>((resolve, reject) => {
    const req = factory.open(name);
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });
  const stores: Record<string, { keyPath: unknown; indexes: string[] }> = {};
  const names = Array.from(idb.objectStoreNames);
  const tx = idb.transaction(names, 'readonly');
  for (const n of names) {
    const store = tx.objectStore(n);
    stores[n] = { keyPath: store.keyPath, indexes: Array.from(store.indexNames).sort() };
  }
  idb.close();
  return { version: idb.version, stores };
}

describe('database schema', () => {
  it('SCHEMA lists versions 1, 2, … in order and DB_VERSION is the newest', () => {
    expect(SCHEMA.map((v) => v.version)).toEqual(SCHEMA.map((_, i) => i + 1));
    expect(DB_VERSION).toBe(SCHEMA.length);
  });

  it('version 1 opens with entries, revisions, drafts and meta, their keys and indexes', async () => {
    const env = freshEnvironment();
    const db = openDatabase(env, { upTo: 1 });
    await db.open();
    expect(db.name).toBe(DB_NAME);
    expect(db.verno).toBe(1);
    const tables = Object.fromEntries(
      db.tables.map((t) => [t.name, { key: t.schema.primKey.keyPath, indexes: t.schema.indexes.map((i) => i.keyPath) }])
    );
    expect(tables).toEqual({
      entries: { key: 'key', indexes: ['updatedAt'] },
      revisions: { key: ['entryKey', 'number'], indexes: ['entryKey'] },
      drafts: { key: 'entryKey', indexes: [] },
      meta: { key: 'key', indexes: [] }
    });
    db.close();

    // What is on disk, without Dexie (Dexie stores version v as IndexedDB version 10·v).
    const raw = await rawStructure(env.indexedDB as IDBFactory, DB_NAME);
    expect(raw.version).toBe(10);
    expect(raw.stores).toEqual({
      drafts: { keyPath: 'entryKey', indexes: [] },
      entries: { keyPath: 'key', indexes: ['updatedAt'] },
      meta: { keyPath: 'key', indexes: [] },
      revisions: { keyPath: ['entryKey', 'number'], indexes: ['entryKey'] }
    });
  });

  it('version 2 adds scenarios, their revisions and drafts, runs and run data, and keeps version 1 as it was', async () => {
    const env = freshEnvironment();
    const db = openDatabase(env, { upTo: 2 });
    await db.open();
    expect(db.verno).toBe(2);
    const tables = Object.fromEntries(
      db.tables.map((t) => [t.name, { key: t.schema.primKey.keyPath, indexes: t.schema.indexes.map((i) => i.keyPath).sort() }])
    );
    expect(tables).toEqual({
      entries: { key: 'key', indexes: ['updatedAt'] },
      revisions: { key: ['entryKey', 'number'], indexes: ['entryKey'] },
      drafts: { key: 'entryKey', indexes: [] },
      meta: { key: 'key', indexes: [] },
      scenarios: { key: 'key', indexes: ['modelKey'] },
      scenarioRevisions: { key: ['scenarioKey', 'number'], indexes: ['scenarioKey'] },
      scenarioDrafts: { key: 'scenarioKey', indexes: [] },
      runs: { key: 'id', indexes: ['modelKey', 'scenarioKey', 'storedAt'] },
      runData: { key: 'id', indexes: [] }
    });
    db.close();
    const raw = await rawStructure(env.indexedDB as IDBFactory, DB_NAME);
    expect(raw.version).toBe(20);
  });

  it('version 2 opens a library that version 1 wrote: entries, revisions, drafts and flags kept, new tables empty', async () => {
    const env = freshEnvironment();
    const v1 = openDatabase(env, { upTo: 1 });
    const entry = { key: 'k1', modelId: 'lake', title: 'Lake', origin: 'import' as const, createdAt: 'a', updatedAt: 'a', head: 1, headDigest: 'sha256:00', dirty: true };
    await v1.entries.put(entry);
    await v1.revisions.put({ entryKey: 'k1', number: 1, digest: 'sha256:00', doc: { id: 'lake' } as never, savedAt: 'a' });
    await v1.drafts.put({ entryKey: 'k1', doc: { id: 'lake', title: 'edited' }, savedAt: 'b' });
    await v1.meta.put({ key: 'seeded', value: 'a' });
    v1.close();
    const v2 = openDatabase(env, { upTo: 2 });
    await v2.open();
    expect(await v2.entries.get('k1')).toEqual(entry);
    expect((await v2.revisions.get(['k1', 1]))?.doc).toEqual({ id: 'lake' });
    expect((await v2.drafts.get('k1'))?.doc).toEqual({ id: 'lake', title: 'edited' });
    expect(await v2.meta.get('seeded')).toEqual({ key: 'seeded', value: 'a' });
    expect(await v2.scenarios.count()).toBe(0);
    expect(await v2.runs.count()).toBe(0);
    v2.close();
  });

  it('the newest schema opens a database that version 1 wrote, with its rows', async () => {
    const env = freshEnvironment();
    const v1 = openDatabase(env, { upTo: 1 });
    await v1.meta.put({ key: 'seeded', value: '2027-01-01T00:00:00.000Z' });
    await v1.drafts.put({ entryKey: 'a', doc: { id: 'x' }, savedAt: '2027-01-01T00:00:00.000Z' });
    v1.close();
    const newest = openDatabase(env);
    await newest.open();
    expect(newest.verno).toBe(DB_VERSION);
    expect(await newest.meta.get('seeded')).toEqual({ key: 'seeded', value: '2027-01-01T00:00:00.000Z' });
    expect((await newest.drafts.get('a'))?.doc).toEqual({ id: 'x' });
    newest.close();
  });

  it('version 3 adds sweeps (id, indexes modelKey and storedAt) and keeps version 2 as it was', async () => {
    const env = freshEnvironment();
    const db = openDatabase(env, { upTo: 3 });
    await db.open();
    expect(db.verno).toBe(3);
    const tables = Object.fromEntries(
      db.tables.map((t) => [t.name, { key: t.schema.primKey.keyPath, indexes: t.schema.indexes.map((i) => i.keyPath).sort() }])
    );
    expect(tables).toEqual({
      entries: { key: 'key', indexes: ['updatedAt'] },
      revisions: { key: ['entryKey', 'number'], indexes: ['entryKey'] },
      drafts: { key: 'entryKey', indexes: [] },
      meta: { key: 'key', indexes: [] },
      scenarios: { key: 'key', indexes: ['modelKey'] },
      scenarioRevisions: { key: ['scenarioKey', 'number'], indexes: ['scenarioKey'] },
      scenarioDrafts: { key: 'scenarioKey', indexes: [] },
      runs: { key: 'id', indexes: ['modelKey', 'scenarioKey', 'storedAt'] },
      runData: { key: 'id', indexes: [] },
      sweeps: { key: 'id', indexes: ['modelKey', 'storedAt'] }
    });
    db.close();
    const raw = await rawStructure(env.indexedDB as IDBFactory, DB_NAME);
    expect(raw.version).toBe(30);
    expect(raw.stores.sweeps).toEqual({ keyPath: 'id', indexes: ['modelKey', 'storedAt'] });
  });

  it('version 3 opens a library that version 2 wrote: scenarios and runs kept, sweeps empty', async () => {
    const env = freshEnvironment();
    const v2 = openDatabase(env, { upTo: 2 });
    const scenario = { key: 's1', modelKey: 'k1', scenarioId: 'baseline', title: 'Baseline', origin: 'baseline' as const, createdAt: 'a', updatedAt: 'a', head: 1, headDigest: 'sha256:01', dirty: false };
    await v2.scenarios.put(scenario);
    await v2.runs.put({ id: 'run_0000000000000001', modelKey: 'k1', scenarioKey: 's1' } as never);
    await v2.runData.put({ id: 'run_0000000000000001', times: Float64Array.from([0, 1]), seriesIds: ['P'], columns: [Float64Array.from([1, 2])], units: {}, budget: [] });
    v2.close();
    const v3 = openDatabase(env, { upTo: 3 });
    await v3.open();
    expect(await v3.scenarios.get('s1')).toEqual(scenario);
    expect((await v3.runs.get('run_0000000000000001'))?.modelKey).toBe('k1');
    expect(Array.from((await v3.runData.get('run_0000000000000001'))!.columns[0])).toEqual([1, 2]);
    expect(await v3.sweeps.count()).toBe(0);
    v3.close();
  });

  it('version 5 adds ensembles, their members, observation sets and calibrations, and keeps version 4 as it was', async () => {
    const env = freshEnvironment();
    const db = openDatabase(env, { upTo: 5 });
    await db.open();
    expect(db.verno).toBe(5);
    const tables = Object.fromEntries(
      db.tables.map((t) => [t.name, { key: t.schema.primKey.keyPath, indexes: t.schema.indexes.map((i) => i.keyPath).sort() }])
    );
    expect(tables).toMatchObject({
      log: { key: 'seq', indexes: [] },
      importedLogs: { key: 'importSeq', indexes: [] },
      sweeps: { key: 'id', indexes: ['modelKey', 'storedAt'] },
      ensembles: { key: 'id', indexes: ['modelKey', 'storedAt'] },
      ensembleMembers: { key: 'id', indexes: [] },
      observations: { key: 'id', indexes: ['modelKey', 'storedAt'] },
      calibrations: { key: 'id', indexes: ['modelKey', 'storedAt'] }
    });
    expect(Object.keys(tables).length).toBe(16);
    db.close();
    const raw = await rawStructure(env.indexedDB as IDBFactory, DB_NAME);
    expect(raw.version).toBe(50);
    expect(raw.stores.ensembleMembers).toEqual({ keyPath: 'id', indexes: [] });
  });

  it('version 5 opens a library that version 4 wrote: the log kept, the new tables empty', async () => {
    const env = freshEnvironment();
    const v4 = openDatabase(env, { upTo: 4 });
    const entry = { seq: 1, at: '2027-01-01T00:00:00.000Z', by: 'a', action: 'create', subject: { kind: 'model', id: 'm', digest: null }, note: '', prev: null, digest: 'sha256:00' };
    await v4.log.put(entry as never);
    v4.close();
    const v5 = openDatabase(env, { upTo: 5 });
    await v5.open();
    expect(await v5.log.get(1)).toEqual(entry);
    expect(await v5.ensembles.count()).toBe(0);
    expect(await v5.observations.count()).toBe(0);
    expect(await v5.calibrations.count()).toBe(0);
    v5.close();
  });
});
