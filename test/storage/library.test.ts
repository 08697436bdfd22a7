/**
 * The model library (src/lib/storage/library.ts) under fake-indexeddb: entries, revisions
 * and their digests (SHA-256 over RFC 8785 canonical JSON), drafts across a reload, import
 * that refuses bad files without writing, remove with undo, seeding the examples once.
 */
import { describe, expect, it } from 'vitest';
import { digestOf } from '$lib/engine/document/digest';
import { validateModel } from '$lib/engine/document/validate-model';
import type { ModelDoc } from '$lib/engine/document/types';
import { EXAMPLES } from '$lib/storage/examples';
import { InvalidModelError, SEEDED_FLAG, idFromTitle } from '$lib/storage/library';
import { fixture } from './fixture';

const [demo, oneBox, npzd] = EXAMPLES;

function clone<T>(x: T): T {
  return structuredClone(x);
}

/** The same document with its keys written in reverse order, at every level. */
function reversedKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(reversedKeys);
  if (v && typeof v === 'object') {
    return Object.fromEntries(Object.entries(v).reverse().map(([k, x]) => [k, reversedKeys(x)]));
  }
  return v;
}

function errorCodes(problems: { severity: string; code: string }[]): string[] {
  return problems.filter((p) => p.severity === 'error').map((p) => p.code);
}

describe('library: entries', () => {
  it('create(doc) makes an entry with revision 1 and list() shows newest change first', async () => {
    const { library } = fixture();
    const a = await library.create(clone(oneBox), 'example');
    const b = await library.create(clone(npzd), 'import');
    expect(a).toMatchObject({
      modelId: 'ambrel_one_box',
      title: oneBox.title,
      origin: 'example',
      head: 1,
      headDigest: digestOf(oneBox),
      dirty: false
    });
    expect(a.key).not.toBe(b.key);
    expect((await library.list()).map((e) => e.key)).toEqual([b.key, a.key]);
    expect(await library.get(a.key)).toEqual(a);
    expect(await library.get('nothing')).toBeUndefined();
  });

  it('create(doc) refuses an invalid model with its problems and writes nothing', async () => {
    const { library, counts } = fixture();
    const before = await counts();
    const bad = { ...clone(oneBox), states: [] } as ModelDoc;
    const err = await library.create(bad, 'empty').catch((e) => e);
    expect(err).toBeInstanceOf(InvalidModelError);
    expect(errorCodes((err as InvalidModelError).problems)).toContain('no_states');
    expect(await counts()).toEqual(before);
  });

  it('createEmpty(title) makes a minimal valid model: P in kg, V in m^3, one state, no flows', async () => {
    const { library } = fixture();
    const e = await library.createEmpty('  Lake Örnå  north ');
    const doc = (await library.loadDraft(e.key)) as ModelDoc;
    expect(validateModel(doc).filter((p) => p.severity === 'error')).toEqual([]);
    expect(doc.format).toBe('lakeledger.model/1');
    expect(doc.id).toBe('lake_orna_north');
    expect(doc.title).toBe('Lake Örnå  north'.trim());
    expect(doc.conserved).toEqual({ element: 'P', unit: 'kg' });
    expect(doc.parameters).toEqual([expect.objectContaining({ id: 'V', unit: 'm^3' })]);
    expect(doc.states).toHaveLength(1);
    expect(doc.flows).toEqual([]);
    expect(e).toMatchObject({ origin: 'empty', head: 1, title: 'Lake Örnå  north', modelId: 'lake_orna_north' });
    // A second model of the same title gets an id of its own.
    expect((await library.createEmpty('Lake Örnå north')).modelId).toBe('lake_orna_north_2');
    await expect(library.createEmpty('   ')).rejects.toThrow(/title/);
  });

  it.each([
    ['Lake Ambrel', 'lake_ambrel'],
    ['2nd pond', 'm_2nd_pond'],
    ['Mälarsjön (north basin)', 'malarsjon_north_basin'],
    ['???', 'model'],
    ['class', 'class_model'],
    ['Already_an_id', 'already_an_id']
  ])('idFromTitle(%j) is %j, a valid id', (title, id) => {
    expect(idFromTitle(title)).toBe(id);
    expect(id).toMatch(/^[A-Za-z_][A-Za-z0-9_]*$/);
  });

  it('rename(key, title) renames the entry and the document, as a revision of its own', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    await library.rename(e.key, '  Ambrel, my copy ');
    const after = (await library.get(e.key))!;
    expect(after).toMatchObject({ title: 'Ambrel, my copy', head: 2, dirty: false });
    const [newest, first] = await library.history(e.key);
    expect(newest).toMatchObject({ number: 2, note: 'renamed', digest: digestOf({ ...oneBox, title: 'Ambrel, my copy' }) });
    expect(first.doc.title).toBe(oneBox.title);
    await expect(library.rename(e.key, ' ')).rejects.toThrow(/empty/);
    expect((await library.get(e.key))!.title).toBe('Ambrel, my copy');
  });

  it('rename(key, title) of a model with unsaved edits puts the title into the draft beside them', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const edited = { ...clone(oneBox), description: 'edited' };
    await library.saveDraft(e.key, edited);
    await library.rename(e.key, 'Ambrel edited');
    expect(await library.loadDraft(e.key)).toEqual({ ...edited, title: 'Ambrel edited' });
    expect(await library.get(e.key)).toMatchObject({ title: 'Ambrel edited', head: 1, dirty: true });
  });

  it('duplicate(key) gives its own key, id <id>_copy then _copy2, and the title "… (copy)"', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const c1 = await library.duplicate(e.key);
    const c2 = await library.duplicate(e.key);
    expect(c1).toMatchObject({ modelId: 'ambrel_one_box_copy', title: `${oneBox.title} (copy)`, origin: 'duplicate', head: 1 });
    expect(c2.modelId).toBe('ambrel_one_box_copy2');
    expect(new Set([e.key, c1.key, c2.key]).size).toBe(3);
    const doc = (await library.loadDraft(c1.key)) as ModelDoc;
    expect(doc).toEqual({ ...oneBox, id: 'ambrel_one_box_copy', title: `${oneBox.title} (copy)` });
    expect(c1.headDigest).toBe(digestOf(doc));
    // The original is untouched.
    expect(await library.loadDraft(e.key)).toEqual(oneBox);
  });
});

describe('library: revisions and drafts', () => {
  it("a revision's digest is digestOf(doc), and committing the same document again makes no revision", async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const [r1] = await library.history(e.key);
    expect(r1).toMatchObject({ number: 1, digest: digestOf(oneBox) });
    expect(r1.digest).toMatch(/^sha256:[0-9a-f]{64}$/);

    await library.saveDraft(e.key, clone(oneBox));
    expect((await library.get(e.key))!.dirty).toBe(false);
    const again = await library.commit(e.key, 'same');
    expect(again).toMatchObject({ ok: true, unchanged: true, revision: { number: 1 } });
    expect(await library.history(e.key)).toHaveLength(1);
  });

  it('the order of keys does not change the digest: a reordered document is unchanged', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const reordered = reversedKeys(oneBox);
    expect(JSON.stringify(reordered)).not.toBe(JSON.stringify(oneBox));
    expect(digestOf(reordered)).toBe(digestOf(oneBox));
    await library.saveDraft(e.key, reordered);
    expect((await library.get(e.key))!.dirty).toBe(false);
    expect(await library.commit(e.key)).toMatchObject({ ok: true, unchanged: true });
    expect(await library.history(e.key)).toHaveLength(1);
  });

  it('an edited draft commits as revision 2; history() lists newest first; revisions stay as they were', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const edited = clone(oneBox);
    edited.parameters[2].value = 60;
    await library.saveDraft(e.key, edited);
    expect(await library.get(e.key)).toMatchObject({ dirty: true, head: 1 });
    const r = await library.commit(e.key, 'half the inflow P');
    expect(r).toMatchObject({ ok: true, unchanged: false, revision: { number: 2, note: 'half the inflow P', digest: digestOf(edited) } });
    expect(await library.get(e.key)).toMatchObject({ head: 2, headDigest: digestOf(edited), dirty: false });
    const history = await library.history(e.key);
    expect(history.map((h) => h.number)).toEqual([2, 1]);
    expect(history[1].doc).toEqual(oneBox);
    expect(history[1].digest).toBe(digestOf(oneBox));
  });

  it('restore(1) then commit gives revision 3 with the digest of revision 1', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const edited = { ...clone(oneBox), description: 'second thoughts' };
    await library.saveDraft(e.key, edited);
    await library.commit(e.key);
    await library.restore(e.key, 1);
    expect(await library.loadDraft(e.key)).toEqual(oneBox);
    expect((await library.get(e.key))!.dirty).toBe(true);
    const r = await library.commit(e.key, 'back to the first');
    expect(r).toMatchObject({ ok: true, unchanged: false, revision: { number: 3 } });
    const history = await library.history(e.key);
    expect(history.map((h) => h.number)).toEqual([3, 2, 1]);
    expect(history[0].digest).toBe(history[2].digest);
    await expect(library.restore(e.key, 9)).rejects.toThrow(/no revision 9/);
  });

  it('commit refuses an invalid draft with its problems and makes no revision', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const broken = clone(oneBox) as unknown as { flows: { rate: string }[] };
    broken.flows[0].rate = 'Q/V * Pinn';
    await library.saveDraft(e.key, broken);
    const r = await library.commit(e.key);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(errorCodes(r.problems)).toContain('unknown_symbol');
    expect(await library.history(e.key)).toHaveLength(1);
    // The invalid draft is kept, not thrown away.
    expect(await library.loadDraft(e.key)).toEqual(broken);
  });

  it('a draft, valid or not, survives a reload (a new library over the same database)', async () => {
    const { library, reload } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    const halfTyped = { ...clone(oneBox), states: [{ id: 'TP', unit: 'mg/m^3', initial: 'sixty', size: 'V' }] };
    await library.saveDraft(e.key, halfTyped);
    const again = reload();
    expect(await again.loadDraft(e.key)).toEqual(halfTyped);
    expect(await again.get(e.key)).toMatchObject({ dirty: true, head: 1 });
  });

  it('saveDraft keeps the entry up to date with the id and title of the draft', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    await library.saveDraft(e.key, { ...clone(oneBox), id: 'ambrel_v2', title: 'Ambrel II' });
    expect(await library.get(e.key)).toMatchObject({ modelId: 'ambrel_v2', title: 'Ambrel II', dirty: true });
    // A draft of an entry deleted meanwhile is dropped, not written as a stray row.
    const { undo } = await library.remove(e.key);
    await library.saveDraft(e.key, { id: 'late' });
    await undo();
    expect(await library.loadDraft(e.key)).toMatchObject({ id: 'ambrel_v2' });
  });
});

describe('library: import and export', () => {
  const cases: [string, string, string[]][] = [
    ['a syntax error', '{\n  "format": "lakeledger.model/1",\n  "id": "x",,\n}', ['json_syntax']],
    [
      'a duplicate key (two "id" keys in one state)',
      JSON.stringify(oneBox, null, 2).replace('"id": "TP",', '"id": "TP",\n      "id": "TP2",'),
      ['duplicate_key']
    ],
    ['an invalid model', JSON.stringify({ ...oneBox, flows: [{ id: 'load', to: 'NOPE', rate: 'Q/V * Pin' }] }), ['unknown_state']],
    ['a scenario, not a model', JSON.stringify({ format: 'lakeledger.scenario/1', id: 's', model: 'x', period: {} }), ['wrong_format']],
    ['an empty file', '', ['json_syntax']]
  ];

  it.each(cases)('importText refuses %s with its problems and writes nothing', async (_what, text, codes) => {
    const { library, counts } = fixture();
    await library.create(clone(oneBox), 'example');
    const before = await counts();
    const r = await library.importText(text, 'bad.model.json');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    for (const code of codes) expect(errorCodes(r.problems)).toContain(code);
    for (const p of r.problems) expect(p.message.length).toBeGreaterThan(0);
    expect(await counts()).toEqual(before);
  });

  it('importText reports a duplicate key at its path and line, not merged', async () => {
    const { library } = fixture();
    const text = '{"format":"lakeledger.model/1","id":"a",\n"states":[{"id":"X",\n"id":"Y"}]}';
    const r = await library.importText(text, 'dup.json');
    expect(r).toEqual({
      ok: false,
      problems: [expect.objectContaining({ code: 'duplicate_key', path: 'states[0].id', message: expect.stringContaining('line 3') })]
    });
  });

  it('importText reports a syntax error with its line and column', async () => {
    const { library } = fixture();
    const r = await library.importText('{\n  "id": "x",\n  oops\n}', 'x.json');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0].message).toMatch(/line 3, column 3/);
  });

  it('importText of a valid file writes the entry and its revision 1 with the digest of the file', async () => {
    const { library, counts } = fixture();
    const text = JSON.stringify(demo);
    const r = await library.importText(text, 'demo-lake.model.json');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.entry).toMatchObject({ origin: 'import', modelId: 'demo_lake', head: 1, headDigest: digestOf(JSON.parse(text)) });
    expect(await counts()).toMatchObject({ entries: 1, revisions: 1, drafts: 0 });
    expect((await library.history(r.entry.key))[0].note).toBe('imported from demo-lake.model.json');
  });

  it('exportText gives the draft (else the newest revision) as 2-space JSON named <modelId>.model.json', async () => {
    const { library } = fixture();
    const e = await library.create(clone(oneBox), 'example');
    expect(await library.exportText(e.key)).toEqual({
      fileName: 'ambrel_one_box.model.json',
      text: JSON.stringify(oneBox, null, 2) + '\n'
    });
    const draft = { ...clone(oneBox), id: 'ambrel_draft' };
    await library.saveDraft(e.key, draft);
    const out = await library.exportText(e.key);
    expect(out.fileName).toBe('ambrel_draft.model.json');
    expect(JSON.parse(out.text)).toEqual(draft);
    expect(out.text.split('\n')[1]).toBe('  "format": "lakeledger.model/1",');
  });

  it('export then import gives an entry with the same digest', async () => {
    const { library } = fixture();
    const e = await library.create(clone(demo), 'example');
    const { fileName, text } = await library.exportText(e.key);
    const r = await library.importText(text, fileName);
    expect(r.ok && r.entry.headDigest).toBe(e.headDigest);
  });
});

describe('library: remove and undo', () => {
  it('remove deletes entry, draft and revisions; undo restores exactly what was deleted', async () => {
    const { library, db, counts } = fixture();
    const keep = await library.create(clone(npzd), 'example');
    const e = await library.create(clone(oneBox), 'example');
    await library.saveDraft(e.key, { ...clone(oneBox), description: 'v2' });
    await library.commit(e.key);
    await library.saveDraft(e.key, { ...clone(oneBox), description: 'unsaved', flows: 'not a list' });
    const snapshot = async () => ({
      entry: await db.entries.get(e.key),
      draft: await db.drafts.get(e.key),
      revisions: await db.revisions.where('entryKey').equals(e.key).toArray()
    });
    const before = await snapshot();
    expect(before.revisions).toHaveLength(2);
    expect(before.draft).toBeDefined();

    const { undo } = await library.remove(e.key);
    expect(await library.get(e.key)).toBeUndefined();
    expect(await counts()).toMatchObject({ entries: 1, revisions: 1, drafts: 0 });
    expect((await library.list()).map((x) => x.key)).toEqual([keep.key]);

    await undo();
    expect(await snapshot()).toEqual(before);
    expect(await counts()).toMatchObject({ entries: 2, revisions: 3, drafts: 1 });
    // A second undo changes nothing.
    await undo();
    expect(await counts()).toMatchObject({ entries: 2, revisions: 3, drafts: 1 });
  });

  it('remove of a key not in the library says so', async () => {
    const { library } = fixture();
    await expect(library.remove('gone')).rejects.toThrow(/no model 'gone'/);
  });
});

describe('library: seed', () => {
  it('seed(examples) adds the examples on first start, demo lake first, and never again', async () => {
    const { library, db, reload } = fixture();
    expect(await library.seed([...EXAMPLES])).toBe(true);
    const listed = await library.list();
    expect(listed.map((e) => e.modelId)).toEqual(['demo_lake', 'ambrel_one_box', 'tessel_mere_npzd']);
    expect(listed.every((e) => e.origin === 'example' && e.head === 1)).toBe(true);
    expect(await db.meta.get(SEEDED_FLAG)).toBeDefined();

    expect(await library.seed([...EXAMPLES])).toBe(false);
    expect(await library.list()).toHaveLength(3);

    // The user deletes them all; the next start (a reload) does not bring them back.
    for (const e of listed) await library.remove(e.key);
    expect(await reload().seed([...EXAMPLES])).toBe(false);
    expect(await reload().list()).toEqual([]);
  });

  it('seed(examples) leaves a library that already has models alone', async () => {
    const { library } = fixture();
    await library.create(clone(oneBox), 'import');
    expect(await library.seed([...EXAMPLES])).toBe(false);
    expect((await library.list()).map((e) => e.modelId)).toEqual(['ambrel_one_box']);
  });

  it('the shipped examples are valid models', () => {
    expect(EXAMPLES.map((d) => d.id)).toEqual(['demo_lake', 'ambrel_one_box', 'tessel_mere_npzd']);
    for (const d of EXAMPLES) expect(errorCodes(validateModel(d))).toEqual([]);
  });
});
