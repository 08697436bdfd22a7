/**
 * The Scenarios screen's state over the real library under fake-indexeddb: baseline first,
 * the scenario asked for opened, edits saved after a pause (and at once to the backup),
 * measures from the catalogue, removal and deletion undone, rename, revisions, and the
 * model's newest revision used while its draft has errors.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { IDBFactory, IDBKeyRange } from 'fake-indexeddb';
import { openDatabase } from '$lib/storage/db';
import { createLibrary } from '$lib/storage/library';
import { EXAMPLES, EXAMPLE_SCENARIOS } from '$lib/storage/examples';
import type { ModelDoc } from '$lib/engine/document/types';
import { CATALOGUE, catalogueItem } from '$lib/scenario/catalogue';
import { ScenarioEditor, SCENARIO_DRAFT_DELAY_MS } from './scenario-editor.svelte';
import { setCostField } from './scenario-edits';

const demo = EXAMPLES[0] as ModelDoc;

function memoryStorage(): Storage {
  const m = new Map<string, string>();
  return {
    get length() {
      return m.size;
    },
    clear: () => m.clear(),
    getItem: (k) => m.get(k) ?? null,
    key: (i) => [...m.keys()][i] ?? null,
    removeItem: (k) => void m.delete(k),
    setItem: (k, v) => void m.set(k, String(v))
  };
}

async function setUp(model: () => ModelDoc | null = () => demo) {
  const library = createLibrary(openDatabase({ indexedDB: new IDBFactory(), IDBKeyRange }), { exampleScenarios: EXAMPLE_SCENARIOS });
  const entry = await library.create(structuredClone(demo), 'example');
  const editor = new ScenarioEditor(library, entry.key, model);
  return { library, entry, editor };
}

describe('ScenarioEditor', () => {
  beforeEach(() => vi.stubGlobal('localStorage', memoryStorage()));
  afterEach(() => {
    vi.useRealTimers();
    vi.unstubAllGlobals();
  });

  it('init() makes sure of a baseline and opens it when no scenario is asked for', async () => {
    const { editor } = await setUp();
    const key = await editor.init(null);
    expect(key).toBe(editor.baselineKey);
    expect(editor.entries.map((e) => e.scenarioId)).toEqual(['baseline', 'half_load', 'fish_removal', 'load_and_fish']);
    expect((editor.doc as { id: string }).id).toBe('baseline');
    expect(editor.problems).toEqual([]);
  });

  it('init(key) opens that scenario; an unknown key opens the baseline', async () => {
    const { editor, library, entry } = await setUp();
    await library.scenarios.ensureBaseline(entry.key);
    const list = await library.scenarios.list(entry.key);
    expect(await editor.init(list[2].key)).toBe(list[2].key);
    expect((editor.doc as { id: string }).id).toBe('fish_removal');
    const other = new ScenarioEditor(library, entry.key, () => demo);
    expect(await other.init('no-such-key')).toBe(list[0].key);
  });

  it('an edit is in the backup at once and in the library after the pause', async () => {
    const { editor, library } = await setUp();
    const key = (await editor.init(null))!;
    vi.useFakeTimers();
    editor.update((d) => void (d.title = 'Edited'));
    expect(JSON.parse(localStorage.getItem(`lakeledger.scenario-backup.${key}`)!).title).toBe('Edited');
    expect(((await library.scenarios.loadDraft(key)) as { title: string }).title).not.toBe('Edited');
    await vi.advanceTimersByTimeAsync(SCENARIO_DRAFT_DELAY_MS + 10);
    vi.useRealTimers();
    await editor.flush();
    expect(((await library.scenarios.loadDraft(key)) as { title: string }).title).toBe('Edited');
    expect(localStorage.getItem(`lakeledger.scenario-backup.${key}`)).toBeNull();
    expect(editor.openEntry?.dirty).toBe(true);
  });

  it('a save refused by a full storage is reported, the edit kept, and saved on the retry', async () => {
    const { editor, library } = await setUp();
    const key = (await editor.init(null))!;
    const real = library.scenarios.saveDraft;
    let full = true;
    library.scenarios.saveDraft = async (k, d) => {
      if (full) throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
      return real.call(library.scenarios, k, d);
    };
    vi.useFakeTimers();
    editor.update((d) => void (d.title = 'Kept'));
    await vi.advanceTimersByTimeAsync(SCENARIO_DRAFT_DELAY_MS + 10);
    expect(editor.saveError).toMatch(/storage for this site is full.*again in 1 s/);
    expect((editor.doc as { title: string }).title).toBe('Kept');
    full = false;
    await vi.advanceTimersByTimeAsync(1100);
    vi.useRealTimers();
    await editor.flush();
    expect(editor.saveError).toBeNull();
    expect(((await library.scenarios.loadDraft(key)) as { title: string }).title).toBe('Kept');
  });

  it('a measure from the catalogue, with a cost, is saved as a new revision', async () => {
    const { editor, library } = await setUp();
    const key = (await editor.init(null))!;
    const at = editor.addFromCatalogue(catalogueItem(CATALOGUE, 'fishRemoval')!, 'BFI');
    expect(at).toBe(0);
    editor.update((d) => setCostField(d, 'fishRemoval', 'amount', 180000, 'EUR'));
    expect(editor.problems).toEqual([]);
    await editor.commit('fish out');
    expect(editor.result).toEqual({ ok: true, text: expect.stringMatching(/^Saved as revision 2, digest sha256:[0-9a-f]{12}\.$/) });
    expect(editor.history.map((r) => r.number)).toEqual([2, 1]);
    const head = await library.scenarios.revision(key, 2);
    expect(head?.doc.measures?.[0]).toMatchObject({ id: 'fishRemoval', kind: 'remove', state: 'BFI' });
    expect(head?.doc.costs).toEqual([{ measure: 'fishRemoval', amount: 180000, currency: 'EUR' }]);
  });

  it('an invalid draft is refused with its problems at their fields', async () => {
    const { editor } = await setUp();
    await editor.init(null);
    editor.addFromCatalogue(catalogueItem(CATALOGUE, 'fishRemoval')!, 'BFI');
    editor.update((d) => void ((d.measures as Record<string, unknown>[])[0].fraction = 1.4));
    expect(editor.byField.get('sc-measures-0-fraction')?.map((p) => p.code)).toEqual(['invalid_measure']);
    await editor.commit();
    expect(editor.result?.ok).toBe(false);
    expect(editor.openEntry?.head).toBe(1);
  });

  it('removing a measure takes its cost; Undo brings both back', async () => {
    const { editor, library, entry } = await setUp();
    await library.scenarios.ensureBaseline(entry.key);
    const list = await library.scenarios.list(entry.key);
    await editor.init(list[3].key);
    const before = structuredClone(editor.draft);
    editor.removeMeasureAt(1, 'fishOut');
    expect((editor.doc!.measures as unknown[]).length).toBe(1);
    expect((editor.doc!.costs as { measure: string }[]).map((c) => c.measure)).toEqual(['loadCut']);
    expect(editor.notice?.message).toBe('Removed measure fishOut.');
    await editor.undo();
    expect(editor.draft).toEqual(before);
  });

  it('delete, then Undo, brings a scenario back; rename of a closed one reaches its draft', async () => {
    const { editor, library } = await setUp();
    await editor.init(null);
    const target = editor.entries[2];
    expect(await editor.remove(target.key)).toBeNull();
    expect(editor.entries.map((e) => e.key)).not.toContain(target.key);
    await editor.undo();
    expect(editor.entries.map((e) => e.key)).toContain(target.key);
    await editor.rename(target.key, 'Fish out, renamed');
    expect(editor.entries.find((e) => e.key === target.key)?.title).toBe('Fish out, renamed');
    expect(((await library.scenarios.loadDraft(target.key)) as { title: string }).title).toBe('Fish out, renamed');
  });

  it('deleting the open scenario names the next one to open', async () => {
    const { editor } = await setUp();
    const key = (await editor.init(null))!;
    const next = await editor.remove(key);
    expect(next).toBe(editor.entries[0].key);
    expect(editor.openKey).toBeNull();
  });

  it('addEmpty and duplicate add scenarios with ids of their own', async () => {
    const { editor } = await setUp();
    await editor.init(null);
    const a = (await editor.addEmpty())!;
    const b = await editor.duplicate(a);
    const ids = editor.entries.map((e) => e.scenarioId);
    expect(ids.slice(-2)).toEqual(['scenario', 'scenario_copy']);
    expect(new Set([a, b]).size).toBe(2);
  });

  it('with the model draft in error, the newest model revision is used', async () => {
    const { editor } = await setUp(() => null);
    await editor.init(null);
    expect(editor.usingFallback).toBe(true);
    expect(editor.model?.id).toBe(demo.id);
    expect(editor.fallback?.number).toBe(1);
  });
});
