/**
 * The Models page's state, as runes: the entries, the last thing done in words, the
 * notice of a deletion with its undo, the problems of a refused import. The library and
 * the examples come in as arguments (the browser's library in the app, fake-indexeddb in
 * tests); so does the timer that ends the undo notice.
 */
import type { ModelDoc, Problem } from '$lib/engine/document/types';
import type { Library, ModelEntry } from '$lib/storage/types';
import { deletionWords, refusalWords, titleProblem } from './library-words';

/** How long the undo notice of a deletion stays, milliseconds. */
export const UNDO_MS = 10_000;

export interface DeletionNotice {
  key: string;
  title: string;
  /** "Deleted 'X' with its draft and 3 revisions." */
  text: string;
}

export interface RefusedImport {
  fileName: string;
  /** "f.json was not imported, nothing was added: 2 problems." */
  text: string;
  problems: Problem[];
}

export interface Timers {
  set(fn: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

const realTimers: Timers = {
  set: (fn, ms) => setTimeout(fn, ms),
  clear: (h) => clearTimeout(h as ReturnType<typeof setTimeout>)
};

/** A failure of the library in words for the page. */
function reason(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

export class LibraryPageState {
  entries = $state<ModelEntry[]>([]);
  loading = $state(true);
  /** The library could not be opened or read at all. */
  loadError = $state<string | null>(null);
  /** The last thing done, in words (a polite live region reads it). */
  message = $state<string | null>(null);
  /** The last action that failed, in words. */
  failure = $state<string | null>(null);
  deletion = $state<DeletionNotice | null>(null);
  refused = $state<RefusedImport | null>(null);
  /** True while an action is being written. */
  busy = $state(false);

  #undo: (() => Promise<void>) | null = null;
  #timer: unknown = null;

  constructor(
    readonly library: Library,
    readonly examples: readonly ModelDoc[],
    readonly timers: Timers = realTimers
  ) {}

  /** Seeds the examples on first start, then lists the library. */
  async load(): Promise<void> {
    this.loading = true;
    try {
      await this.library.seed([...this.examples]);
      await this.refresh();
    } catch (e) {
      this.loadError = `The model library could not be opened: ${reason(e)}`;
    } finally {
      this.loading = false;
    }
  }

  async refresh(): Promise<void> {
    this.entries = await this.library.list();
  }

  /** Runs one action: clears the last words, marks busy, turns a failure into words. */
  async #act<T>(what: string, action: () => Promise<T>): Promise<T | null> {
    this.failure = null;
    this.busy = true;
    try {
      const result = await action();
      await this.refresh();
      return result;
    } catch (e) {
      this.failure = `${what} failed: ${reason(e)}`;
      this.message = null;
      return null;
    } finally {
      this.busy = false;
    }
  }

  async addExample(modelId: string): Promise<ModelEntry | null> {
    const doc = this.examples.find((d) => d.id === modelId);
    if (!doc) {
      this.failure = `There is no example '${modelId}'.`;
      return null;
    }
    const entry = await this.#act('Adding the example', () => this.library.create(structuredClone(doc), 'example'));
    if (entry) this.message = `Added '${entry.title}' from the examples.`;
    return entry;
  }

  /** A new empty model; a title that cannot be used comes back as words, nothing written. */
  async createEmpty(title: string): Promise<{ entry: ModelEntry } | { problem: string }> {
    const problem = titleProblem(title);
    if (problem) return { problem };
    const entry = await this.#act('Creating the model', () => this.library.createEmpty(title));
    if (!entry) return { problem: this.failure ?? 'The model could not be created.' };
    this.message = `Created '${entry.title}' (model id ${entry.modelId}).`;
    return { entry };
  }

  async duplicate(key: string): Promise<ModelEntry | null> {
    const entry = await this.#act('Duplicating', () => this.library.duplicate(key));
    if (entry) this.message = `Duplicated as '${entry.title}' (model id ${entry.modelId}).`;
    return entry;
  }

  /** Renames; a title that cannot be used comes back as words and nothing changes. */
  async rename(key: string, title: string): Promise<string | null> {
    const problem = titleProblem(title);
    if (problem) return problem;
    const before = this.entries.find((e) => e.key === key);
    if (before && before.title === title.trim()) return null;
    const done = await this.#act('Renaming', async () => {
      await this.library.rename(key, title);
      return true;
    });
    if (!done) return this.failure;
    this.message = `Renamed '${before?.title ?? key}' to '${title.trim()}'.`;
    return null;
  }

  /** Deletes now; the notice offers the undo for UNDO_MS. */
  async remove(key: string): Promise<DeletionNotice | null> {
    const entry = this.entries.find((e) => e.key === key) ?? (await this.library.get(key));
    if (!entry) return null;
    const removed = await this.#act('Deleting', () => this.library.remove(key));
    if (!removed) return null;
    this.#clearTimer();
    this.#undo = removed.undo;
    this.deletion = { key, title: entry.title, text: deletionWords(entry) };
    this.message = null;
    this.#timer = this.timers.set(() => this.dismissDeletion(), UNDO_MS);
    return this.deletion;
  }

  /** Puts the deleted entry back, with its draft and revisions. */
  async undoRemove(): Promise<ModelEntry | null> {
    const undo = this.#undo;
    const notice = this.deletion;
    if (!undo || !notice) return null;
    this.dismissDeletion();
    const done = await this.#act('Undoing the deletion', async () => {
      await undo();
      return true;
    });
    if (!done) return null;
    this.message = `Restored '${notice.title}'.`;
    return this.entries.find((e) => e.key === notice.key) ?? null;
  }

  dismissDeletion(): void {
    this.#clearTimer();
    this.deletion = null;
    this.#undo = null;
  }

  #clearTimer(): void {
    if (this.#timer !== null) this.timers.clear(this.#timer);
    this.#timer = null;
  }

  /** Imports a file's text; a refused file is listed with its problems and nothing is written. */
  async importText(fileName: string, text: string): Promise<ModelEntry | null> {
    this.refused = null;
    const result = await this.#act(`Importing ${fileName}`, () => this.library.importText(text, fileName));
    if (!result) return null;
    if (!result.ok) {
      this.refused = { fileName, text: refusalWords(fileName, result.problems), problems: result.problems.filter((p) => p.severity === 'error') };
      this.message = null;
      return null;
    }
    this.message = `Imported '${result.entry.title}' from ${fileName}.`;
    return result.entry;
  }

  dismissRefusal(): void {
    this.refused = null;
  }

  /** The file to download for an entry (the page makes the download). */
  async exportFile(key: string): Promise<{ fileName: string; text: string } | null> {
    const file = await this.#act('Exporting', () => this.library.exportText(key));
    if (file) this.message = `Exported ${file.fileName}.`;
    return file;
  }

  /** Stops the undo timer when the page goes (the deletion stays). */
  destroy(): void {
    this.#clearTimer();
  }
}
