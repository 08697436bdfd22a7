/**
 * ModelSession keeps every edit: a synchronous backup holds an edit until the library has
 * the draft, so a page that closes before the debounced save still finds it on load.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ModelSession } from './model-session.svelte';
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

function fakeLibrary(draft: unknown): Library & { saved: unknown[] } {
  const entry: ModelEntry = { key: 'k1', modelId: 'm', title: 'M', origin: 'empty', createdAt: '', updatedAt: '', head: 1, headDigest: null, dirty: false };
  let current = draft;
  const saved: unknown[] = [];
  return {
    saved,
    get: async () => entry,
    loadDraft: async () => current,
    saveDraft: async (_k: string, d: unknown) => {
      current = d;
      saved.push(d);
    }
  } as unknown as Library & { saved: unknown[] };
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
});
