/**
 * Stored records over Dexie (the contract is RecordStore in types.ts): ensembles,
 * observation sets and accepted calibrations. Each is sealed (archive/records.ts: a
 * content id and a digest) and stored with one log entry in the same transaction; the same
 * content is stored once. An ensemble's members live in their own table (listing stays
 * light); the digest covers them, and `get` joins them again.
 */
import type { Table } from 'dexie';
import { sealRecord, type RecordKind } from '$lib/archive/records';
import type { LakeLedgerDb } from './db';
import type { AuditLog } from './audit';
import type { RecordStore, RecordTypes, StoredRecordRow } from './types';

export interface RecordStoreDeps {
  now: () => string;
  audit: AuditLog;
}

/** The words of the log entry when a record is stored. */
function storedWords(kind: RecordKind, record: RecordTypes[RecordKind], revision: number | null): string {
  switch (kind) {
    case 'ensemble': {
      const r = record as RecordTypes['ensemble'];
      return `ensemble of ${r.completed} of ${r.n} members (seed ${r.seed}${r.partial ? ', partial' : ''}) under ${r.scenarios.map((s) => s.id).join(', ')} on model revision ${revision ?? '?'}${r.keptSeries ? ', member series kept' : ''}`;
    }
    case 'observations': {
      const r = record as RecordTypes['observations'];
      return `observations '${r.name}' (${r.textDigest.slice(0, 19)}…): ${r.used} of ${r.rows} rows used`;
    }
    case 'calibration': {
      const r = record as RecordTypes['calibration'];
      return `calibration of ${Object.keys(r.params).join(', ')} against '${r.observations.name}': objective ${r.objective.before.toPrecision(4)} → ${r.objective.after.toPrecision(4)}, revision ${r.revisionAfter}`;
    }
  }
}

export function createRecordStore<K extends RecordKind>(db: LakeLedgerDb, kind: K, deps: RecordStoreDeps): RecordStore<K> {
  const table = (kind === 'ensemble' ? db.ensembles : kind === 'observations' ? db.observations : db.calibrations) as unknown as Table<StoredRecordRow<K>, string>;
  const tables = kind === 'ensemble' ? [table, db.ensembleMembers, db.log] : [table, db.log];
  return {
    async save(input, provenance) {
      const { record, digest } = sealRecord<RecordTypes[K]>(kind, structuredClone(input) as never);
      return db.transaction('rw', tables, async () => {
        const there = await table.get(record.id);
        if (there) return { row: there, added: false };
        const members = kind === 'ensemble' ? (record as RecordTypes['ensemble']).members : null;
        const row: StoredRecordRow<K> = {
          id: record.id,
          modelKey: provenance.modelKey,
          provenance: structuredClone(provenance),
          record: (members ? { ...record, members: [] } : record) as RecordTypes[K],
          digest,
          storedAt: deps.now(),
          memberCount: members?.length ?? 0
        };
        await table.add(row);
        if (members) await db.ensembleMembers.add({ id: record.id, members });
        await deps.audit.append('run', { kind, id: record.id, digest }, storedWords(kind, record, provenance.modelRevision));
        return { row, added: true };
      });
    },

    async list(modelKey) {
      const rows = await table.where('modelKey').equals(modelKey).toArray();
      return rows.sort((a, b) => b.storedAt.localeCompare(a.storedAt) || b.id.localeCompare(a.id));
    },

    async row(id) {
      return table.get(id);
    },

    async get(id) {
      const row = await table.get(id);
      if (!row) return undefined;
      if (kind !== 'ensemble') return row.record;
      const m = await db.ensembleMembers.get(id);
      return { ...row.record, members: m?.members ?? [] } as RecordTypes[K];
    },

    async remove(id) {
      await db.transaction('rw', tables, async () => {
        const row = await table.get(id);
        if (!row) return;
        await table.delete(id);
        if (kind === 'ensemble') await db.ensembleMembers.delete(id);
        await deps.audit.append('delete', { kind, id, digest: row.digest }, `a stored ${kind === 'observations' ? 'observation set' : kind}`);
      });
    }
  };
}
