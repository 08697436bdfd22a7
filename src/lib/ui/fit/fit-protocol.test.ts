import { describe, expect, it } from 'vitest';
import {
  FIT_PROTOCOL_VERSION as v,
  isCalibrateMessage,
  isCancelFitMessage,
  isFitErrorMessage,
  isFitProgressMessage,
  isFitResultMessage
} from './fit-protocol';
import { createFitHost } from './fit-host';
import { calibrateInWorker, type FitWorkerLike } from './fit-client';
import { FitInputError } from '$lib/engine/fit/errors';
import type { CalibrationResult } from '$lib/engine/fit/calibrate';

const calibrateMsg = {
  v,
  type: 'calibrate',
  requestId: 'r1',
  model: {},
  scenario: {},
  observations: {},
  settings: { parameters: [{ id: 'k' }], variables: [{ id: 'Chl', weight: 1 }], maxIterations: 3 }
};
const result = { status: 'ok', path: [1, 0.5], parameters: { k: 2 } } as unknown as CalibrationResult;

describe('fit protocol guards', () => {
  it('isCalibrateMessage(x) takes a whole request and refuses another version or a bad setting', () => {
    expect(isCalibrateMessage(calibrateMsg)).toBe(true);
    expect(isCalibrateMessage({ ...calibrateMsg, v: 2 })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, requestId: '' })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, settings: { ...calibrateMsg.settings, parameters: [{}] } })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, settings: { ...calibrateMsg.settings, maxIterations: 0 } })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, model: null })).toBe(false);
  });
  it('tells the other messages apart by type and shape', () => {
    expect(isCancelFitMessage({ v, type: 'cancel', requestId: 'r1' })).toBe(true);
    expect(isCancelFitMessage({ v, type: 'cancel' })).toBe(false);
    expect(isFitProgressMessage({ v, type: 'progress', requestId: 'r1', iteration: 1, evaluations: 3, objective: 0.5 })).toBe(true);
    expect(isFitProgressMessage({ v, type: 'progress', requestId: 'r1', iteration: 1, evaluations: 3 })).toBe(false);
    expect(isFitResultMessage({ v, type: 'result', requestId: 'r1', result })).toBe(true);
    expect(isFitResultMessage({ v, type: 'result', requestId: 'r1', result: {} })).toBe(false);
    expect(isFitErrorMessage({ v, type: 'error', requestId: null, code: 'failed', message: 'x' })).toBe(true);
    expect(isFitErrorMessage({ v, type: 'error', requestId: null, code: 'other', message: 'x' })).toBe(false);
  });
});

describe('createFitHost(deps)', () => {
  it('posts progress, then the result, for a calibrate message', () => {
    const posted: unknown[] = [];
    const host = createFitHost({
      calibrate: (_m, _s, _o, options) => {
        options.onProgress?.({ iteration: 0, evaluations: 2, objective: 1 });
        expect(options.maxIterations).toBe(3);
        return result;
      },
      post: (m) => posted.push(m)
    });
    host(calibrateMsg);
    expect(posted.map((m) => (m as { type: string }).type)).toEqual(['progress', 'result']);
    expect(isFitProgressMessage(posted[0]) && isFitResultMessage(posted[1])).toBe(true);
  });
  it('answers an input error with its code, and an unreadable message with invalid_request', () => {
    const posted: Record<string, unknown>[] = [];
    const host = createFitHost({
      calibrate: () => {
        throw new FitInputError('parameter_without_range', 'no range');
      },
      post: (m) => posted.push(m as unknown as Record<string, unknown>)
    });
    host(calibrateMsg);
    host({ v: 99, type: 'calibrate', requestId: 'r2' });
    expect(posted[0]).toMatchObject({ type: 'error', requestId: 'r1', code: 'input', inputCode: 'parameter_without_range' });
    expect(posted[1]).toMatchObject({ type: 'error', requestId: 'r2', code: 'invalid_request' });
  });
});

/** A worker that answers through a host in the same thread. */
function fakeWorker(answer: (post: (m: unknown) => void, msg: unknown) => void) {
  const listeners: ((e: Event) => void)[] = [];
  const w: FitWorkerLike & { terminated: boolean; sent: unknown[] } = {
    terminated: false,
    sent: [],
    postMessage(m) {
      this.sent.push(m);
      queueMicrotask(() => answer((data) => listeners.forEach((l) => l({ data } as unknown as Event)), m));
    },
    terminate() {
      this.terminated = true;
    },
    addEventListener(type, l) {
      if (type === 'message') listeners.push(l);
    }
  };
  return w;
}

describe('calibrateInWorker(...)', () => {
  const args = [{}, {}, {}, { parameters: [{ id: 'k' }], variables: [{ id: 'Chl' }] }] as unknown as Parameters<typeof calibrateInWorker>;
  it('resolves with the result, reports progress and terminates the worker', async () => {
    const w = fakeWorker((post, m) => {
      const id = (m as { requestId: string }).requestId;
      post({ v, type: 'progress', requestId: id, iteration: 1, evaluations: 4, objective: 0.7 });
      post({ v, type: 'result', requestId: id, result });
    });
    const seen: number[] = [];
    const r = await calibrateInWorker(args[0], args[1], args[2], args[3], { createWorker: () => w, onProgress: (p) => seen.push(p.objective) });
    expect(r).toBe(result);
    expect(seen).toEqual([0.7]);
    expect(w.terminated).toBe(true);
  });
  it('rejects with an AbortError and terminates the worker when aborted', async () => {
    const w = fakeWorker(() => {});
    const c = new AbortController();
    const p = calibrateInWorker(args[0], args[1], args[2], args[3], { createWorker: () => w, signal: c.signal });
    c.abort();
    await expect(p).rejects.toMatchObject({ name: 'AbortError' });
    expect(w.terminated).toBe(true);
  });
  it('rejects with the input code of an error message', async () => {
    const w = fakeWorker((post, m) => post({ v, type: 'error', requestId: (m as { requestId: string }).requestId, code: 'input', inputCode: 'no_parameters', message: 'none' }));
    await expect(calibrateInWorker(args[0], args[1], args[2], args[3], { createWorker: () => w })).rejects.toMatchObject({ code: 'no_parameters' });
  });
});
