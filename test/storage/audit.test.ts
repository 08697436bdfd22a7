/**
 * The audit log over Dexie (src/lib/storage/audit.ts) under fake-indexeddb: entries chain,
 * an entry is written with its change or not at all, and a changed, removed or inserted
 * entry is named by verify().
 */
import { describe, expect, it } from 'vitest';
import Dexie, { type Table } from 'dexie';
import { IDBFactory, IDBKeyRange } from 'fake-indexeddb';
import type { LogEntry } from '$lib/archive/log';
import { createAuditLog } from '$lib/storage/audit';

function setUp() {
  const db = new Dexie('audit-test', { indexedDB: new IDBFactory(), IDBKeyRange });
  db.version(1).stores({ log: 'seq', things: 'id' });
  const log = db.table('log') as Table<LogEntry, number>;
  let t = 0;
  const audit = createAuditLog(log, { now: () => `2027-01-01T00:00:0${t++}.000Z`, who: () => 'R. Modeller' });
  return { db, log, audit };
}

describe('audit log', () => {
  it('entries are numbered from 1, each pointing to the digest of the one before, with who and when', async () => {
    const { audit } = setUp();
    const a = await audit.append('create', { kind: 'model', id: 'lake', digest: 'sha256:aa' });
    const b = await audit.append('run', { kind: 'run', id: 'run_1', digest: 'sha256:bb' }, 'first try');
    expect(a).toMatchObject({ seq: 1, prev: null, by: 'R. Modeller', action: 'create' });
    expect(b).toMatchObject({ seq: 2, prev: a.digest, note: 'first try' });
    expect(await audit.verify()).toEqual([]);
    expect((await audit.about('run', 'run_1')).map((e) => e.seq)).toEqual([2]);
  });

  it('an entry is written with its change in one transaction, or not at all', async () => {
    const { db, audit, log } = setUp();
    await expect(
      db.transaction('rw', db.table('things'), log, async () => {
        await db.table('things').add({ id: 'x' });
        await audit.append('create', { kind: 'model', id: 'x', digest: null });
        throw new Error('the disk is full');
      })
    ).rejects.toThrow('the disk is full');
    expect(await log.count()).toBe(0);
    expect(await db.table('things').count()).toBe(0);
  });

  it('verify() names a changed entry and a removed one', async () => {
    const { audit, log } = setUp();
    for (const id of ['a', 'b', 'c', 'd']) await audit.append('create', { kind: 'model', id, digest: null });
    const second = (await log.get(2))!;
    await log.put({ ...second, by: 'someone else' });
    let findings = await audit.verify();
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ seq: 2, code: 'entry_digest' });

    await log.put(second);
    await log.delete(3);
    findings = await audit.verify();
    expect(findings.map((f) => f.code).sort()).toEqual(['chain_broken', 'seq_gap']);
    expect(findings[0].seq).toBe(4);
  });
});
