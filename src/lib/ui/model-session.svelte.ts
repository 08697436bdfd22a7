/**
 * The model being worked on: its library entry, its working draft (valid or not) and the
 * problems the engine finds in it. Every screen inside /models/[entry]/ reads it from
 * context (`getModelSession()`); edits go through `update`, which saves the draft after a
 * short pause, so a reload never loses them.
 *
 * Never losing work: a save that fails (storage full, blocked) is reported in words and
 * retried with growing pauses while the edit stays on screen and in a synchronous backup.
 * Two tabs on one model: before writing, the session checks that the stored draft is still
 * the one it last saw; if another tab wrote in between, nothing is overwritten and the user
 * chooses (`conflict`). Tabs tell each other of saves over a BroadcastChannel, and a tab
 * without unsaved edits takes the other's version at once.
 */
import { getContext, setContext } from 'svelte';
import { digestOf } from '$lib/engine/document/digest';
import { analyzeModel } from '$lib/engine/document/validate-model';
import type { ModelDoc, Problem } from '$lib/engine/document/types';
import type { Library, ModelEntry, CommitResult } from '$lib/storage/types';
import { draftBackup } from '$lib/ui/draft-backup';

const KEY = Symbol('model-session');

/** Milliseconds between the last edit and the draft being written. */
export const DRAFT_DELAY_MS = 400;

/** Pauses before each retry of a failed save, milliseconds (the last one repeats). */
export const RETRY_DELAYS_MS = [1000, 3000, 10000, 30000] as const;

/** The channel on which tabs of the app tell each other of saved drafts and revisions. */
export const CHANGES_CHANNEL = 'lakeledger-changes';

export interface ChangeMessage {
  type: 'model-draft' | 'model-revision';
  key: string;
  /** The tab that wrote. */
  tab: string;
}

/** What a failed write means, in words a user can act on. */
export function describeWriteError(err: unknown): string {
  const e = err as { name?: string; message?: string; inner?: { name?: string } } | null;
  const name = e?.inner?.name ?? e?.name ?? '';
  if (name === 'QuotaExceededError') return "the browser's storage for this site is full";
  if (name === 'InvalidStateError' || name === 'UnknownError' || name === 'DatabaseClosedError')
    return 'the browser refused to write (storage may be blocked, or the disk full)';
  return e?.message ? `the write failed: ${e.message}` : 'the write failed';
}

function digestOrNull(doc: unknown): string | null {
  try {
    return digestOf(doc);
  } catch {
    return null;
  }
}

class ConflictError extends Error {
  constructor(readonly theirs: unknown) {
    super('the stored draft was changed elsewhere');
  }
}

function newTabId(): string {
  return `tab_${Math.random().toString(36).slice(2, 10)}`;
}

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

  /** Why the last save failed, in words; null when saves go through. */
  saveError = $state<string | null>(null);
  /** Another tab saved this model while this one had unsaved edits: theirs, to choose from. */
  conflict = $state.raw<{ theirs: unknown } | null>(null);
  /** A short note that the draft was updated from another tab. */
  notice = $state<string | null>(null);

  #timer: ReturnType<typeof setTimeout> | null = null;
  #retry: ReturnType<typeof setTimeout> | null = null;
  #failures = 0;
  #backedUp = false;
  #pending: Promise<void> = Promise.resolve();
  /** Digest of the draft as this tab last knew it stored. */
  #base: string | null = null;
  #channel: BroadcastChannel | null = null;
  readonly tab = newTabId();

  constructor(
    readonly library: Library,
    readonly key: string
  ) {}

  /** Listens for other tabs' saves of this model. Returns the stop. */
  listen(): () => void {
    if (typeof BroadcastChannel === 'undefined') return () => {};
    const channel = new BroadcastChannel(CHANGES_CHANNEL);
    this.#channel = channel;
    channel.onmessage = (event: MessageEvent<ChangeMessage>) => {
      const m = event.data;
      if (!m || m.key !== this.key || m.tab === this.tab) return;
      void this.#otherTabSaved();
    };
    return () => {
      channel.close();
      if (this.#channel === channel) this.#channel = null;
    };
  }

  #announce(type: ChangeMessage['type']): void {
    try {
      this.#channel?.postMessage({ type, key: this.key, tab: this.tab } satisfies ChangeMessage);
    } catch {
      /* a closed channel: the other tabs find out at their next save */
    }
  }

  /** True while this tab has edits that are not in the library yet. */
  get unsaved(): boolean {
    return this.#timer !== null || this.#retry !== null || digestOrNull(this.doc) !== this.#base;
  }

  async #otherTabSaved(): Promise<void> {
    await this.#pending.catch(() => {});
    const theirs = await this.library.loadDraft(this.key);
    const digest = digestOrNull(theirs);
    if (digest === this.#base || digest === digestOrNull(this.doc)) {
      this.entry = (await this.library.get(this.key)) ?? this.entry;
      return;
    }
    if (this.unsaved) {
      this.conflict = { theirs };
      return;
    }
    this.doc = theirs;
    this.#base = digest;
    this.entry = (await this.library.get(this.key)) ?? this.entry;
    this.notice = 'This model was changed in another tab; its version is shown.';
  }

  /** Resolves a conflict by taking the other tab's version (this tab's edits are dropped). */
  useTheirs(): void {
    if (!this.conflict) return;
    const { theirs } = this.conflict;
    if (this.#timer) clearTimeout(this.#timer);
    this.#timer = null;
    this.doc = theirs;
    this.#base = digestOrNull(theirs);
    this.conflict = null;
    clearBackup(this.key);
    this.notice = "The other tab's version is shown; the edits made here were dropped.";
  }

  /** Resolves a conflict by saving this tab's version over the other's, knowingly. */
  async keepMine(): Promise<void> {
    if (!this.conflict) return;
    this.#base = digestOrNull(this.conflict.theirs);
    this.conflict = null;
    await this.flush();
  }

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
      this.#base = digestOrNull(stored);
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
    this.#backedUp = writeBackup(this.key, next);
    this.#schedule();
  }

  /** Replaces the whole draft (restore, paste of a document). */
  replace(doc: unknown): void {
    this.doc = doc;
    this.#backedUp = writeBackup(this.key, doc);
    this.#schedule();
  }

  #schedule(): void {
    if (this.#timer) clearTimeout(this.#timer);
    this.#timer = setTimeout(() => void this.flush(), DRAFT_DELAY_MS);
  }

  /**
   * Writes the draft now (before a commit, a run, or leaving the page). Never throws: a
   * failure is kept in `saveError` and retried; a conflict waits for the user's choice.
   */
  async flush(): Promise<void> {
    if (this.#timer) {
      clearTimeout(this.#timer);
      this.#timer = null;
    }
    if (this.#retry) {
      clearTimeout(this.#retry);
      this.#retry = null;
    }
    if (this.conflict) return;
    const doc = this.doc;
    const mine = digestOrNull(doc);
    this.saving = true;
    const write = async () => {
      const stored = await this.library.loadDraft(this.key);
      const theirs = digestOrNull(stored);
      // Someone else (another tab) wrote since this tab last looked: do not write over it.
      if (this.#base !== null && theirs !== this.#base && theirs !== mine) throw new ConflictError(stored);
      await this.library.saveDraft(this.key, doc);
      this.#base = mine;
    };
    this.#pending = this.#pending.catch(() => {}).then(write);
    try {
      await this.#pending;
      this.#failures = 0;
      this.saveError = null;
      // the library holds this draft now; a newer edit has written a newer backup
      if (this.doc === doc) clearBackup(this.key);
      this.entry = (await this.library.get(this.key)) ?? this.entry;
      this.#announce('model-draft');
    } catch (err) {
      if (err instanceof ConflictError) {
        this.conflict = { theirs: err.theirs };
      } else {
        const wait = RETRY_DELAYS_MS[Math.min(this.#failures, RETRY_DELAYS_MS.length - 1)];
        this.#failures += 1;
        this.saveError = `Your edit is not saved yet: ${describeWriteError(err)}. It stays here${this.#backedUp ? ' and in a backup' : ''}; saving is tried again in ${Math.round(wait / 1000)} s.`;
        this.#retry = setTimeout(() => {
          this.#retry = null;
          void this.flush();
        }, wait);
      }
    } finally {
      this.saving = false;
    }
  }

  /** Tries a failed save again now. */
  retryNow(): Promise<void> {
    return this.flush();
  }

  /** Saves the draft as a new immutable revision (when it is valid). */
  async commit(note?: string): Promise<CommitResult> {
    await this.flush();
    if (this.saveError) throw new Error(this.saveError);
    if (this.conflict) throw new Error('this model was changed in another tab; choose which version to keep first');
    const r = await this.library.commit(this.key, note);
    this.entry = (await this.library.get(this.key)) ?? this.entry;
    this.#base = digestOrNull(await this.library.loadDraft(this.key));
    this.#announce('model-revision');
    return r;
  }
}

const backup = draftBackup('lakeledger.draft-backup.');
const writeBackup = backup.write;
const readBackup = backup.read;
const clearBackup = backup.clear;


export function setModelSession(s: ModelSession): ModelSession {
  return setContext(KEY, s);
}

export function getModelSession(): ModelSession {
  const s = getContext<ModelSession | undefined>(KEY);
  if (!s) throw new Error('getModelSession() outside a /models/[entry]/ page');
  return s;
}
