/**
 * The model library's public contract (implemented in library.ts over Dexie, the only
 * folder that imports Dexie). The UI talks to this interface; tests run it under
 * fake-indexeddb.
 *
 * Words: an *entry* is one model in the library (its own key, title, history); a
 * *revision* is an immutable saved version of its document with the SHA-256 digest of its
 * canonical JSON (RFC 8785); the *draft* is the working copy that edits save into as they
 * are made, valid or not, so a reload never loses them.
 */
import type { ModelDoc, Problem, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { AuditLog } from './audit';
import type { SweepDoc } from '$lib/engine/longrun/sweep';

export type EntryOrigin = 'example' | 'empty' | 'import' | 'duplicate';

export interface ModelEntry {
  /** Library key (not the document's id: two entries may hold documents with one id). */
  key: string;
  /** The document's `id` as last saved or drafted. */
  modelId: string;
  title: string;
  origin: EntryOrigin;
  /** ISO timestamps. */
  createdAt: string;
  updatedAt: string;
  /** Number of the newest revision (1, 2, …); 0 before the first save. */
  head: number;
  /** Digest of the newest revision (`sha256:…`), or null. */
  headDigest: string | null;
  /** True when the draft differs from the newest revision. */
  dirty: boolean;
}

export interface Revision {
  entryKey: string;
  number: number;
  /** `sha256:` + hex over the canonical JSON of `doc`. */
  digest: string;
  doc: ModelDoc;
  savedAt: string;
  note?: string;
}

export type ImportResult =
  | { ok: true; entry: ModelEntry }
  | { ok: false; problems: Problem[] };

export type CommitResult =
  | { ok: true; revision: Revision; unchanged: boolean }
  | { ok: false; problems: Problem[] };

export interface Library {
  /** Entries, newest change first (deleted ones excluded). */
  list(): Promise<ModelEntry[]>;
  get(key: string): Promise<ModelEntry | undefined>;
  /** A new entry whose first revision is `doc` (which must be valid). */
  create(doc: ModelDoc, origin: EntryOrigin): Promise<ModelEntry>;
  /** A new entry from a minimal valid document with one parameter, one state, no flows. */
  createEmpty(title: string): Promise<ModelEntry>;
  /** A copy with its own key, title "… (copy)" and document id `…_copy`. */
  duplicate(key: string): Promise<ModelEntry>;
  rename(key: string, title: string): Promise<void>;
  /** Deletes the entry with its draft and revisions; `undo` restores all of it. */
  remove(key: string): Promise<{ undo: () => Promise<void> }>;
  /** Validates first; an invalid file (or one with duplicate keys) writes nothing. */
  importText(text: string, fileName: string): Promise<ImportResult>;
  /** The draft if there is one, else the newest revision, as JSON text. */
  exportText(key: string): Promise<{ fileName: string; text: string }>;
  /** The working copy: the draft, else the newest revision's document. */
  loadDraft(key: string): Promise<unknown>;
  /** Saves the working copy as it is (valid or not). */
  saveDraft(key: string, doc: unknown): Promise<void>;
  /** Turns the draft into a new revision when it is valid (no new revision when unchanged). */
  commit(key: string, note?: string): Promise<CommitResult>;
  /** Revisions, newest first. */
  history(key: string): Promise<Revision[]>;
  /** Makes revision `number` the draft (a later commit makes it the newest revision). */
  restore(key: string, number: number): Promise<void>;
  /** On first start (an empty library that was never seeded), adds the shipped examples. */
  seed(examples: ModelDoc[]): Promise<boolean>;
  /** The scenarios of the library's models. */
  readonly scenarios: ScenarioLibrary;
  /** Finished runs, kept with the revisions they used. */
  readonly runs: RunStore;
  /** The audit log: every create, revise, run, import, export and delete, as a hash chain. */
  readonly log: AuditLog;
  /** Verify, export and import (bundles). */
  readonly archive: ArchiveStore;
  /** Finished sweeps (Long run screen), kept with the model revision they used. */
  readonly sweeps: SweepStore;
  /** Ensembles (Uncertainty screen): summaries, bands and member values; series by choice. */
  readonly ensembles: RecordStore<'ensemble'>;
  /** Monitoring data sets of a model (Fit screen), the file's text with its mapping. */
  readonly observations: RecordStore<'observations'>;
  /** Accepted calibrations, each with the model revision it created. */
  readonly calibrations: RecordStore<'calibration'>;
}

// ---------------------------------------------------------------------------------------
// Scenarios and stored runs (scenarios issue). Database version 2 adds their tables.

export type ScenarioOrigin = 'example' | 'baseline' | 'new' | 'duplicate' | 'import';

/** One scenario of one model entry, with revisions and a draft like a model. */
export interface ScenarioEntry {
  /** Library key of the scenario (appears in page addresses). */
  key: string;
  /** The model entry it belongs to. */
  modelKey: string;
  /** The document's `id` as last saved or drafted. */
  scenarioId: string;
  title: string;
  origin: ScenarioOrigin;
  createdAt: string;
  updatedAt: string;
  /** Newest revision number (1, 2, …); 0 before the first save. */
  head: number;
  headDigest: string | null;
  dirty: boolean;
}

export interface ScenarioRevision {
  scenarioKey: string;
  number: number;
  /** `sha256:` + hex over the canonical JSON of `doc`. */
  digest: string;
  doc: ScenarioDoc;
  savedAt: string;
  note?: string;
}

export type ScenarioCommitResult =
  | { ok: true; revision: ScenarioRevision; unchanged: boolean }
  | { ok: false; problems: Problem[] };

export interface ScenarioLibrary {
  /** The model's scenarios, oldest first (the baseline is made first, so it leads). */
  list(modelKey: string): Promise<ScenarioEntry[]>;
  get(key: string): Promise<ScenarioEntry | undefined>;
  /**
   * Every model has a baseline: when none of its scenarios is without measures, this adds
   * one (`baseline`, 20 years from the model's `timeOrigin` or 1 January of this year).
   * Returns the baseline entry (the first scenario without measures).
   */
  ensureBaseline(modelKey: string): Promise<ScenarioEntry>;
  /** A new scenario of the model; `doc` must be valid against `model`. */
  create(modelKey: string, doc: ScenarioDoc, model: ModelDoc, origin: ScenarioOrigin): Promise<ScenarioEntry>;
  /** A copy with title "… (copy)" and id `…_copy` (made unique among the model's scenarios). */
  duplicate(key: string): Promise<ScenarioEntry>;
  /** Deletes the scenario with draft and revisions (not its stored runs); `undo` restores it. */
  remove(key: string): Promise<{ undo: () => Promise<void> }>;
  /** The draft, else the newest revision's document. */
  loadDraft(key: string): Promise<unknown>;
  saveDraft(key: string, doc: unknown): Promise<void>;
  /** Validates the draft against `model`; a valid one becomes a new revision (none when unchanged). */
  commit(key: string, model: ModelDoc, note?: string): Promise<ScenarioCommitResult>;
  history(key: string): Promise<ScenarioRevision[]>;
  /** A revision by number. */
  revision(key: string, number: number): Promise<ScenarioRevision | undefined>;
}

/** Which saved versions a stored run used. */
export interface RunProvenance {
  modelKey: string;
  modelRevision: number;
  scenarioKey: string;
  scenarioRevision: number;
}

/**
 * What the Runs and Compare screens list: the run document without its times and series
 * (those are kept apart, as Float64Arrays, and read only by `load`).
 */
export interface StoredRunSummary extends RunProvenance {
  id: string;
  model: string;
  scenario: string;
  /** The scenario's title when the run was stored. */
  scenarioTitle: string;
  modelDigest: string;
  scenarioDigest: string;
  engine: string;
  status: RunDoc['status'];
  error: RunDoc['error'];
  start: string;
  startedAt: string;
  wallMs: number;
  closure: RunDoc['closure'];
  solver: RunDoc['solver'];
  warnings: RunDoc['warnings'];
  /** Number of output times and the series ids, so a list can say what a run holds. */
  points: number;
  seriesIds: string[];
  /** ISO timestamp of storing. */
  storedAt: string;
  /** A spin-up run: the stored run it started from and that run's end state. */
  initialState?: RunDoc['initialState'];
  /** SHA-256 of the run record (archive/record.ts), taken when it was stored. */
  recordDigest?: string;
}

export interface RunStore {
  /**
   * Stores a finished (ok or failed) run. Runs are immutable: storing an id that is already
   * there stores nothing and returns the stored one (`added: false`).
   */
  save(run: RunDoc, provenance: RunProvenance, scenarioTitle: string): Promise<{ summary: StoredRunSummary; added: boolean }>;
  /** The model's runs, newest first. */
  list(modelKey: string): Promise<StoredRunSummary[]>;
  summary(id: string): Promise<StoredRunSummary | undefined>;
  /** The whole run document, series as plain arrays again. */
  load(id: string): Promise<RunDoc | undefined>;
  remove(id: string): Promise<void>;
}

// ---------------------------------------------------------------------------------------
// Stored sweeps (long-run issue). Database version 3 adds their table.

/** How the user set a sweep up, as the Long run screen shows it again. */
export interface SweepSettingsRecord {
  /** Where the two starts came from, in words ("the model's initial values", "end of run run_…"). */
  startLowFrom: string;
  startHighFrom: string;
  /** Bisection steps per switch point. */
  refine: number;
  /** The indicator's label and unit when the sweep was made. */
  indicatorLabel: string;
  indicatorUnit: string;
  /** The swept quantity's label and unit (a forcing: the factor, unit 1). */
  targetLabel: string;
  targetUnit: string;
}

/** One stored sweep: the `lakeledger.sweep/1` document with the revision it used and its settings. */
export interface StoredSweep {
  /** `sweep_` + a library key. */
  id: string;
  modelKey: string;
  modelRevision: number;
  /** Digest of that revision (the document's `modelDigest` too). */
  modelDigest: string;
  settings: SweepSettingsRecord;
  doc: SweepDoc;
  /** ISO timestamp. */
  storedAt: string;
  /** Wall-clock milliseconds the sweep took. */
  wallMs: number;
  /** Digest of the document, settings and model digest (`sweepDigest`), logged when stored. */
  digest?: string;
}

export interface SweepStore {
  /** Stores a finished sweep; refuses a document of another format or of another model digest. */
  save(doc: SweepDoc, provenance: { modelKey: string; modelRevision: number; modelDigest: string }, settings: SweepSettingsRecord, wallMs: number): Promise<StoredSweep>;
  /** The model's sweeps, newest first. */
  list(modelKey: string): Promise<StoredSweep[]>;
  get(id: string): Promise<StoredSweep | undefined>;
  remove(id: string): Promise<void>;
}

// ---------------------------------------------------------------------------------------
// Ensembles, observation sets and calibrations (uncertainty and monitoring-data issues).
// Database version 5 adds their tables.

export interface RecordTypes {
  ensemble: import('$lib/archive/records').EnsembleRecord;
  observations: import('$lib/archive/records').ObservationsRecord;
  calibration: import('$lib/archive/records').CalibrationRecord;
}

/** Where a record came from in this library (keys and revision numbers are local). */
export interface RecordProvenance {
  modelKey: string;
  /** The model revision it ran on (ensemble) or created (calibration); null for observations. */
  modelRevision: number | null;
  /** Ensembles: the scenarios' keys and revisions, in the record's order. */
  scenarios?: { key: string; revision: number }[];
}

/** One stored record. For an ensemble, `record.members` is empty here: they are kept apart. */
export interface StoredRecordRow<K extends keyof RecordTypes> {
  id: string;
  modelKey: string;
  provenance: RecordProvenance;
  record: RecordTypes[K];
  /** `recordDigestOf(record)` with the members in, logged when stored. */
  digest: string;
  /** ISO timestamp. */
  storedAt: string;
  /** Members kept (ensembles; 0 otherwise), for the list. */
  memberCount: number;
}

export interface RecordStore<K extends keyof RecordTypes> {
  /**
   * Seals the record (sets its content id), stores it with one log entry and returns the
   * row. A record with the same content is stored once: saving it again returns the row
   * there (`added: false`) and logs nothing.
   */
  save(record: Omit<RecordTypes[K], 'id'> & { id?: string }, provenance: RecordProvenance): Promise<{ row: StoredRecordRow<K>; added: boolean }>;
  /** The model's records, newest first (ensembles without their members). */
  list(modelKey: string): Promise<StoredRecordRow<K>[]>;
  /** The whole record (an ensemble with its members). */
  get(id: string): Promise<RecordTypes[K] | undefined>;
  row(id: string): Promise<StoredRecordRow<K> | undefined>;
  /** Deletes it, with a log entry. */
  remove(id: string): Promise<void>;
}

// ---------------------------------------------------------------------------------------
// The archive (archive issue): verify, bundles, notes.

export interface ArchiveFinding {
  kind: 'model' | 'scenario' | 'run' | 'sweep' | 'ensemble' | 'observations' | 'calibration' | 'log';
  /** What failed: a run id, `entry 12`, `demo_lake revision 2`. */
  id: string;
  code: string;
  message: string;
}

export interface ImportReport {
  ok: boolean;
  /** Why nothing was written: the file failed its checks, or it conflicts with the library. */
  reason: 'invalid' | 'conflict' | null;
  findings: import('$lib/archive/bundle').BundleFinding[];
  plan: import('./bundle-plan').ImportPlan | null;
}

export interface ArchiveStore {
  /** Rechecks every revision's and run record's digest and the whole log chain. */
  verify(): Promise<{ findings: ArchiveFinding[]; checked: { revisions: number; runs: number; sweeps: number; ensembles: number; observations: number; calibrations: number; entries: number } }>;
  /** A bundle of a model's runs (of one model revision) with their scenarios and the log; logs the export. */
  bundleOf(modelKey: string, runIds?: string[]): Promise<import('$lib/archive/bundle').Bundle>;
  /** Checks a bundle and writes all of it or nothing; logs the import. */
  importBundle(value: unknown): Promise<ImportReport>;
  /** A free note in the log about a model, scenario or run (notes are log entries). */
  note(kind: 'model' | 'scenario' | 'run', id: string, text: string): Promise<import('$lib/archive/log').LogEntry>;
}
