import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';
import { WorkerRunError, isAbortError, type WorkerLike } from './client';
import { EnsembleProblemError, SweepProblemError, WorkerPool, poolSizeFor } from './pool';
import { PROTOCOL_VERSION, isToWorker, type ToWorker } from './protocol';

const model = { format: 'lakeledger.model/1', id: 'tiny' } as unknown as ModelDoc;
const runDoc = (id: string) => ({ format: 'lakeledger.run/1', id, status: 'ok' }) as unknown as RunDoc;

class FakeWorker implements WorkerLike {
  sent: ToWorker[] = [];
  terminated = false;
  private listeners = new Map<string, Array<(e: Event) => void>>();
  postMessage(message: ToWorker) {
    this.sent.push(message);
  }
  terminate() {
    this.terminated = true;
  }
  addEventListener(type: string, listener: (e: Event) => void) {
    this.listeners.set(type, [...(this.listeners.get(type) ?? []), listener]);
  }
  reply(data: unknown) {
    for (const l of this.listeners.get('message') ?? []) l(new MessageEvent('message', { data }));
  }
  fail(message: string) {
    for (const l of this.listeners.get('error') ?? []) l(Object.assign(new Event('error', { cancelable: true }), { message }));
  }
  /** The request id of the last run it was sent. */
  get current() {
    return [...this.sent].reverse().find((m) => m.type === 'run')!.requestId;
  }
  finish(id: string) {
    this.reply({ v: PROTOCOL_VERSION, type: 'result', requestId: this.current, run: runDoc(id) });
  }
}

function pool(size: number) {
  const workers: FakeWorker[] = [];
  const p = new WorkerPool({
    size,
    createWorker: () => {
      const w = new FakeWorker();
      workers.push(w);
      return w;
    }
  });
  return { p, workers };
}

const flush = () => new Promise((r) => setTimeout(r, 0));

describe('poolSizeFor(cores)', () => {
  it.each([
    [1, 1],
    [2, 1],
    [4, 3],
    [16, 15],
    [undefined, 1],
    [0, 1],
    [Number.NaN, 1]
  ])('poolSizeFor(%s) is %s: all cores but the page\'s, at least one', (cores, size) => {
    expect(poolSizeFor(cores as number | undefined)).toBe(size);
  });
});

describe('WorkerPool', () => {
  it('runs at most `size` at once, in order, and reuses a worker for the next run', async () => {
    const { p, workers } = pool(2);
    const started: string[] = [];
    const runs = ['a', 'b', 'c'].map((n) => p.run(model, undefined, { onStart: () => started.push(n) }));
    expect(workers).toHaveLength(2);
    expect(started).toEqual(['a', 'b']);
    expect(p.running).toBe(2);
    expect(p.waiting).toBe(1);
    expect(workers.every((w) => w.sent.every(isToWorker))).toBe(true);
    workers[0].finish('A');
    expect(await runs[0]).toEqual(runDoc('A'));
    expect(started).toEqual(['a', 'b', 'c']);
    expect(workers).toHaveLength(2);
    expect(workers[0].sent.filter((m) => m.type === 'run')).toHaveLength(2);
    workers[1].finish('B');
    workers[0].finish('C');
    expect(await Promise.all(runs.slice(1))).toEqual([runDoc('B'), runDoc('C')]);
    expect(workers.some((w) => w.terminated)).toBe(false);
  });

  it('passes progress of its own run only, and the spin-up start values', async () => {
    const { p, workers } = pool(1);
    const seen: number[] = [];
    const r = p.run(model, undefined, { onProgress: (x) => seen.push(x.fraction), initial: { X: 3 } });
    const w = workers[0];
    expect((w.sent[0] as { initial?: unknown }).initial).toEqual({ X: 3 });
    w.reply({ v: PROTOCOL_VERSION, type: 'progress', requestId: 'other', fraction: 0.9, day: 1 });
    w.reply({ v: PROTOCOL_VERSION, type: 'progress', requestId: w.current, fraction: 0.5, day: 10 });
    w.finish('A');
    await r;
    expect(seen).toEqual([0.5]);
  });

  it('cancelling a waiting run takes it out of the queue; the others go on', async () => {
    const { p, workers } = pool(1);
    const a = p.run(model, undefined);
    const ctl = new AbortController();
    const b = p.run(model, undefined, { signal: ctl.signal });
    const c = p.run(model, undefined);
    ctl.abort();
    await expect(b).rejects.toSatisfy(isAbortError);
    expect(p.waiting).toBe(1);
    workers[0].finish('A');
    await a;
    workers[0].finish('C');
    expect(await c).toEqual(runDoc('C'));
    expect(workers).toHaveLength(1);
  });

  it('cancelling a running run terminates its worker; the next run gets a fresh one', async () => {
    const { p, workers } = pool(1);
    const ctl = new AbortController();
    const a = p.run(model, undefined, { signal: ctl.signal });
    const b = p.run(model, undefined);
    ctl.abort();
    await expect(a).rejects.toSatisfy(isAbortError);
    expect(workers[0].terminated).toBe(true);
    expect(workers[0].sent.some((m) => m.type === 'cancel')).toBe(true);
    expect(workers).toHaveLength(2);
    workers[1].finish('B');
    expect(await b).toEqual(runDoc('B'));
  });

  it('a worker that fails rejects its run with worker_failed and is replaced for the next', async () => {
    const { p, workers } = pool(1);
    const a = p.run(model, undefined);
    const b = p.run(model, undefined);
    workers[0].fail('out of memory');
    await expect(a).rejects.toThrow(WorkerRunError);
    await expect(a).rejects.toThrow(/out of memory/);
    await flush();
    expect(workers).toHaveLength(2);
    workers[1].finish('B');
    expect(await b).toEqual(runDoc('B'));
  });

  it('an engine error message rejects with its code; close() rejects what waits and runs', async () => {
    const { p, workers } = pool(1);
    const a = p.run(model, undefined);
    const b = p.run(model, undefined);
    workers[0].reply({ v: PROTOCOL_VERSION, type: 'error', requestId: workers[0].current, code: 'engine_exception', message: 'boom' });
    await expect(a).rejects.toMatchObject({ code: 'engine_exception' });
    p.close();
    await expect(b).rejects.toSatisfy(isAbortError);
    await expect(p.run(model, undefined)).rejects.toThrow(/shut down/);
    expect(workers[0].terminated).toBe(true);
  });
});

describe('WorkerPool long runs', () => {
  const settings = { target: 'Pin', from: 100, to: 300, steps: 3, indicator: 'Chl' };
  const sweepDoc = { format: 'lakeledger.sweep/1', values: [100, 200, 300], low: [1, 2, 3], high: [1, 9, 9] };
  const lastId = (w: FakeWorker) => [...w.sent].reverse().find((m) => m.type !== 'cancel')!.requestId;

  it('sweep(model, settings) sends one sweep request, passes its own progress, resolves with the document', async () => {
    const { p, workers } = pool(1);
    const seen: string[] = [];
    const s = p.sweep(model, settings, { onProgress: ({ done, total }) => seen.push(`${done}/${total}`) });
    const w = workers[0];
    expect(w.sent).toHaveLength(1);
    expect(w.sent[0]).toMatchObject({ v: PROTOCOL_VERSION, type: 'sweep', settings });
    expect(isToWorker(w.sent[0])).toBe(true);
    const id = lastId(w);
    w.reply({ v: PROTOCOL_VERSION, type: 'sweepProgress', requestId: 'other', done: 5, total: 8 });
    w.reply({ v: PROTOCOL_VERSION, type: 'sweepProgress', requestId: id, done: 1, total: 8 });
    // a run's result for the sweep's id does not settle a sweep
    w.reply({ v: PROTOCOL_VERSION, type: 'result', requestId: id, run: runDoc('X') });
    w.reply({ v: PROTOCOL_VERSION, type: 'sweepProgress', requestId: id, done: 2, total: 8 });
    w.reply({ v: PROTOCOL_VERSION, type: 'sweepResult', requestId: id, sweep: sweepDoc });
    expect(await s).toEqual(sweepDoc);
    expect(seen).toEqual(['1/8', '2/8']);
    expect(p.running).toBe(0);
  });

  it('a refused sweep rejects with SweepProblemError and its code; the worker takes the next job', async () => {
    const { p, workers } = pool(1);
    const s = p.sweep(model, settings);
    const r = p.run(model, undefined);
    workers[0].reply({ v: PROTOCOL_VERSION, type: 'sweepResult', requestId: lastId(workers[0]), problem: { code: 'unknown_target', message: "no parameter or forcing 'Pin'" } });
    await expect(s).rejects.toBeInstanceOf(SweepProblemError);
    await expect(s).rejects.toMatchObject({ code: 'unknown_target' });
    expect(workers[0].sent.at(-1)!.type).toBe('run');
    workers[0].finish('R');
    expect(await r).toEqual(runDoc('R'));
  });

  it('cancelling a running sweep terminates its worker and rejects with an AbortError', async () => {
    const { p, workers } = pool(1);
    const ctl = new AbortController();
    const s = p.sweep(model, settings, { signal: ctl.signal });
    ctl.abort();
    await expect(s).rejects.toSatisfy(isAbortError);
    expect(workers[0].terminated).toBe(true);
    expect(workers[0].sent.map((m) => m.type)).toEqual(['sweep', 'cancel']);
  });

  it('settle(model, settings) sends the overrides and resolves with the summary', async () => {
    const { p, workers } = pool(1);
    const summary = { outcome: 'settled', cycles: 12, lastChange: 1e-7, state: { P: 1 }, message: 'settled', seasonMeans: { Chl: 20 }, units: {} };
    const s = p.settle(model, { parameters: { Pin: 90 }, maxCycles: 50 });
    expect(workers[0].sent[0]).toMatchObject({ type: 'settle', parameters: { Pin: 90 }, maxCycles: 50 });
    workers[0].reply({ v: PROTOCOL_VERSION, type: 'settleResult', requestId: lastId(workers[0]), result: summary });
    expect(await s).toEqual(summary);
  });
});

describe('WorkerPool ensembles', () => {
  const scenario = { format: 'lakeledger.scenario/1', id: 'base' } as never;
  const memberRun = { status: 'ok', closed: true, relativeResidual: 0, code: null, message: null, values: { 'chlorophyll.last': 3 }, series: { chlorophyll: [1] } };
  const lastId = (w: FakeWorker) => [...w.sent].reverse().find((m) => m.type !== 'cancel')!.requestId;
  const memberMsg = (requestId: string, member: number) => ({ v: PROTOCOL_VERSION, type: 'ensembleMember', requestId, member, runs: [memberRun], columns: [], roles: {}, gridDays: 10 });

  it('two jobs of one design go to two workers; each passes its own members and resolves with its count', async () => {
    const { p, workers } = pool(2);
    const got: number[] = [];
    const onMember = (m: { member: number }) => got.push(m.member);
    const a = p.ensemble(model, [scenario], { n: 4, seed: 1, members: [0, 2] }, { onMember });
    const b = p.ensemble(model, [scenario], { n: 4, seed: 1, members: [1, 3] }, { onMember });
    expect(workers).toHaveLength(2);
    expect(workers.map((w) => (w.sent[0] as { members: number[] }).members)).toEqual([[0, 2], [1, 3]]);
    expect(workers.every((w) => isToWorker(w.sent[0]))).toBe(true);
    const [ia, ib] = workers.map(lastId);
    workers[0].reply(memberMsg(ia, 0));
    workers[1].reply(memberMsg(ib, 1));
    workers[1].reply(memberMsg(ia, 2)); // another job's id on this worker: ignored
    workers[0].reply(memberMsg(ia, 2));
    workers[0].reply({ v: PROTOCOL_VERSION, type: 'ensembleResult', requestId: ia, done: 2, asked: 2, sampled: { parameters: ['k'], states: [] } });
    expect(await a).toEqual({ done: 2, asked: 2, sampled: { parameters: ['k'], states: [] } });
    expect(got).toEqual([0, 1, 2]);
    expect(p.running).toBe(1);
    workers[1].reply({ v: PROTOCOL_VERSION, type: 'ensembleResult', requestId: ib, problem: { code: 'nothing_to_sample', message: 'no ranges' } });
    await expect(b).rejects.toBeInstanceOf(EnsembleProblemError);
    await expect(b).rejects.toMatchObject({ code: 'nothing_to_sample' });
  });

  it('cancelling an ensemble terminates its worker; the members before it were passed on', async () => {
    const { p, workers } = pool(1);
    const ctl = new AbortController();
    const got: number[] = [];
    const e = p.ensemble(model, [scenario], { n: 3, seed: 0, members: [0, 1, 2] }, { signal: ctl.signal, onMember: (m) => got.push(m.member) });
    workers[0].reply(memberMsg(lastId(workers[0]), 0));
    ctl.abort();
    await expect(e).rejects.toSatisfy(isAbortError);
    expect(got).toEqual([0]);
    expect(workers[0].terminated).toBe(true);
    expect(workers[0].sent.map((m) => m.type)).toEqual(['ensemble', 'cancel']);
  });
});

describe('WorkerPool Morris screening', () => {
  it('morris() sends the design and its trajectories, passes each trajectory on, resolves with the inputs', async () => {
    const { p, workers } = pool(1);
    const got: number[] = [];
    const m = p.morris(model, { id: 's' } as never, { indicator: 'chlorophyll.last', r: 4, p: 4, seed: 3, trajectories: [1, 3] }, { onTrajectory: (t) => got.push(t.trajectory) });
    const w = workers[0];
    expect(w.sent[0]).toMatchObject({ type: 'morris', r: 4, p: 4, seed: 3, trajectories: [1, 3] });
    expect(isToWorker(w.sent[0])).toBe(true);
    const id = w.sent[0].requestId;
    w.reply({ v: PROTOCOL_VERSION, type: 'morrisTrajectory', requestId: id, trajectory: 1, effects: [2, null], failed: 1, evaluations: 3 });
    w.reply({ v: PROTOCOL_VERSION, type: 'morrisResult', requestId: id, done: 1, asked: 2, delta: 2 / 3, inputs: [{ kind: 'parameter', id: 'a' }, { kind: 'state', id: 'S' }] });
    expect(await m).toEqual({ done: 1, asked: 2, delta: 2 / 3, inputs: [{ kind: 'parameter', id: 'a' }, { kind: 'state', id: 'S' }] });
    expect(got).toEqual([1]);
  });
});
