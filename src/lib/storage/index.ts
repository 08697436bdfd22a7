/**
 * The library as the app uses it: one instance per page over the browser's IndexedDB,
 * made on first use (so nothing touches IndexedDB before a screen asks for it).
 */
import { openDatabase } from './db';
import { createLibrary } from './library';
import type { Library } from './types';

export type { CommitResult, EntryOrigin, ImportResult, Library, ModelEntry, Revision } from './types';
export { EXAMPLES, EXAMPLE_BASELINES } from './examples';
export { InvalidModelError, NoSuchEntryError } from './library';

let library: Library | null = null;

export function getLibrary(): Library {
  if (!library) {
    if (typeof indexedDB === 'undefined') {
      throw new Error('this browser offers no IndexedDB, so the model library cannot be kept');
    }
    library = createLibrary(openDatabase({ indexedDB, IDBKeyRange }));
  }
  return library;
}
