/**
 * The model being worked on: its library entry, its working draft (valid or not) and the
 * problems the engine finds in it. Every screen inside /models/[entry]/ reads it from
 * context (`getModelSession()`); edits go through `update`, which saves the draft after a
 * short pause, so a reload never loses them.
 */
import { getContext, setContext } from 'svelte';
import { analyzeModel } from '$lib/engine/document/validate-model';
import type { ModelDoc, Problem } from '$lib/engine/document/types';
import type { Library, ModelEntry, CommitResult } from '$lib/storage/types';

const KEY = Symbol('model-session');

/** Milliseconds between the last edit and the draft being written. */
export const DRAFT_DELAY_MS = 400;

export class ModelSession {
  entry = $state<ModelEntry | null>(null);
  /**
   * The working draft; a plain JSON value that may not be a valid model. Raw state: every
   * edit replaces the whole value (so nothing needs deep proxies or snapshots).
   */
  doc = $state.raw<unknown>(null);
  loading = $state(true);
  loadError = $state<string | null>(null);
  saving = $state(false);
  /** Problems of the draft, as the engine's validation finds them. */
  problems = $derived.by<Problem[]>(() => (this.doc === null ? [] : analyzeModel(this.doc).problems));
  errors = $derived(this.problems.filter((p) => p.severity === 'error'));
  /** The draft as a model document when it has no error, else null. */
  valid = $derived<ModelDoc | null>(this.doc !== null && this.errors.length === 0 ? (this.doc as ModelDoc) : null);

  #timer: ReturnType<typeof setTimeout> | null = null;
  #pending: Promise<void> = Promise.resolve();

  constructor(
    readonly library: Library,
    readonly key: string
  ) {}

  async load(): Promise<void> {
    this.loading = true;
    try {
      const entry = await this.library.get(this.key);
      if (!entry) {
        this.loadError = 'There is no such model in the library (it may have been deleted).';
        return;
      }
      this.entry = entry;
      const stored = await this.library.loadDraft(this.key);
      // An edit made just before the page closed may not have reached IndexedDB; the
      // synchronous backup has it (it is removed once the library holds the draft).
      const backup = readBackup(this.key);
      if (backup !== undefined) {
        this.doc = backup;
        void this.flush();
      } else this.doc = stored;
    } catch (e) {
      this.loadError = `The library could not be read: ${(e as Error).message}`;
    } finally {
      this.loading = false;
    }
  }

  /** Applies an edit to the draft and schedules its saving. */
  update(edit: (doc: Record<string, unknown>) => void): void {
    const next = structuredClone(this.doc) as Record<string, unknown>;
    edit(next);
    this.doc = next;
    writeBackup(this.key, next);
    this.#schedule();
  }

  /** Replaces the whole draft (restore, paste of a document). */
  replace(doc: unknown): void {
    this.doc = doc;
    writeBackup(this.key, doc);
    this.#schedule();
  }

  #schedule(): void {
    if (this.#timer) clearTimeout(this.#timer);
    this.#timer = setTimeout(() => void this.flush(), DRAFT_DELAY_MS);
  }

  /** Writes the draft now (before a commit, a run, or leaving the page). */
  async flush(): Promise<void> {
    if (this.#timer) {
      clearTimeout(this.#timer);
      this.#timer = null;
    }
    const doc = this.doc;
    this.saving = true;
    this.#pending = this.#pending.then(() => this.library.saveDraft(this.key, doc));
    try {
      await this.#pending;
      // the library holds this draft now; a newer edit has written a newer backup
      if (this.doc === doc) clearBackup(this.key);
      this.entry = (await this.library.get(this.key)) ?? this.entry;
    } finally {
      this.saving = false;
    }
  }

  /** Saves the draft as a new immutable revision (when it is valid). */
  async commit(note?: string): Promise<CommitResult> {
    await this.flush();
    const r = await this.library.commit(this.key, note);
    this.entry = (await this.library.get(this.key)) ?? this.entry;
    return r;
  }
}

const BACKUP_PREFIX = 'lakeledger.draft-backup.';

function storage(): Storage | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null;
  }
}

function writeBackup(key: string, doc: unknown): void {
  try {
    storage()?.setItem(BACKUP_PREFIX + key, JSON.stringify(doc));
  } catch {
    /* full or unavailable: the debounced IndexedDB save still runs */
  }
}

function readBackup(key: string): unknown {
  const text = storage()?.getItem(BACKUP_PREFIX + key);
  if (text == null) return undefined;
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

function clearBackup(key: string): void {
  storage()?.removeItem(BACKUP_PREFIX + key);
}

export function setModelSession(s: ModelSession): ModelSession {
  return setContext(KEY, s);
}

export function getModelSession(): ModelSession {
  const s = getContext<ModelSession | undefined>(KEY);
  if (!s) throw new Error('getModelSession() outside a /models/[entry]/ page');
  return s;
}
