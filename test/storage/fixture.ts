/** A fresh fake IndexedDB per test, a clock that ticks a second per call, and plain keys. */
import { IDBFactory, IDBKeyRange } from 'fake-indexeddb';
import { openDatabase, type DbEnvironment, type LakeLedgerDb } from '../../src/lib/storage/db';
import { createLibrary } from '../../src/lib/storage/library';
import type { Library } from '../../src/lib/storage/types';
import type { ScenarioDoc } from '../../src/lib/engine/document/types';

export function freshEnvironment(): DbEnvironment {
  return { indexedDB: new IDBFactory(), IDBKeyRange };
}

export function tickingClock(start = '2027-03-01T09:00:00.000Z'): () => Date {
  let t = Date.parse(start);
  return () => {
    const d = new Date(t);
    t += 1000;
    return d;
  };
}

export function counterKeys(prefix = 'k'): () => string {
  let n = 0;
  return () => `${prefix}${++n}`;
}

export interface FixtureOptions {
  exampleScenarios?: Readonly<Record<string, readonly ScenarioDoc[]>>;
}

export interface Fixture {
  env: DbEnvironment;
  db: LakeLedgerDb;
  library: Library;
  /** A second library over a new connection to the same database: a page reload. */
  reload(): Library;
  /** Row counts of every table. */
  counts(): Promise<Record<'entries' | 'revisions' | 'drafts' | 'meta', number>>;
}

export function fixture(options: FixtureOptions = {}): Fixture {
  const env = freshEnvironment();
  const db = openDatabase(env);
  const clock = tickingClock();
  const keys = counterKeys();
  return {
    env,
    db,
    library: createLibrary(db, { now: clock, newKey: keys, exampleScenarios: options.exampleScenarios }),
    reload: () => createLibrary(openDatabase(env), { now: clock, newKey: counterKeys('r'), exampleScenarios: options.exampleScenarios }),
    counts: async () => ({
      entries: await db.entries.count(),
      revisions: await db.revisions.count(),
      drafts: await db.drafts.count(),
      meta: await db.meta.count()
    })
  };
}
