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
import type { ModelDoc, Problem } from '$lib/engine/document/types';

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
}
