import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';
import { isAbortError, runInWorker, WorkerRunError, type WorkerLike } from './client';
import { PROTOCOL_VERSION, isToWorker, type FromWorker, type ToWorker } from './protocol';

const model = { format: 'lakeledger.model/1', id: 'tiny' } as unknown as ModelDoc;
const run = { format: 'lakeledger.run/1', id: 'r', status: 'ok' } as unknown as RunDoc;

/** A worker that records what it was sent and lets the test answer. */
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
  emit(type: string, event: Event) {
    for (const l of this.listeners.get(type) ?? []) l(event);
  }
  reply(data: FromWorker | unknown) {
    this.emit('message', new MessageEvent('message', { data }));
  }
  get requestId() {
    return this.sent[0].requestId;
  }
}

function start(options: { signal?: AbortSignal; onProgress?: (p: { fraction: number; day: number }) => void } = {}) {
  const worker = new FakeWorker();
  const promise = runInWorker(model, undefined, { ...options, createWorker: () => worker });
  return { worker, promise };
}

describe('runInWorker', () => {
  it('sends one well-formed run request and resolves with the result, then terminates', async () => {
    const progress: number[] = [];
    const { worker, promise } = start({ onProgress: (p) => progress.push(p.fraction) });
    expect(worker.sent).toHaveLength(1);
    expect(isToWorker(worker.sent[0])).toBe(true);
    expect(worker.sent[0].type).toBe('run');

    const id = worker.requestId;
    worker.reply({ v: PROTOCOL_VERSION, type: 'progress', requestId: id, fraction: 0.25, day: 10 });
    worker.reply({ v: PROTOCOL_VERSION, type: 'progress', requestId: 'stale', fraction: 0.9, day: 99 });
    worker.reply({ v: PROTOCOL_VERSION, type: 'result', requestId: id, run });

    await expect(promise).resolves.toBe(run);
    expect(progress).toEqual([0.25]);
    expect(worker.terminated).toBe(true);
  });

  it('rejects with an AbortError on abort, posts cancel and terminates the worker', async () => {
    const controller = new AbortController();
    const { worker, promise } = start({ signal: controller.signal });
    controller.abort();
    const err = await promise.catch((e: unknown) => e);
    expect(isAbortError(err)).toBe(true);
    expect(worker.sent.map((m) => m.type)).toEqual(['run', 'cancel']);
    expect(worker.sent[1].requestId).toBe(worker.requestId);
    expect(worker.terminated).toBe(true);
  });

  it('rejects at once, without a worker, when the signal is already aborted', async () => {
    let made = 0;
    const promise = runInWorker(model, undefined, {
      signal: AbortSignal.abort(),
      createWorker: () => {
        made += 1;
        return new FakeWorker();
      }
    });
    expect(isAbortError(await promise.catch((e: unknown) => e))).toBe(true);
    expect(made).toBe(0);
  });

  it('rejects with WorkerRunError carrying the code of an error message', async () => {
    const { worker, promise } = start();
    worker.reply({ v: PROTOCOL_VERSION, type: 'error', requestId: worker.requestId, code: 'engine_exception', message: 'boom' });
    const err = await promise.catch((e: unknown) => e);
    expect(err).toBeInstanceOf(WorkerRunError);
    expect([(err as WorkerRunError).code, (err as Error).message]).toEqual(['engine_exception', 'boom']);
    expect(worker.terminated).toBe(true);
  });

  it('rejects with worker_failed when the worker script fails', async () => {
    const { worker, promise } = start();
    worker.emit('error', new Event('error', { cancelable: true }));
    const err = await promise.catch((e: unknown) => e);
    expect((err as WorkerRunError).code).toBe('worker_failed');
  });

  it('rejects with bad_message when the worker answers outside the protocol', async () => {
    const { worker, promise } = start();
    worker.reply({ v: 2, type: 'result', requestId: worker.requestId, run });
    const err = await promise.catch((e: unknown) => e);
    expect((err as WorkerRunError).code).toBe('bad_message');
  });
});
