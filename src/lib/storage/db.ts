/**
 * The library's IndexedDB database, through Dexie. The schema is versioned: each version
 * is one row of SCHEMA (its stores and, from version 2 on, the upgrade that carries the
 * rows of the version before it forward), and test/storage/db.test.ts opens each version.
 * The environment (IndexedDB and IDBKeyRange) is passed in, never read from globals here,
 * so the same code runs over the browser's IndexedDB and over fake-indexeddb in tests.
 */
import Dexie, { type DexieOptions, type Table, type Transaction } from 'dexie';
import type { LogEntry } from '$lib/archive/log';
import type { ModelEntry, Revision, ScenarioEntry, ScenarioRevision, StoredRecordRow, StoredRunSummary, StoredSweep } from './types';
import type { EnsembleRecord } from '$lib/archive/records';

export const DB_NAME = 'lakeledger';

/** The working copy of one entry: saved as it is, valid or not. */
export interface DraftRow {
  entryKey: string;
  doc: unknown;
  /** ISO timestamp. */
  savedAt: string;
}

/** Flags of the library itself, e.g. `seeded` (the examples were added once). */
export interface MetaRow {
  key: string;
  value: unknown;
}

/** The working copy of one scenario. */
export interface ScenarioDraftRow {
  scenarioKey: string;
  doc: unknown;
  savedAt: string;
}

/** A stored run as listed: everything but times, series and budget. */
export type RunRow = StoredRunSummary;

/**
 * A stored run's bulk: times and series as Float64Array columns (IndexedDB keeps typed
 * arrays as binary, not as JSON text), units and the annual budget. Read only to load a run.
 */
export interface RunDataRow {
  id: string;
  times: Float64Array;
  /** Series ids in the run's order, and one column per id. */
  seriesIds: string[];
  columns: Float64Array[];
  units: Record<string, string>;
  budget: unknown[];
}

/** The log segment of an imported bundle, kept as it came (its own chain), under the import's entry. */
export interface ImportedLogRow {
  /** `seq` of the local log entry that records the import. */
  importSeq: number;
  entries: LogEntry[];
}

/** An ensemble's members, apart from its row so that listing ensembles stays light. */
export interface EnsembleMembersRow {
  id: string;
  members: EnsembleRecord['members'];
}

export interface SchemaVersion {
  version: number;
  /** Dexie's store syntax: the primary key first, then the indexes. */
  stores: Record<string, string>;
  /** Carries the rows of the previous version forward (none for version 1). */
  upgrade?: (tx: Transaction) => Promise<void> | void;
}

// Each version's stores are the previous version's and what it adds (a table never changes
// its key or indexes once written; a change would be a new version with an upgrade).
const V1_STORES = {
  entries: 'key, updatedAt',
  revisions: '[entryKey+number], entryKey',
  drafts: 'entryKey',
  meta: 'key'
};
const V2_STORES = {
  ...V1_STORES,
  scenarios: 'key, modelKey',
  scenarioRevisions: '[scenarioKey+number], scenarioKey',
  scenarioDrafts: 'scenarioKey',
  runs: 'id, modelKey, scenarioKey, storedAt',
  runData: 'id'
};
const V3_STORES = { ...V2_STORES, sweeps: 'id, modelKey, storedAt' };
const V4_STORES = { ...V3_STORES, log: 'seq', importedLogs: 'importSeq' };
const V5_STORES = {
  ...V4_STORES,
  ensembles: 'id, modelKey, storedAt',
  ensembleMembers: 'id',
  observations: 'id, modelKey, storedAt',
  calibrations: 'id, modelKey, storedAt'
};

/** Every version of the schema, oldest first. A new version is a new row, never an edit. */
export const SCHEMA: readonly SchemaVersion[] = [
  { version: 1, stores: V1_STORES },
  // Scenarios (with revisions and drafts like models) and stored runs. New tables only:
  // the rows of version 1 stay as they are.
  { version: 2, stores: V2_STORES },
  // Stored sweeps (the Long run screen). A new table only: the rows of version 2 stay.
  { version: 3, stores: V3_STORES },
  // The audit log (a hash chain, archive/log.ts) and the log segments of imported bundles,
  // kept as they came. New tables only: the rows of version 3 stay.
  { version: 4, stores: V4_STORES },
  // Stored ensembles (their members apart), observation sets and accepted calibrations,
  // archived like runs. New tables only: the rows of version 4 stay.
  { version: 5, stores: V5_STORES }
];

export const DB_VERSION = SCHEMA[SCHEMA.length - 1].version;

/** Where the database lives: the browser's IndexedDB, or fake-indexeddb in tests. */
export interface DbEnvironment {
  indexedDB: DexieOptions['indexedDB'];
  IDBKeyRange: DexieOptions['IDBKeyRange'];
}

export class LakeLedgerDb extends Dexie {
  declare entries: Table<ModelEntry, string>;
  declare revisions: Table<Revision, [string, number]>;
  declare drafts: Table<DraftRow, string>;
  declare meta: Table<MetaRow, string>;
  declare scenarios: Table<ScenarioEntry, string>;
  declare scenarioRevisions: Table<ScenarioRevision, [string, number]>;
  declare scenarioDrafts: Table<ScenarioDraftRow, string>;
  declare runs: Table<RunRow, string>;
  declare runData: Table<RunDataRow, string>;
  declare log: Table<LogEntry, number>;
  declare importedLogs: Table<ImportedLogRow, number>;
  declare sweeps: Table<StoredSweep, string>;
  declare ensembles: Table<StoredRecordRow<'ensemble'>, string>;
  declare ensembleMembers: Table<EnsembleMembersRow, string>;
  declare observations: Table<StoredRecordRow<'observations'>, string>;
  declare calibrations: Table<StoredRecordRow<'calibration'>, string>;

  /** `upTo` opens an older version of the schema (upgrade tests); default the newest. */
  constructor(env: DbEnvironment, options: { name?: string; upTo?: number } = {}) {
    super(options.name ?? DB_NAME, { indexedDB: env.indexedDB, IDBKeyRange: env.IDBKeyRange });
    const upTo = options.upTo ?? DB_VERSION;
    for (const v of SCHEMA) {
      if (v.version > upTo) break;
      const version = this.version(v.version).stores(v.stores);
      if (v.upgrade) version.upgrade(v.upgrade);
    }
  }
}

export function openDatabase(env: DbEnvironment, options?: { name?: string; upTo?: number }): LakeLedgerDb {
  return new LakeLedgerDb(env, options);
}
