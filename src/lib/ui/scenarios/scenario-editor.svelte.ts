/**
 * The Scenarios screen's state: the model's scenarios, the one open for editing (its
 * draft, valid or not), the draft's problems against the model, its revisions, the stored
 * runs it may start from, and the notice that offers to undo a removal. Edits go through
 * `update`, which saves the draft after a short pause (and at once to a synchronous
 * backup, so a reload never loses an edit).
 */
import { getContext, setContext, tick } from 'svelte';
import { validateScenario } from '$lib/engine/document/validate-scenario';
import type { MeasureDoc, ModelDoc, Problem, ScenarioDoc } from '$lib/engine/document/types';
import type { Library, ScenarioEntry, ScenarioRevision, StoredRunSummary } from '$lib/storage/types';
import type { CatalogueItem } from '$lib/scenario/catalogue';
import { newMeasure } from '$lib/scenario/new-measure';
import { problemsByField } from './field-ids';
import { addMeasure, emptyScenario, removeMeasure, restoreMeasure, type Draft } from './scenario-edits';
import { scenarioCommitWords } from './scenario-words';
import { draftBackup } from '$lib/ui/draft-backup';
import { describeWriteError, RETRY_DELAYS_MS } from '$lib/ui/model-session.svelte';

/** Milliseconds between the last edit and the draft being written. */
export const SCENARIO_DRAFT_DELAY_MS = 300;
export const UNDO_ID = 'sc-undo';
const backup = draftBackup('lakeledger.scenario-backup.');
const writeBackup = backup.write;
const readBackup = backup.read;
const clearBackup = backup.clear;
const KEY = Symbol('scenario-editor');

export interface Notice {
  message: string;
  undo: () => Promise<void> | void;
  serial: number;
}

export class ScenarioEditor {
  entries = $state<ScenarioEntry[]>([]);
  openKey = $state<string | null>(null);
  /** The open scenario's working draft: plain JSON, replaced as a whole on every edit. */
  draft = $state.raw<unknown>(null);
  loading = $state(true);
  loadError = $state<string | null>(null);
  saving = $state(false);
  /** Why the last save of the draft failed, in words; null when saves go through. */
  saveError = $state<string | null>(null);
  #retry: ReturnType<typeof setTimeout> | null = null;
  #failures = 0;
  busy = $state(false);
  history = $state<ScenarioRevision[]>([]);
  runs = $state<StoredRunSummary[]>([]);
  notice = $state<Notice | null>(null);
  /** The scenario ensureBaseline named (the first without measures). */
  baselineKey = $state<string | null>(null);
  result = $state<{ ok: boolean; text: string } | null>(null);
  /** The newest saved revision of the model, used when the model's draft has errors. */
  fallback = $state.raw<{ doc: ModelDoc; number: number } | null>(null);

  /** The model measures are checked against: the session's draft when valid, else its newest revision. */
  model = $derived.by<ModelDoc | null>(() => this.currentModel() ?? this.fallback?.doc ?? null);
  usingFallback = $derived.by(() => this.currentModel() === null && this.fallback !== null);
  problems = $derived.by<Problem[]>(() => (this.draft !== null && this.model ? validateScenario(this.draft, this.model) : []));
  errors = $derived(this.problems.filter((p) => p.severity === 'error'));
  byField = $derived(problemsByField(this.problems, this.draft));
  openEntry = $derived(this.entries.find((e) => e.key === this.openKey) ?? null);
  /** The draft as an object (a hand-edited file may hold something else). */
  doc = $derived<Draft | null>(typeof this.draft === 'object' && this.draft !== null && !Array.isArray(this.draft) ? (this.draft as Draft) : null);

  #timer: ReturnType<typeof setTimeout> | null = null;
  #pending: Promise<void> = Promise.resolve();
  #serial = 0;

  constructor(
    readonly library: Library,
    readonly modelKey: string,
    private readonly currentModel: () => ModelDoc | null
  ) {}

  /** Makes sure a baseline exists, lists the scenarios and opens `wanted` (else the baseline). Returns the key opened. */
  async init(wanted: string | null): Promise<string | null> {
    this.loading = true;
    try {
      const base = await this.library.scenarios.ensureBaseline(this.modelKey);
      this.baselineKey = base.key;
      const [history, runs] = await Promise.all([this.library.history(this.modelKey).catch(() => []), this.library.runs.list(this.modelKey).catch(() => [])]);
      if (history[0]) this.fallback = { doc: history[0].doc, number: history[0].number };
      this.runs = runs;
      await this.refreshList();
      const key = wanted && this.entries.some((e) => e.key === wanted) ? wanted : base.key;
      await this.open(key);
      return key;
    } catch (e) {
      this.loadError = `The scenarios could not be read: ${(e as Error).message}`;
      return null;
    } finally {
      this.loading = false;
    }
  }

  async refreshList(): Promise<void> {
    this.entries = await this.library.scenarios.list(this.modelKey);
  }

  /** Opens a scenario for editing (saving the one open before). */
  async open(key: string): Promise<void> {
    if (this.openKey === key && this.draft !== null) return;
    await this.flush();
    const stored = await this.library.scenarios.loadDraft(key);
    // Another call opened it while this one waited (the address and a button both ask for
    // it): the draft on screen may already hold new edits, which must not be overwritten.
    if (this.openKey === key && this.draft !== null) return;
    const backup = readBackup(key);
    this.openKey = key;
    this.result = null;
    this.draft = backup !== undefined ? backup : stored;
    if (backup !== undefined) void this.flush();
    await this.loadHistory();
  }

  async loadHistory(): Promise<void> {
    this.history = this.openKey ? await this.library.scenarios.history(this.openKey) : [];
  }

  /** Applies an edit to a copy of the draft and schedules its saving. */
  update(edit: (doc: Draft) => void): void {
    if (!this.openKey || !this.doc) return;
    const next = structuredClone($state.snapshot(this.doc)) as Draft;
    edit(next);
    this.draft = next;
    writeBackup(this.openKey, next);
    if (this.#timer) clearTimeout(this.#timer);
    this.#timer = setTimeout(() => void this.flush(), SCENARIO_DRAFT_DELAY_MS);
  }

  /** Writes the open draft now (before a switch, a commit, leaving the page). */
  async flush(): Promise<void> {
    if (this.#timer) {
      clearTimeout(this.#timer);
      this.#timer = null;
    } else if (readBackup(this.openKey ?? '') === undefined) {
      return this.#pending;
    }
    const key = this.openKey;
    const doc = this.draft;
    if (!key) return;
    if (this.#retry) {
      clearTimeout(this.#retry);
      this.#retry = null;
    }
    this.saving = true;
    this.#pending = this.#pending.catch(() => {}).then(() => this.library.scenarios.saveDraft(key, doc));
    try {
      await this.#pending;
      this.saveError = null;
      this.#failures = 0;
      if (this.openKey !== key || this.draft === doc) clearBackup(key);
      const fresh = await this.library.scenarios.get(key);
      if (fresh) this.entries = this.entries.map((e) => (e.key === key ? fresh : e));
    } catch (err) {
      // The edit stays on screen and in the backup; the save is tried again, later each time.
      const wait = RETRY_DELAYS_MS[Math.min(this.#failures, RETRY_DELAYS_MS.length - 1)];
      this.#failures += 1;
      this.saveError = `Your edit is not saved yet: ${describeWriteError(err)}. It stays here; saving is tried again in ${Math.round(wait / 1000)} s.`;
      this.#retry = setTimeout(() => {
        this.#retry = null;
        void this.flush();
      }, wait);
    } finally {
      this.saving = false;
    }
  }

  /** A new scenario without measures over the open one's period; returns its key. */
  async addEmpty(): Promise<string | null> {
    const model = this.model;
    if (!model) return null;
    const like = (this.doc as unknown as ScenarioDoc | null) ?? undefined;
    const doc = emptyScenario(model, new Set(this.entries.map((e) => e.scenarioId)), like?.period ? like : undefined);
    const entry = await this.library.scenarios.create(this.modelKey, doc, model, 'new');
    await this.refreshList();
    return entry.key;
  }

  async duplicate(key: string): Promise<string> {
    if (key === this.openKey) await this.flush();
    const entry = await this.library.scenarios.duplicate(key);
    await this.refreshList();
    return entry.key;
  }

  /** Deletes a scenario at once and offers Undo; returns the key to open next when it was open. */
  async remove(key: string): Promise<string | null> {
    if (key === this.openKey) await this.flush();
    const title = this.entries.find((e) => e.key === key)?.title ?? 'the scenario';
    const { undo } = await this.library.scenarios.remove(key);
    clearBackup(key);
    await this.refreshList();
    this.offerUndo(`Deleted scenario “${title}”.`, async () => {
      await undo();
      await this.refreshList();
    });
    if (key !== this.openKey) return null;
    this.openKey = null;
    this.draft = null;
    return this.entries[0]?.key ?? null;
  }

  /** A new title (and so a new name in the list), into the scenario's draft. */
  async rename(key: string, title: string): Promise<void> {
    if (key === this.openKey) {
      this.update((d) => void (d.title = title));
      await this.flush();
      return;
    }
    const doc = await this.library.scenarios.loadDraft(key);
    if (typeof doc !== 'object' || doc === null) return;
    await this.library.scenarios.saveDraft(key, { ...(doc as object), title });
    await this.refreshList();
  }

  /** Saves the draft as a new revision when it is valid against the model. */
  async commit(note?: string): Promise<void> {
    const key = this.openKey;
    const model = this.model;
    if (!key || !model || this.busy) return;
    this.busy = true;
    try {
      await this.flush();
      const r = await this.library.scenarios.commit(key, model, note);
      this.result = scenarioCommitWords(r);
      await this.refreshList();
      await this.loadHistory();
    } catch (e) {
      this.result = { ok: false, text: `Not saved: ${(e as Error).message}` };
    } finally {
      this.busy = false;
    }
  }

  /** Adds a measure from a catalogue item; returns its index. */
  addFromCatalogue(item: CatalogueItem, target: string, into?: string): number {
    const model = this.model;
    if (!model || !this.doc) return -1;
    let at = -1;
    const measure: MeasureDoc = newMeasure(item, { target, into }, this.doc as unknown as ScenarioDoc, model);
    this.update((d) => void (at = addMeasure(d, measure)));
    return at;
  }

  removeMeasureAt(index: number, name: string): void {
    let removed: ReturnType<typeof removeMeasure> = null;
    this.update((d) => void (removed = removeMeasure(d, index)));
    const r = removed;
    if (!r) return;
    this.offerUndo(`Removed measure ${name}.`, () => this.update((d) => restoreMeasure(d, r)));
  }

  offerUndo(message: string, undo: () => Promise<void> | void): void {
    this.notice = { message, undo, serial: ++this.#serial };
    void focusSoon(UNDO_ID);
  }

  async undo(): Promise<void> {
    const n = this.notice;
    this.notice = null;
    if (n) await n.undo();
  }

  dismiss(): void {
    this.notice = null;
  }
}

async function focusSoon(id: string): Promise<void> {
  await tick();
  if (typeof document !== 'undefined') document.getElementById(id)?.focus();
}


export function setScenarioEditor(e: ScenarioEditor): ScenarioEditor {
  return setContext(KEY, e);
}
export function getScenarioEditor(): ScenarioEditor {
  const e = getContext<ScenarioEditor | undefined>(KEY);
  if (!e) throw new Error('getScenarioEditor() outside the Scenarios screen');
  return e;
}
