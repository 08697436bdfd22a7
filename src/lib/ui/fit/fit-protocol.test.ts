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
import type { CalibrateOptions, CalibrationResult } from '$lib/engine/fit/calibrate';
import type { RunDoc } from '$lib/engine/document/types';

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
    expect(isCalibrateMessage({ ...calibrateMsg, v: 1 })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, v: v + 1 })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, requestId: '' })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, settings: { ...calibrateMsg.settings, parameters: [{}] } })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, settings: { ...calibrateMsg.settings, maxIterations: 0 } })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, model: null })).toBe(false);
    expect(isCalibrateMessage({ ...calibrateMsg, cancelUrl: 'blob:x' })).toBe(true);
    expect(isCalibrateMessage({ ...calibrateMsg, cancelUrl: null })).toBe(true);
    expect(isCalibrateMessage({ ...calibrateMsg, cancelUrl: 3 })).toBe(false);
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

/** What the engine returns when its signal aborts: the best point, no run, the path up to the last whole iteration. */
const cancelledResult = (): CalibrationResult =>
  ({ status: 'cancelled', error: { code: 'cancelled', message: 'the fit was cancelled' }, parameters: { k: 2.5 }, initial: { k: 2 }, objective: { before: 1, after: 0.4 }, path: [1, 0.6], iterations: 2, evaluations: 7, converged: false, warnings: [], run: null }) as unknown as CalibrationResult;

/** A fake engine that computes until its signal aborts (or `limit` checks), then returns the cancelled result. */
function untilAborted(onCheck: (i: number) => void = () => {}, limit = 1000) {
  const seen: { checks: number; options?: CalibrateOptions } = { checks: 0 };
  const calibrate = (_m: unknown, _s: unknown, _o: unknown, options: CalibrateOptions) => {
    seen.options = options;
    for (let i = 0; i < limit; i++) {
      seen.checks++;
      onCheck(i);
      if (options.signal?.aborted) return cancelledResult();
    }
    return result;
  };
  return { seen, calibrate: calibrate as never };
}

describe('createFitHost(deps): cancel', () => {
  const fittedRun = { status: 'ok', series: { Chl: [1] } } as unknown as RunDoc;
  it('aborts the engine through its signal on a cancel message and posts the best point as a cancelled result with its run', () => {
    const posted: Record<string, unknown>[] = [];
    let host: (d: unknown) => void = () => {};
    const ran: Record<string, number>[] = [];
    const engine = untilAborted((i) => {
      if (i === 3) host({ v, type: 'cancel', requestId: 'r1' });
    });
    host = createFitHost({
      calibrate: engine.calibrate,
      simulate: (_m, _s, p) => (ran.push(p), fittedRun),
      post: (m) => posted.push(m as unknown as Record<string, unknown>)
    });
    host(calibrateMsg);
    expect(engine.seen.checks).toBe(4);
    expect(posted).toHaveLength(1);
    const r = posted[0] as unknown as { type: string; requestId: string; result: CalibrationResult };
    expect(r).toMatchObject({ type: 'result', requestId: 'r1' });
    expect(r.result.status).toBe('cancelled');
    expect(r.result.parameters).toEqual({ k: 2.5 });
    // the path ends at the best point kept, and the run there comes along
    expect(r.result.path).toEqual([1, 0.6, 0.4]);
    expect(ran).toEqual([{ k: 2.5 }]);
    expect(r.result.run).toBe(fittedRun);
  });
  it('ignores a cancel message for another request', () => {
    let host: (d: unknown) => void = () => {};
    const engine = untilAborted((i) => {
      if (i === 0) host({ v, type: 'cancel', requestId: 'other' });
    }, 5);
    const posted: unknown[] = [];
    host = createFitHost({ calibrate: engine.calibrate, post: (m) => posted.push(m) });
    host(calibrateMsg);
    expect(engine.seen.checks).toBe(5);
    expect((posted[0] as { result: CalibrationResult }).result).toBe(result);
  });
  it('reads the cancel token at most every CANCEL_POLL_MS and stops once it is gone', () => {
    let now = 0;
    let revoked = false;
    const reads: number[] = [];
    const engine = untilAborted((i) => {
      now += 50;
      if (i === 10) revoked = true;
    });
    const posted: unknown[] = [];
    const host = createFitHost({
      calibrate: engine.calibrate,
      clock: () => now,
      readToken: (url) => (reads.push(now), url === 'blob:t' && !revoked),
      post: (m) => posted.push(m)
    });
    host({ ...calibrateMsg, cancelUrl: 'blob:t' });
    // read once at the start, then every 200 ms of 50 ms checks: at 200, 400, then 600 finds it revoked
    expect(reads).toEqual([0, 200, 400, 600]);
    expect(engine.seen.checks).toBe(12);
    expect((posted[0] as { result: CalibrationResult }).result.status).toBe('cancelled');
  });
  it('never cancels through a token it cannot read at the start', () => {
    const engine = untilAborted(() => {}, 20);
    let now = 0;
    const host = createFitHost({ calibrate: engine.calibrate, clock: () => (now += 500), readToken: () => false, post: () => {} });
    host({ ...calibrateMsg, cancelUrl: 'blob:unreadable' });
    expect(engine.seen.checks).toBe(20);
  });
  it('keeps nothing to run when the fit was cancelled before any run finished', () => {
    const posted: { result: CalibrationResult }[] = [];
    const host = createFitHost({
      calibrate: () => ({ ...cancelledResult(), objective: { before: NaN, after: Infinity }, path: [] }),
      simulate: () => {
        throw new Error('not called');
      },
      post: (m) => posted.push(m as never)
    });
    host(calibrateMsg);
    expect(posted[0].result.status).toBe('cancelled');
    expect(posted[0].result.path).toEqual([]);
    expect(posted[0].result.run).toBeNull();
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
  it('on abort posts cancel, revokes the token and resolves with the cancelled result the worker sends', async () => {
    let answer: ((m: unknown) => void) | null = null;
    const w = fakeWorker((post, m) => {
      if ((m as { type: string }).type === 'calibrate') answer = post;
      else answer?.({ v, type: 'result', requestId: (m as { requestId: string }).requestId, result: cancelledResult() });
    });
    const token = { url: 'blob:t', revoked: 0, revoke() { this.revoked++; } };
    const c = new AbortController();
    const p = calibrateInWorker(args[0], args[1], args[2], args[3], { createWorker: () => w, createCancelToken: () => token, signal: c.signal });
    await Promise.resolve();
    c.abort();
    const r = await p;
    expect(r.status).toBe('cancelled');
    expect(w.sent.map((m) => (m as { type: string }).type)).toEqual(['calibrate', 'cancel']);
    expect((w.sent[0] as { cancelUrl: string }).cancelUrl).toBe('blob:t');
    expect(token.revoked).toBeGreaterThan(0);
    expect(w.terminated).toBe(true);
  });
  it('terminates a worker that does not answer a cancel in time and rejects with an AbortError', async () => {
    const w = fakeWorker(() => {});
    const c = new AbortController();
    const p = calibrateInWorker(args[0], args[1], args[2], args[3], { createWorker: () => w, signal: c.signal, graceMs: 20, createCancelToken: () => ({ url: null, revoke() {} }) });
    c.abort();
    expect(w.terminated).toBe(false);
    await expect(p).rejects.toMatchObject({ name: 'AbortError' });
    expect(w.terminated).toBe(true);
  });
  it('rejects with the input code of an error message', async () => {
    const w = fakeWorker((post, m) => post({ v, type: 'error', requestId: (m as { requestId: string }).requestId, code: 'input', inputCode: 'no_parameters', message: 'none' }));
    await expect(calibrateInWorker(args[0], args[1], args[2], args[3], { createWorker: () => w })).rejects.toMatchObject({ code: 'no_parameters' });
  });
});

describe('createFitHost(deps) with the engine', () => {
  it("cancels the engine's calibrate of the demo lake mid-way and posts its best point with the run there", async () => {
    const { readFileSync } = await import('node:fs');
    const { calibrate } = await import('$lib/engine/fit/calibrate');
    const { simulate } = await import('$lib/engine/simulate');
    const { parseObservations } = await import('$lib/engine/fit/observations');
    const { calibrationScenario } = await import('./fit-view');
    const model = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8'));
    const baseline = JSON.parse(readFileSync('static/examples/demo-lake.baseline.scenario.json', 'utf8'));
    const set = parseObservations(readFileSync('static/examples/demo-lake.observations.csv', 'utf8'), model);
    const scenario = calibrationScenario(baseline, set).scenario;
    const posted: Record<string, unknown>[] = [];
    let now = 0;
    let iterations = 0;
    const host = createFitHost({
      calibrate,
      simulate: (m, s, parameters) => simulate(m, s, { parameters, skipRunId: true }),
      clock: () => (now += 1000),
      // the token disappears once the first iteration has been reported
      readToken: () => iterations < 2,
      post: (m) => {
        if ((m as { type: string }).type === 'progress') iterations++;
        posted.push(m as unknown as Record<string, unknown>);
      }
    });
    host({ v, type: 'calibrate', requestId: 'e1', model, scenario, observations: set, settings: { parameters: [{ id: 'muPhy' }, { id: 'kDIP' }], variables: [{ id: 'Chl' }], maxIterations: 30 }, cancelUrl: 'blob:e1' });
    const last = posted[posted.length - 1] as unknown as { type: string; result: CalibrationResult };
    expect(last.type).toBe('result');
    const r = last.result;
    expect(r.status).toBe('cancelled');
    expect(r.iterations).toBeLessThan(30);
    expect(r.objective.after).toBeLessThanOrEqual(r.objective.before);
    expect(r.path[r.path.length - 1]).toBe(r.objective.after);
    for (const [id, x] of Object.entries(r.parameters)) {
      expect(x).toBeGreaterThanOrEqual(r.ranges[id].min);
      expect(x).toBeLessThanOrEqual(r.ranges[id].max);
    }
    expect(r.run?.status).toBe('ok');
    expect(r.run?.series.Chl.length).toBeGreaterThan(0);
  });
});
