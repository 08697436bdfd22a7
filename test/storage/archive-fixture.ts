/**
 * A library with one stored run of the one-box example (a one-year baseline), for the
 * archive and record tests: a fresh fake IndexedDB, a clock that ticks a second per call.
 */
import { simulate } from '$lib/engine/simulate';
import { EXAMPLES } from '$lib/storage/examples';
import { openDatabase } from '$lib/storage/db';
import { createLibrary } from '$lib/storage/library';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { freshEnvironment } from './fixture';

export const oneBox = EXAMPLES[1] as ModelDoc;

export function library() {
  const env = freshEnvironment();
  const db = openDatabase(env);
  let t = Date.parse('2027-03-01T09:00:00Z');
  let k = 0;
  return { db, lib: createLibrary(db, { now: () => new Date((t += 1000)), newKey: () => `k${++k}`, who: () => 'tester' }) };
}

export async function withRun() {
  const { db, lib } = library();
  const m = await lib.create(structuredClone(oneBox), 'import');
  const b = await lib.scenarios.ensureBaseline(m.key);
  const doc = (await lib.scenarios.revision(b.key, 1))!.doc;
  const short: ScenarioDoc = { ...doc, period: { ...doc.period, end: '2028-01-01' } };
  await lib.scenarios.saveDraft(b.key, short);
  const rev = await lib.scenarios.commit(b.key, oneBox);
  if (!rev.ok) throw new Error('commit failed');
  const run = simulate(oneBox, rev.revision.doc);
  await lib.runs.save(run, { modelKey: m.key, modelRevision: 1, scenarioKey: b.key, scenarioRevision: rev.revision.number }, 'Baseline');
  return { db, lib, m, scenarioKey: b.key, scenario: rev.revision.doc, scenarioRevision: rev.revision.number, run };
}
