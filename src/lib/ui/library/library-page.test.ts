/** The Models page's state over a library under fake-indexeddb, with a hand-driven timer. */
import { describe, expect, it } from 'vitest';
import { EXAMPLES } from '$lib/storage/examples';
import { LibraryPageState, UNDO_MS, type Timers } from './library-page.svelte';
import { fixture } from '../../../../test/storage/fixture';

/** Timers that run only when the test says so. */
function manualTimers() {
  const pending = new Map<number, { fn: () => void; ms: number }>();
  let next = 0;
  const timers: Timers = {
    set: (fn, ms) => {
      pending.set(++next, { fn, ms });
      return next;
    },
    clear: (h) => void pending.delete(h as number)
  };
  return {
    timers,
    pending,
    fire() {
      for (const [h, t] of [...pending]) {
        pending.delete(h);
        t.fn();
      }
    }
  };
}

async function loaded() {
  const f = fixture();
  const clock = manualTimers();
  const state = new LibraryPageState(f.library, EXAMPLES, clock.timers);
  await state.load();
  return { ...f, state, clock };
}

describe('LibraryPageState', () => {
  it('load() seeds the three examples on first start, the demo lake first', async () => {
    const { state } = await loaded();
    expect(state.loading).toBe(false);
    expect(state.loadError).toBeNull();
    expect(state.entries.map((e) => e.modelId)).toEqual(['demo_lake', 'ambrel_one_box', 'tessel_mere_npzd']);
  });

  it('addExample and createEmpty add entries and say so; an empty title writes nothing', async () => {
    const { state, counts } = await loaded();
    const added = await state.addExample('ambrel_one_box');
    expect(added?.origin).toBe('example');
    expect(state.message).toMatch(/^Added 'Lake Ambrel/);
    const before = await counts();
    expect(await state.createEmpty(' ')).toEqual({ problem: 'A title cannot be empty.' });
    expect(await counts()).toEqual(before);
    const made = await state.createEmpty('Pond C');
    expect('entry' in made && made.entry.modelId).toBe('pond_c');
    expect(state.entries[0].title).toBe('Pond C');
  });

  it('rename refuses an empty title and keeps the old one', async () => {
    const { state } = await loaded();
    const key = state.entries[0].key;
    expect(await state.rename(key, '')).toBe('A title cannot be empty.');
    expect(state.entries.find((e) => e.key === key)?.title).toMatch(/^Lake Wendmoor/);
    expect(await state.rename(key, 'Wendmoor, mine')).toBeNull();
    expect(state.entries.find((e) => e.key === key)?.title).toBe('Wendmoor, mine');
    expect(state.message).toBe("Renamed 'Lake Wendmoor: phosphorus cycle of an invented shallow lake' to 'Wendmoor, mine'.");
  });

  it('remove() says what went with the entry, undo restores it, and the notice ends after UNDO_MS', async () => {
    const { state, library, clock } = await loaded();
    const entry = state.entries[1];
    await library.saveDraft(entry.key, { ...(await library.loadDraft(entry.key) as object), description: 'changed' });
    await state.refresh();
    const notice = await state.remove(entry.key);
    expect(notice?.text).toBe(`Deleted '${entry.title}' with its draft and 1 revision.`);
    expect(state.entries.map((e) => e.key)).not.toContain(entry.key);
    expect([...clock.pending.values()].map((t) => t.ms)).toEqual([UNDO_MS]);

    const restored = await state.undoRemove();
    expect(restored?.key).toBe(entry.key);
    expect(restored?.dirty).toBe(true);
    expect(state.deletion).toBeNull();
    expect(clock.pending.size).toBe(0);

    await state.remove(entry.key);
    clock.fire();
    expect(state.deletion).toBeNull();
    expect(await state.undoRemove()).toBeNull();
    expect(await library.get(entry.key)).toBeUndefined();
  });

  it('importText of a bad file lists its problems and adds nothing', async () => {
    const { state, counts } = await loaded();
    const before = await counts();
    expect(await state.importText('two-ids.json', '{"format":"lakeledger.model/1","id":"a","id":"b"}')).toBeNull();
    expect(state.refused?.text).toBe('two-ids.json was not imported, nothing was added: 1 problem.');
    expect(state.refused?.problems.map((p) => p.code)).toEqual(['duplicate_key']);
    expect(await counts()).toEqual(before);
    expect(state.entries).toHaveLength(3);
  });

  it('exportFile then importText gives an entry with the same digest', async () => {
    const { state } = await loaded();
    const source = state.entries[0];
    const file = await state.exportFile(source.key);
    expect(file?.fileName).toBe('demo_lake.model.json');
    const imported = await state.importText(file!.fileName, file!.text);
    expect(imported?.headDigest).toBe(source.headDigest);
    expect(state.message).toBe(`Imported '${source.title}' from demo_lake.model.json.`);
  });

  it('a failing library action becomes words, not an exception', async () => {
    const { state } = await loaded();
    expect(await state.duplicate('no-such-key')).toBeNull();
    expect(state.failure).toMatch(/^Duplicating failed: there is no model 'no-such-key'/);
  });
});
