/**
 * Stored sweeps over Dexie (the contract is SweepStore in types.ts). A sweep is one row: the
 * `lakeledger.sweep/1` document as the engine wrote it, the model revision (number and
 * digest) it ran on and the screen's settings. Sweeps are small (a few numbers per swept
 * value), so the document is kept as it is, not split into columns as runs are.
 */
import { SWEEP_FORMAT } from '$lib/engine/longrun/sweep';
import type { LakeLedgerDb } from './db';
import type { StoredSweep, SweepStore } from './types';
import type { AuditLog } from './audit';
import { bundledSweepDigest } from '$lib/archive/bundle';

export interface SweepStoreDeps {
  now: () => string;
  newKey: () => string;
  /** Sweeps are archived like runs: each one stored or deleted is a log entry with its digest. */
  audit: AuditLog;
}

/** The digest of a stored sweep: its document and the settings it was run with. */
export function sweepDigest(row: Pick<StoredSweep, 'doc' | 'settings' | 'modelDigest'>): string {
  return bundledSweepDigest(row as never);
}

export function createSweepStore(db: LakeLedgerDb, deps: SweepStoreDeps): SweepStore {
  return {
    async save(doc, provenance, settings, wallMs) {
      if (doc.format !== SWEEP_FORMAT) throw new Error(`not a sweep document: format ${JSON.stringify(doc.format)} (expected ${SWEEP_FORMAT})`);
      if (doc.modelDigest !== provenance.modelDigest) {
        throw new Error(`the sweep ran on model ${doc.modelDigest}, not on revision ${provenance.modelRevision} (${provenance.modelDigest})`);
      }
      const row: StoredSweep = {
        id: `sweep_${deps.newKey()}`,
        modelKey: provenance.modelKey,
        modelRevision: provenance.modelRevision,
        modelDigest: provenance.modelDigest,
        settings: structuredClone(settings),
        doc: structuredClone(doc),
        storedAt: deps.now(),
        wallMs
      };
      const digest = sweepDigest(row);
      const stored: StoredSweep = { ...row, digest };
      await db.transaction('rw', db.sweeps, db.log, async () => {
        await db.sweeps.add(stored);
        await deps.audit.append('run', { kind: 'sweep', id: stored.id, digest }, `sweep of ${doc.target} over ${doc.values.length} values on model revision ${provenance.modelRevision}`);
      });
      return stored;
    },

    async list(modelKey) {
      const rows = await db.sweeps.where('modelKey').equals(modelKey).toArray();
      return rows.sort((a, b) => b.storedAt.localeCompare(a.storedAt) || b.id.localeCompare(a.id));
    },

    async get(id) {
      return db.sweeps.get(id);
    },

    async remove(id) {
      await db.transaction('rw', db.sweeps, db.log, async () => {
        const row = await db.sweeps.get(id);
        if (!row) return;
        await db.sweeps.delete(id);
        await deps.audit.append('delete', { kind: 'sweep', id, digest: row.digest ?? null }, 'a stored sweep');
      });
    }
  };
}
