/**
 * The library as the app uses it: one instance per page over the browser's IndexedDB,
 * made on first use (so nothing touches IndexedDB before a screen asks for it).
 */
import { openDatabase } from './db';
import { createLibrary } from './library';
import { EXAMPLE_SCENARIOS } from './examples';
import type { Library } from './types';

export type {
  CommitResult,
  EntryOrigin,
  ImportResult,
  Library,
  ModelEntry,
  Revision,
  RunProvenance,
  RunStore,
  ScenarioCommitResult,
  ScenarioEntry,
  ScenarioLibrary,
  ScenarioOrigin,
  ScenarioRevision,
  StoredRunSummary
} from './types';
export { EXAMPLES, EXAMPLE_BASELINES, EXAMPLE_SCENARIOS } from './examples';
export { InvalidModelError, NoSuchEntryError } from './library';
export { InvalidScenarioError, NoSuchScenarioError } from './scenarios';

let library: Library | null = null;

/** Where the user's own label for the audit log is kept (set on the Archive screen). */
export const USER_LABEL_KEY = 'lakeledger.user-label';

function userLabel(): string {
  try {
    return localStorage.getItem(USER_LABEL_KEY) ?? '';
  } catch {
    return '';
  }
}

export function getLibrary(): Library {
  if (!library) {
    if (typeof indexedDB === 'undefined') {
      throw new Error('this browser offers no IndexedDB, so the model library cannot be kept');
    }
    library = createLibrary(openDatabase({ indexedDB, IDBKeyRange }), { exampleScenarios: EXAMPLE_SCENARIOS, who: userLabel });
  }
  return library;
}
