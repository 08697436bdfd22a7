/**
 * Stored sweeps (src/lib/storage/sweeps.ts) under fake-indexeddb: a sweep comes back as it
 * was stored with its revision and settings, lists are per model and newest first, a
 * document of another format or model digest is refused, removal is complete, and a
 * model's removal takes its sweeps along while Undo brings them back.
 */
import { describe, expect, it } from 'vitest';
import { sweep, type SweepDoc } from '$lib/engine/longrun/sweep';
import type { ModelDoc } from '$lib/engine/document/types';
import type { SweepSettingsRecord } from '$lib/storage/types';
import { fixture } from './fixture';

// A one-state recycling lake: P fed by a load, lost in proportion, recycled in a steep sigmoid.
const lake = {
  format: 'lakeledger.model/1',
  id: 'recycling_lake',
  timeOrigin: '2027-01-01',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'l', value: 0.01, unit: 'mg/m^3/d' },
    { id: 's', value: 0.02, unit: '1/d' },
    { id: 'r', value: 0.02, unit: 'mg/m^3/d' },
    { id: 'm', value: 1, unit: 'mg/m^3' },
    { id: 'q', value: 8, unit: '1' }
  ],
  states: [{ id: 'P', unit: 'mg/m^3', initial: 0.1, size: 'V' }],
  flows: [
    { id: 'load', to: 'P', rate: 'l' },
    { id: 'loss', from: 'P', rate: 's * P' },
    { id: 'recycling', to: 'P', rate: 'r * hill(P, m, q)' }
  ]
} as unknown as ModelDoc;

const settings: SweepSettingsRecord = {
  startLowFrom: 'P = 0',
  startHighFrom: 'P = 3',
  refine: 2,
  indicatorLabel: 'P',
  indicatorUnit: 'mg/m^3',
  targetLabel: 'load',
  targetUnit: 'mg/m^3/d'
};

let cached: SweepDoc | null = null;
function smallSweep(): SweepDoc {
  cached ??= sweep(lake, { target: 'l', from: 0.004, to: 0.016, steps: 3, indicator: 'P', season: null, startLow: { P: 0 }, startHigh: { P: 3 }, refine: 2 });
  return cached;
}

describe('sweep store', () => {
  it('save then get(id) gives back the document, the revision and the settings', async () => {
    const { library } = fixture();
    const doc = smallSweep();
    const stored = await library.sweeps.save(doc, { modelKey: 'm1', modelRevision: 2, modelDigest: doc.modelDigest }, settings, 1234);
    expect(stored.id).toMatch(/^sweep_/);
    const back = await library.sweeps.get(stored.id);
    expect(back).toEqual(stored);
    expect(back!.doc).toEqual(doc);
    expect(back).toMatchObject({ modelKey: 'm1', modelRevision: 2, modelDigest: doc.modelDigest, settings, wallMs: 1234 });
  });

  it('list(modelKey) holds that model\'s sweeps only, newest first, and survives a reload', async () => {
    const f = fixture();
    const doc = smallSweep();
    const p = (modelKey: string) => ({ modelKey, modelRevision: 1, modelDigest: doc.modelDigest });
    const a = await f.library.sweeps.save(doc, p('m1'), settings, 1);
    await f.library.sweeps.save(doc, p('m2'), settings, 1);
    const c = await f.library.sweeps.save(doc, p('m1'), settings, 1);
    expect((await f.library.sweeps.list('m1')).map((s) => s.id)).toEqual([c.id, a.id]);
    expect((await f.reload().sweeps.list('m1')).map((s) => s.id)).toEqual([c.id, a.id]);
    expect(await f.library.sweeps.list('m3')).toEqual([]);
  });

  it('a sweep is archived like a run: logged with its digest, its deletion logged, a change found by Verify', async () => {
    const { library, db } = fixture();
    const doc = smallSweep();
    const stored = await library.sweeps.save(doc, { modelKey: 'm1', modelRevision: 1, modelDigest: doc.modelDigest }, settings, 1);
    expect(stored.digest).toMatch(/^sha256:[0-9a-f]{64}$/);
    const log = await library.log.list();
    expect(log.at(-1)).toMatchObject({ action: 'run', subject: { kind: 'sweep', id: stored.id, digest: stored.digest } });
    expect((await library.archive.verify()).findings).toEqual([]);
    await db.sweeps.put({ ...stored, doc: { ...stored.doc, switchPoints: [] } });
    expect((await library.archive.verify()).findings.map((f) => `${f.kind}:${f.code}:${f.id}`)).toEqual([`sweep:sweep_digest:${stored.id}`]);
    await library.sweeps.remove(stored.id);
    expect((await library.log.list()).at(-1)).toMatchObject({ action: 'delete', subject: { kind: 'sweep', id: stored.id } });
  });

  it('refuses a document of another format or another model digest, writing nothing', async () => {
    const { library, db } = fixture();
    const doc = smallSweep();
    await expect(library.sweeps.save({ ...doc, format: 'lakeledger.run/1' } as never, { modelKey: 'm1', modelRevision: 1, modelDigest: doc.modelDigest }, settings, 1)).rejects.toThrow(/not a sweep document/);
    await expect(library.sweeps.save(doc, { modelKey: 'm1', modelRevision: 1, modelDigest: 'sha256:other' }, settings, 1)).rejects.toThrow(/not on revision 1/);
    expect(await db.sweeps.count()).toBe(0);
  });

  it('remove(id) deletes the sweep', async () => {
    const { library, db } = fixture();
    const doc = smallSweep();
    const s = await library.sweeps.save(doc, { modelKey: 'm1', modelRevision: 1, modelDigest: doc.modelDigest }, settings, 1);
    await library.sweeps.remove(s.id);
    expect(await library.sweeps.get(s.id)).toBeUndefined();
    expect(await db.sweeps.count()).toBe(0);
  });

  it("a model's removal takes its sweeps along and Undo restores them", async () => {
    const { library, db } = fixture();
    const entry = await library.create(lake, 'import');
    const other = await library.create({ ...lake, id: 'other_lake' } as ModelDoc, 'import');
    const doc = smallSweep();
    const mine = await library.sweeps.save(doc, { modelKey: entry.key, modelRevision: 1, modelDigest: doc.modelDigest }, settings, 1);
    await library.sweeps.save(doc, { modelKey: other.key, modelRevision: 1, modelDigest: doc.modelDigest }, settings, 1);
    const { undo } = await library.remove(entry.key);
    expect(await library.sweeps.list(entry.key)).toEqual([]);
    expect(await db.sweeps.count()).toBe(1);
    await undo();
    expect(await library.sweeps.get(mine.id)).toEqual(mine);
  });
});
