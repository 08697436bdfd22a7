/**
 * ModelSession keeps every edit: a synchronous backup holds an edit until the library has
 * the draft, so a page that closes before the debounced save still finds it on load.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ModelSession, RETRY_DELAYS_MS, describeWriteError } from './model-session.svelte';
import type { Library, ModelEntry } from '$lib/storage/types';

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

type FakeLibrary = Library & { saved: unknown[]; failWith: Error | null; setStored(d: unknown): void };

function fakeLibrary(draft: unknown): FakeLibrary {
  const entry: ModelEntry = { key: 'k1', modelId: 'm', title: 'M', origin: 'empty', createdAt: '', updatedAt: '', head: 1, headDigest: null, dirty: false };
  let current = draft;
  const saved: unknown[] = [];
  const lib = {
    saved,
    failWith: null as Error | null,
    setStored: (d: unknown) => (current = d),
    get: async () => entry,
    loadDraft: async () => structuredClone(current),
    saveDraft: async (_k: string, d: unknown) => {
      if (lib.failWith) throw lib.failWith;
      current = d;
      saved.push(d);
    }
  };
  return lib as unknown as FakeLibrary;
}

function quotaError(): Error {
  return new DOMException('The quota has been exceeded.', 'QuotaExceededError');
}

describe('ModelSession', () => {
  beforeEach(() => {
    vi.stubGlobal('localStorage', memoryStorage());
    vi.useFakeTimers();
  });
  afterEach(() => {
    vi.useRealTimers();
    vi.unstubAllGlobals();
  });

  it('update(edit) changes the draft at once and saves it to the library after the pause', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const s = new ModelSession(lib, 'k1');
    await s.load();
    s.update((d) => (d.title = 'B'));
    expect((s.doc as { title: string }).title).toBe('B');
    expect(lib.saved).toEqual([]);
    await vi.advanceTimersByTimeAsync(500);
    expect(lib.saved).toEqual([{ id: 'm', title: 'B' }]);
    expect(localStorage.getItem('lakeledger.draft-backup.k1')).toBeNull();
  });

  it('an edit that never reached the library is found again on the next load', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const s = new ModelSession(lib, 'k1');
    await s.load();
    s.update((d) => (d.title = 'typed just before closing'));
    // the page closes now: no timer runs, nothing reaches the library
    const again = new ModelSession(lib, 'k1');
    await again.load();
    expect((again.doc as { title: string }).title).toBe('typed just before closing');
  });

  it('a save refused for a full storage is reported in words, kept on screen and in the backup, and retried until it goes through', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const s = new ModelSession(lib, 'k1');
    await s.load();
    lib.failWith = quotaError();
    s.update((d) => (d.title = 'B'));
    await vi.advanceTimersByTimeAsync(500);
    expect(s.saveError).toMatch(/^Your edit is not saved yet: the browser's storage for this site is full\. .*again in 1 s\.$/);
    expect((s.doc as { title: string }).title).toBe('B');
    expect(JSON.parse(localStorage.getItem('lakeledger.draft-backup.k1')!)).toEqual({ id: 'm', title: 'B' });
    expect(lib.saved).toEqual([]);
    // the first retry fails too, and the pause grows
    await vi.advanceTimersByTimeAsync(RETRY_DELAYS_MS[0]);
    expect(s.saveError).toMatch(/again in 3 s/);
    lib.failWith = null;
    await vi.advanceTimersByTimeAsync(RETRY_DELAYS_MS[1]);
    expect(s.saveError).toBeNull();
    expect(lib.saved).toEqual([{ id: 'm', title: 'B' }]);
    expect(localStorage.getItem('lakeledger.draft-backup.k1')).toBeNull();
  });

  it('commit refuses while the draft cannot be saved, rather than committing an older draft', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const s = new ModelSession(lib, 'k1');
    await s.load();
    lib.failWith = quotaError();
    s.update((d) => (d.title = 'B'));
    await expect(s.commit('x')).rejects.toThrow(/storage for this site is full/);
  });

  it('a draft another tab wrote since this one loaded is not overwritten: the session reports a conflict', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const s = new ModelSession(lib, 'k1');
    await s.load();
    lib.setStored({ id: 'm', title: 'from the other tab' });
    s.update((d) => (d.title = 'mine'));
    await vi.advanceTimersByTimeAsync(500);
    expect(lib.saved).toEqual([]);
    expect(s.conflict).toEqual({ theirs: { id: 'm', title: 'from the other tab' } });
    expect((s.doc as { title: string }).title).toBe('mine');
    // keeping mine is a choice, and then it is saved
    await s.keepMine();
    expect(s.conflict).toBeNull();
    expect(lib.saved).toEqual([{ id: 'm', title: 'mine' }]);
  });

  it('useTheirs() takes the other tab\'s version and drops the edits made here', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const s = new ModelSession(lib, 'k1');
    await s.load();
    lib.setStored({ id: 'm', title: 'theirs' });
    s.update((d) => (d.title = 'mine'));
    await vi.advanceTimersByTimeAsync(500);
    s.useTheirs();
    expect(s.doc).toEqual({ id: 'm', title: 'theirs' });
    expect(s.conflict).toBeNull();
    await s.flush();
    expect(lib.saved).toEqual([{ id: 'm', title: 'theirs' }]);
  });

  it('describeWriteError names a full storage, a blocked one and any other failure', () => {
    expect(describeWriteError(quotaError())).toBe("the browser's storage for this site is full");
    expect(describeWriteError({ name: 'AbortError', inner: { name: 'QuotaExceededError' } })).toBe("the browser's storage for this site is full");
    expect(describeWriteError(new DOMException('x', 'InvalidStateError'))).toMatch(/refused to write/);
    expect(describeWriteError(new Error('disk on fire'))).toBe('the write failed: disk on fire');
  });
});

describe('ModelSession across two tabs (BroadcastChannel)', () => {
  beforeEach(() => vi.stubGlobal('localStorage', memoryStorage()));
  afterEach(() => vi.unstubAllGlobals());

  const settle = async (until: () => boolean) => {
    for (let i = 0; i < 100 && !until(); i++) await new Promise((r) => setTimeout(r, 10));
  };

  it('a tab without unsaved edits shows what the other tab saved; one with edits gets a conflict instead', async () => {
    const lib = fakeLibrary({ id: 'm', title: 'A' });
    const a = new ModelSession(lib, 'k1');
    const b = new ModelSession(lib, 'k1');
    await a.load();
    await b.load();
    const stopA = a.listen();
    const stopB = b.listen();
    try {
      a.update((d) => (d.title = 'edited in A'));
      await a.flush();
      await settle(() => (b.doc as { title: string }).title === 'edited in A');
      expect(b.doc).toEqual({ id: 'm', title: 'edited in A' });
      expect(b.notice).toMatch(/changed in another tab/);

      // B now has an unsaved edit when A saves again: B keeps its edit and is asked.
      b.update((d) => (d.title = 'edited in B'));
      a.update((d) => (d.title = 'edited in A again'));
      await a.flush();
      await settle(() => b.conflict !== null);
      expect(b.conflict).toEqual({ theirs: { id: 'm', title: 'edited in A again' } });
      expect((b.doc as { title: string }).title).toBe('edited in B');
      await b.flush();
      expect(lib.saved.at(-1)).toEqual({ id: 'm', title: 'edited in A again' });
    } finally {
      stopA();
      stopB();
    }
  });
});
