/**
 * Stored sweeps over Dexie (the contract is SweepStore in types.ts). A sweep is one row: the
 * `lakeledger.sweep/1` document as the engine wrote it, the model revision (number and
 * digest) it ran on and the screen's settings. Sweeps are small (a few numbers per swept
 * value), so the document is kept as it is, not split into columns as runs are.
 */
import { SWEEP_FORMAT } from '$lib/engine/longrun/sweep';
import type { LakeLedgerDb } from './db';
import type { StoredSweep, SweepStore } from './types';

export interface SweepStoreDeps {
  now: () => string;
  newKey: () => string;
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
      await db.sweeps.add(row);
      return row;
    },

    async list(modelKey) {
      const rows = await db.sweeps.where('modelKey').equals(modelKey).toArray();
      return rows.sort((a, b) => b.storedAt.localeCompare(a.storedAt) || b.id.localeCompare(a.id));
    },

    async get(id) {
      return db.sweeps.get(id);
    },

    async remove(id) {
      await db.sweeps.delete(id);
    }
  };
}
