/**
 * The library writes its audit log (DEVELOPERS.md, "Archive in the browser"): every create,
 * revise, run and delete of models, scenarios and runs is an entry in the same transaction,
 * the chain holds, and Undo of a deletion is logged too (nothing rewrites history).
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '$lib/engine/simulate';
import { recordDigest } from '$lib/archive/record';
import { EXAMPLES } from '$lib/storage/examples';
import { DB_VERSION, openDatabase } from '$lib/storage/db';
import { createLibrary } from '$lib/storage/library';
import { freshEnvironment } from './fixture';

const oneBox = EXAMPLES[1];

function library() {
  const env = freshEnvironment();
  let t = Date.parse('2027-03-01T09:00:00Z');
  return createLibrary(openDatabase(env), { now: () => new Date((t += 1000)), who: () => 'A. Limnologist' });
}

describe('the library keeps an audit log', () => {
  it('create, revise, scenario, run, delete and undo each leave an entry, and the chain holds', async () => {
    const lib = library();
    const m = await lib.create(structuredClone(oneBox), 'import');
    await lib.saveDraft(m.key, { ...structuredClone(oneBox), title: 'Edited' });
    await lib.commit(m.key, 'a new title');
    const b = await lib.scenarios.ensureBaseline(m.key);
    const doc = (await lib.scenarios.revision(b.key, 1))!.doc;
    const run = simulate(oneBox, { ...doc, period: { ...doc.period, end: '2028-01-01' } });
    await lib.runs.save(run, { modelKey: m.key, modelRevision: 2, scenarioKey: b.key, scenarioRevision: 1 }, 'Baseline');
    await lib.runs.remove(run.id);
    const { undo } = await lib.remove(m.key);
    await undo();

    const log = await lib.log.list();
    expect(log.map((e) => `${e.action} ${e.subject.kind}`)).toEqual([
      'import model',
      'revise model',
      'create scenario',
      'run run',
      'delete run',
      'delete model',
      'create model'
    ]);
    expect(log.every((e) => e.by === 'A. Limnologist')).toBe(true);
    expect(log[3].subject).toEqual({ kind: 'run', id: run.id, digest: recordDigest(run) });
    expect(log[4].subject.digest).toBe(recordDigest(run));
    expect(log[6].note).toMatch(/restored with Undo/);
    expect(await lib.log.verify()).toEqual([]);
  });

  it('a stored run keeps its record digest; a refused write leaves no entry', async () => {
    const lib = library();
    const run = simulate(oneBox, { format: 'lakeledger.scenario/1', id: 's', model: oneBox.id, period: { start: '2027-01-01', end: '2027-06-01' } });
    const { summary } = await lib.runs.save(run, { modelKey: 'm', modelRevision: 1, scenarioKey: 's', scenarioRevision: 1 }, 'S');
    expect(summary.recordDigest).toBe(recordDigest(run));
    await expect(lib.runs.save({ ...run, status: 'cancelled' }, { modelKey: 'm', modelRevision: 1, scenarioKey: 's', scenarioRevision: 1 }, 'S')).rejects.toThrow();
    expect((await lib.log.list()).map((e) => e.action)).toEqual(['run']);
  });

  it('database version 4 has the log tables and opens a version-3 library with its rows', async () => {
    expect(DB_VERSION).toBeGreaterThanOrEqual(4);
    const env = freshEnvironment();
    const v3 = openDatabase(env, { upTo: 3 });
    await v3.meta.put({ key: 'seeded', value: 'x' });
    v3.close();
    const v4 = openDatabase(env, { upTo: 4 });
    await v4.open();
    expect(v4.tables.map((t) => t.name)).toEqual(expect.arrayContaining(['log', 'importedLogs', 'sweeps']));
    expect(await v4.meta.get('seeded')).toEqual({ key: 'seeded', value: 'x' });
    expect(await v4.log.count()).toBe(0);
    v4.close();
  });
});
