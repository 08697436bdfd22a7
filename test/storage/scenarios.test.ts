/**
 * Scenarios in the library (src/lib/storage/scenarios.ts) under fake-indexeddb: a baseline
 * for every model, the example scenarios of an example model, revisions with digests,
 * drafts across a reload, validation against the model, duplicate, remove with undo, and
 * a model's removal taking its scenarios and runs along (and Undo bringing them back).
 */
import { describe, expect, it } from 'vitest';
import { digestOf } from '$lib/engine/document/digest';
import type { ScenarioDoc } from '$lib/engine/document/types';
import { simulate } from '$lib/engine/simulate';
import { EXAMPLES, EXAMPLE_SCENARIOS } from '$lib/storage/examples';
import { InvalidScenarioError } from '$lib/storage/scenarios';
import { fixture } from './fixture';

const [demo, oneBox] = EXAMPLES;
const demoScenarios = EXAMPLE_SCENARIOS[demo.id];

function clone<T>(x: T): T {
  return structuredClone(x);
}

describe('scenarios: baseline and examples', () => {
  it('ensureBaseline(model) makes a baseline without measures, 20 years from the time origin, once', async () => {
    const { library } = fixture();
    const m = await library.create(clone(oneBox), 'import');
    const b = await library.scenarios.ensureBaseline(m.key);
    expect(b).toMatchObject({ modelKey: m.key, scenarioId: 'baseline', origin: 'baseline', head: 1, dirty: false });
    const doc = (await library.scenarios.revision(b.key, 1))!.doc;
    expect(doc.measures).toEqual([]);
    expect(doc.model).toBe(oneBox.id);
    const start = oneBox.timeOrigin ?? '2027-01-01';
    expect(doc.period.start).toBe(start);
    expect(Number(doc.period.end.slice(0, 4)) - Number(start.slice(0, 4))).toBe(20);
    const again = await library.scenarios.ensureBaseline(m.key);
    expect(again.key).toBe(b.key);
    expect(await library.scenarios.list(m.key)).toHaveLength(1);
  });

  it('an example model starts with its shipped scenarios, the baseline first, and no extra baseline', async () => {
    const { library } = fixture({ exampleScenarios: EXAMPLE_SCENARIOS });
    const m = await library.create(clone(demo), 'example');
    const b = await library.scenarios.ensureBaseline(m.key);
    const list = await library.scenarios.list(m.key);
    expect(list.map((s) => s.scenarioId)).toEqual(demoScenarios.map((s) => s.id));
    expect(b.scenarioId).toBe(demoScenarios[0].id);
    expect(list.every((s) => s.origin === 'example')).toBe(true);
  });

  it('a model imported with the demo id gets only a baseline: examples belong to example entries', async () => {
    const { library } = fixture({ exampleScenarios: EXAMPLE_SCENARIOS });
    const m = await library.create(clone(demo), 'import');
    await library.scenarios.ensureBaseline(m.key);
    expect((await library.scenarios.list(m.key)).map((s) => s.origin)).toEqual(['baseline']);
  });

  it('deleting the baseline brings a new one on the next ensureBaseline, examples are not added twice', async () => {
    const { library } = fixture({ exampleScenarios: EXAMPLE_SCENARIOS });
    const m = await library.create(clone(demo), 'example');
    const b = await library.scenarios.ensureBaseline(m.key);
    await library.scenarios.remove(b.key);
    const nb = await library.scenarios.ensureBaseline(m.key);
    expect(nb.key).not.toBe(b.key);
    expect(nb.origin).toBe('baseline');
    const ids = (await library.scenarios.list(m.key)).map((s) => s.scenarioId);
    expect(ids).toHaveLength(demoScenarios.length);
    expect(new Set(ids).size).toBe(ids.length);
  });
});

describe('scenarios: revisions and drafts', () => {
  it('create() refuses a scenario that does not fit its model, naming the problem, and writes nothing', async () => {
    const { library, db } = fixture();
    const m = await library.create(clone(demo), 'import');
    const bad = { ...clone(demoScenarios[1]), measures: [{ id: 'x', kind: 'scale', target: 'noSuchThing', factor: 0.5, from: '2029-01-01' }] };
    await expect(library.scenarios.create(m.key, bad as ScenarioDoc, demo, 'new')).rejects.toThrow(InvalidScenarioError);
    await expect(library.scenarios.create(m.key, bad as ScenarioDoc, demo, 'new')).rejects.toThrow(/noSuchThing/);
    expect(await db.scenarios.count()).toBe(0);
  });

  it('a draft survives a reload; commit makes revision 2 with the digest of its canonical JSON', async () => {
    const f = fixture();
    const m = await f.library.create(clone(demo), 'import');
    const s = await f.library.scenarios.create(m.key, clone(demoScenarios[1]), demo, 'new');
    const edited = { ...clone(demoScenarios[1]), title: 'Load cut to 40 %' };
    (edited.measures![0] as { factor: number }).factor = 0.4;
    await f.library.scenarios.saveDraft(s.key, edited);
    const reloaded = f.reload();
    expect(await reloaded.scenarios.loadDraft(s.key)).toEqual(edited);
    expect((await reloaded.scenarios.get(s.key))!.dirty).toBe(true);
    const r = await reloaded.scenarios.commit(s.key, demo, 'forty per cent');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.revision).toMatchObject({ number: 2, note: 'forty per cent', digest: digestOf(edited) });
    expect(await reloaded.scenarios.get(s.key)).toMatchObject({ head: 2, dirty: false, title: 'Load cut to 40 %' });
    expect((await reloaded.scenarios.history(s.key)).map((h) => h.number)).toEqual([2, 1]);
    expect((await reloaded.scenarios.revision(s.key, 1))!.doc).toEqual(demoScenarios[1]);
  });

  it('commit of an invalid draft returns its problems and keeps the draft; an unchanged draft makes no revision', async () => {
    const { library } = fixture();
    const m = await library.create(clone(demo), 'import');
    const s = await library.scenarios.create(m.key, clone(demoScenarios[1]), demo, 'new');
    const broken = { ...clone(demoScenarios[1]), period: { start: '2030-01-01', end: '2029-01-01' } };
    await library.scenarios.saveDraft(s.key, broken);
    const r = await library.scenarios.commit(s.key, demo);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.map((p) => p.code)).toContain('invalid_period');
    expect(await library.scenarios.loadDraft(s.key)).toEqual(broken);
    await library.scenarios.saveDraft(s.key, clone(demoScenarios[1]));
    expect(await library.scenarios.commit(s.key, demo)).toMatchObject({ ok: true, unchanged: true });
    expect((await library.scenarios.get(s.key))!.head).toBe(1);
  });

  it('two scenarios of one model cannot share an id; duplicate gives id <id>_copy and "… (copy)"', async () => {
    const { library } = fixture();
    const m = await library.create(clone(demo), 'import');
    const s = await library.scenarios.create(m.key, clone(demoScenarios[1]), demo, 'new');
    await expect(library.scenarios.create(m.key, clone(demoScenarios[1]), demo, 'new')).rejects.toThrow(/already has a scenario/);
    const d = await library.scenarios.duplicate(s.key);
    expect(d).toMatchObject({ scenarioId: `${demoScenarios[1].id}_copy`, title: `${demoScenarios[1].title} (copy)`, origin: 'duplicate' });
    const d2 = await library.scenarios.duplicate(s.key);
    expect(d2.scenarioId).toBe(`${demoScenarios[1].id}_copy2`);
  });

  it('remove() deletes the scenario with its revisions and draft; undo restores all of it', async () => {
    const { library, db } = fixture();
    const m = await library.create(clone(demo), 'import');
    const s = await library.scenarios.create(m.key, clone(demoScenarios[1]), demo, 'new');
    await library.scenarios.saveDraft(s.key, { ...clone(demoScenarios[1]), notes: 'unsaved' });
    const { undo } = await library.scenarios.remove(s.key);
    expect(await library.scenarios.get(s.key)).toBeUndefined();
    expect(await db.scenarioRevisions.count()).toBe(0);
    await undo();
    expect(await library.scenarios.loadDraft(s.key)).toMatchObject({ notes: 'unsaved' });
    expect((await library.scenarios.history(s.key)).length).toBe(1);
  });
});

describe('removing a model takes its scenarios and runs along', () => {
  it('remove(model) deletes scenarios, revisions and runs; undo brings every row back', async () => {
    const { library, db } = fixture({ exampleScenarios: EXAMPLE_SCENARIOS });
    const m = await library.create(clone(oneBox), 'example');
    const b = await library.scenarios.ensureBaseline(m.key);
    const doc = (await library.scenarios.revision(b.key, 1))!.doc;
    const run = simulate(oneBox, { ...doc, period: { ...doc.period, end: '2029-01-01' } });
    await library.runs.save(run, { modelKey: m.key, modelRevision: 1, scenarioKey: b.key, scenarioRevision: 1 }, 'Baseline');
    const before = { s: await db.scenarios.count(), r: await db.runs.count(), d: await db.runData.count() };
    expect(before).toEqual({ s: 1, r: 1, d: 1 });
    const { undo } = await library.remove(m.key);
    expect({ s: await db.scenarios.count(), r: await db.runs.count(), d: await db.runData.count() }).toEqual({ s: 0, r: 0, d: 0 });
    await undo();
    expect({ s: await db.scenarios.count(), r: await db.runs.count(), d: await db.runData.count() }).toEqual(before);
    expect(await library.runs.load(run.id)).toEqual(run);
  });
});
