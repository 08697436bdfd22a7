import { describe, expect, it } from 'vitest';
import { IDBFactory, IDBKeyRange } from 'fake-indexeddb';
import { openDatabase } from '$lib/storage/db';
import { createLibrary } from '$lib/storage/library';
import { EXAMPLES, EXAMPLE_SCENARIOS } from '$lib/storage/examples';
import { planRuns } from './plan-runs';

const demo = EXAMPLES[0];

async function setUp() {
  const library = createLibrary(openDatabase({ indexedDB: new IDBFactory(), IDBKeyRange }), { exampleScenarios: EXAMPLE_SCENARIOS });
  const m = await library.create(structuredClone(demo), 'example');
  await library.scenarios.ensureBaseline(m.key);
  return { library, m, list: await library.scenarios.list(m.key) };
}

describe('planRuns', () => {
  it('plans every scenario from saved revisions, committing an edited scenario draft first', async () => {
    const { library, m, list } = await setUp();
    const edited = { ...structuredClone(EXAMPLE_SCENARIOS[demo.id][1]), title: 'Load cut, edited' };
    await library.scenarios.saveDraft(list[1].key, edited);
    const { plans, refusals } = await planRuns(() => library.commit(m.key), m.key, library.scenarios, list.map((s) => s.key));
    expect(refusals).toEqual([]);
    expect(plans.map((p) => p.scenarioRevision)).toEqual([1, 2, 1, 1]);
    expect(plans[1]).toMatchObject({ title: 'Load cut, edited', modelKey: m.key, modelRevision: 1, scenarioKey: list[1].key });
    expect(plans[1].scenario).toEqual(edited);
    expect((await library.scenarios.get(list[1].key))!.dirty).toBe(false);
  });

  it('refuses a scenario whose draft is invalid, naming the field, and plans the others', async () => {
    const { library, m, list } = await setUp();
    await library.scenarios.saveDraft(list[2].key, { ...structuredClone(EXAMPLE_SCENARIOS[demo.id][2]), period: { start: '2030-01-01', end: '2020-01-01' } });
    const { plans, refusals } = await planRuns(() => library.commit(m.key), m.key, library.scenarios, list.map((s) => s.key));
    expect(plans).toHaveLength(3);
    expect(refusals).toHaveLength(1);
    expect(refusals[0]).toMatchObject({ key: list[2].key });
    expect(refusals[0].message).toMatch(/^cannot run: period: /);
  });

  it('an invalid model draft refuses every run and plans none', async () => {
    const { library, m, list } = await setUp();
    await library.saveDraft(m.key, { ...structuredClone(demo), states: 'none' });
    const { plans, refusals } = await planRuns(() => library.commit(m.key), m.key, library.scenarios, list.map((s) => s.key));
    expect(plans).toEqual([]);
    expect(refusals[0].message).toMatch(/model's draft cannot be saved/);
  });
});
