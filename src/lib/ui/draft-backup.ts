/**
 * A synchronous backup of a working draft in localStorage, written on every edit and removed
 * once IndexedDB holds the draft: an edit made just before the page closes (before the
 * debounced save ran) is found again on the next load. Each kind of draft has its prefix.
 */
export interface DraftBackup {
  /** True when the backup holds `doc` now (false when localStorage is full or blocked). */
  write(key: string, doc: unknown): boolean;
  read(key: string): unknown;
  clear(key: string): void;
}

function storage(): Storage | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null;
  }
}

export function draftBackup(prefix: string): DraftBackup {
  return {
    write(key, doc) {
      try {
        const s = storage();
        if (!s || !key) return false;
        s.setItem(prefix + key, JSON.stringify(doc));
        return true;
      } catch {
        // full or unavailable: the debounced IndexedDB save still runs
        return false;
      }
    },
    read(key) {
      const text = key ? storage()?.getItem(prefix + key) : null;
      if (text == null) return undefined;
      try {
        return JSON.parse(text);
      } catch {
        return undefined;
      }
    },
    clear(key) {
      try {
        storage()?.removeItem(prefix + key);
      } catch {
        /* nothing to clear */
      }
    }
  };
}
