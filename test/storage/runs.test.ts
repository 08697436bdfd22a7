/**
 * Stored runs (src/lib/storage/runs.ts) under fake-indexeddb: a run comes back exactly as
 * it was stored (so its digest still holds), its series are kept as Float64Array columns
 * rather than JSON text, runs are immutable, lists hold no series, and removal is complete.
 */
import { describe, expect, it } from 'vitest';
import { runDigest, simulate } from '$lib/engine/simulate';
import type { RunDoc } from '$lib/engine/document/types';
import { EXAMPLES } from '$lib/storage/examples';
import { packRun, unpackRun } from '$lib/storage/runs';
import { fixture } from './fixture';

const oneBox = EXAMPLES[1];
const provenance = { modelKey: 'm1', modelRevision: 1, scenarioKey: 's1', scenarioRevision: 1 };

function shortRun(): RunDoc {
  return simulate(oneBox, {
    format: 'lakeledger.scenario/1',
    id: 'baseline',
    model: oneBox.id,
    period: { start: '2027-01-01', end: '2030-01-01', outputStep: 1 }
  });
}

describe('run store', () => {
  it('load(id) gives back the stored run, equal field by field, with the same digest', async () => {
    const { library } = fixture();
    const run = shortRun();
    expect(run.status).toBe('ok');
    const { added, summary } = await library.runs.save(run, provenance, 'Baseline');
    expect(added).toBe(true);
    expect(summary).toMatchObject({ id: run.id, points: run.times.length, scenarioTitle: 'Baseline', closure: run.closure });
    const back = await library.runs.load(run.id);
    expect(back).toEqual(run);
    expect(runDigest(back!)).toBe(runDigest(run));
  });

  it('series are stored as Float64Array columns, and the list row holds no series', async () => {
    const { library, db } = fixture();
    const run = shortRun();
    await library.runs.save(run, provenance, 'Baseline');
    const data = await db.runData.get(run.id);
    expect(data!.times).toBeInstanceOf(Float64Array);
    expect(data!.columns.every((c) => c instanceof Float64Array)).toBe(true);
    expect(data!.columns[0].length).toBe(run.times.length);
    const row = await db.runs.get(run.id);
    expect(row).not.toHaveProperty('series');
    expect(row).not.toHaveProperty('times');
    expect(row!.seriesIds).toEqual(Object.keys(run.series));
  });

  it('packRun/unpackRun keep -0, NaN and the largest doubles exactly', () => {
    const run = shortRun();
    const id = Object.keys(run.series)[0];
    run.series[id] = run.series[id].map((_, i) => [-0, Number.NaN, Number.MAX_VALUE, 5e-324, 0.1 + 0.2][i % 5]);
    const { row, data } = packRun(run, { ...provenance, id: run.id, model: run.model, scenario: run.scenario, scenarioTitle: 'x', modelDigest: run.modelDigest, scenarioDigest: run.scenarioDigest, engine: run.engine, status: run.status, error: run.error, start: run.start, startedAt: run.startedAt, wallMs: run.wallMs, closure: run.closure, solver: run.solver, warnings: run.warnings, storedAt: 'now' });
    const back = unpackRun(row, data);
    expect(Object.is(back.series[id][0], -0)).toBe(true);
    expect(Number.isNaN(back.series[id][1])).toBe(true);
    expect(back.series[id][2]).toBe(Number.MAX_VALUE);
    expect(back.series[id][3]).toBe(5e-324);
    expect(back.series[id][4]).toBe(0.1 + 0.2);
  });

  it('a run is immutable: saving the same id again stores nothing and keeps the first', async () => {
    const { library } = fixture();
    const run = shortRun();
    await library.runs.save(run, provenance, 'Baseline');
    const other = { ...structuredClone(run), wallMs: run.wallMs + 1000 };
    const second = await library.runs.save(other, { ...provenance, scenarioRevision: 9 }, 'Changed');
    expect(second.added).toBe(false);
    expect(second.summary.scenarioRevision).toBe(1);
    expect((await library.runs.load(run.id))!.wallMs).toBe(run.wallMs);
  });

  it('refuses a cancelled run and a run without an id, writing nothing', async () => {
    const { library, db } = fixture();
    const run = shortRun();
    await expect(library.runs.save({ ...run, status: 'cancelled' }, provenance, 'x')).rejects.toThrow(/cancelled/);
    await expect(library.runs.save({ ...run, id: '' }, provenance, 'x')).rejects.toThrow(/without an id/);
    expect(await db.runs.count()).toBe(0);
    expect(await db.runData.count()).toBe(0);
  });

  it('list(model) shows the newest first, only that model; remove deletes both rows', async () => {
    const { library, db } = fixture();
    const a = shortRun();
    const b = simulate(oneBox, { format: 'lakeledger.scenario/1', id: 'other', model: oneBox.id, period: { start: '2027-01-01', end: '2028-01-01' } });
    await library.runs.save(a, provenance, 'A');
    await library.runs.save(b, provenance, 'B');
    await library.runs.save(simulate(oneBox, { format: 'lakeledger.scenario/1', id: 'x', model: oneBox.id, period: { start: '2027-01-01', end: '2027-06-01' } }), { ...provenance, modelKey: 'm2' }, 'C');
    expect((await library.runs.list('m1')).map((r) => r.id)).toEqual([b.id, a.id]);
    await library.runs.remove(a.id);
    expect(await library.runs.load(a.id)).toBeUndefined();
    expect(await db.runData.get(a.id)).toBeUndefined();
    expect((await library.runs.list('m1')).map((r) => r.id)).toEqual([b.id]);
  });
});
