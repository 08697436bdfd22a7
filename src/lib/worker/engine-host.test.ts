import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';
import { createEngineHost, type SimulateFn } from './engine-host';
import { PROTOCOL_VERSION, isFromWorker, type FromWorker } from './protocol';

const model = { format: 'lakeledger.model/1', id: 'tiny' } as unknown as ModelDoc;
const fakeRun = (status: RunDoc['status']) => ({ format: 'lakeledger.run/1', id: 'r', status }) as unknown as RunDoc;

function host(simulate: SimulateFn, clock: () => number = () => 0) {
  const sent: FromWorker[] = [];
  const handle = createEngineHost({ simulate, post: (m) => sent.push(m), now: clock, progressIntervalMs: 100 });
  return { handle, sent };
}

describe('createEngineHost', () => {
  it('answers a run with throttled progress and the result, all well-formed', () => {
    let clock = 0;
    const { handle, sent } = host((_m, _s, { onProgress }) => {
      for (let day = 0; day <= 100; day += 10) {
        clock = day * 5; // 50 ms of engine time per 10 days
        onProgress({ fraction: day / 100, day });
      }
      return fakeRun('ok');
    }, () => clock);

    handle({ v: PROTOCOL_VERSION, type: 'run', requestId: 'q1', model });

    expect(sent.every(isFromWorker)).toBe(true);
    expect(sent.map((m) => (m.type === 'progress' ? m.day : m.type))).toEqual([0, 20, 40, 60, 80, 100, 'result']);
    const last = sent.at(-1)!;
    expect(last.type === 'result' && last.requestId === 'q1' && last.run.status).toBe('ok');
  });

  it('gives the engine an AbortSignal that a cancel for the same id aborts', () => {
    let seen: AbortSignal | undefined;
    const { handle, sent } = host((_m, _s, { signal, onProgress }) => {
      seen = signal;
      // A cancel arriving while the run is on (as an engine that yields would allow).
      onProgress({ fraction: 0.5, day: 1 });
      handle({ v: PROTOCOL_VERSION, type: 'cancel', requestId: 'other' });
      expect(signal.aborted).toBe(false);
      handle({ v: PROTOCOL_VERSION, type: 'cancel', requestId: 'q2' });
      return fakeRun(signal.aborted ? 'cancelled' : 'ok');
    });

    handle({ v: PROTOCOL_VERSION, type: 'run', requestId: 'q2', model });

    expect(seen?.aborted).toBe(true);
    const last = sent.at(-1)!;
    expect(last.type === 'result' && last.run.status).toBe('cancelled');
  });

  it('turns an exception in the engine into an engine_exception error for that request', () => {
    const { handle, sent } = host(() => {
      throw new Error('boom');
    });
    handle({ v: PROTOCOL_VERSION, type: 'run', requestId: 'q3', model });
    expect(sent).toEqual([
      { v: PROTOCOL_VERSION, type: 'error', requestId: 'q3', code: 'engine_exception', message: 'boom' }
    ]);
  });

  it('refuses another protocol version with bad_message naming both versions', () => {
    const { handle, sent } = host(() => fakeRun('ok'));
    handle({ v: 2, type: 'run', requestId: 'q4', model });
    expect(sent).toHaveLength(1);
    const [m] = sent;
    expect(m.type === 'error' && [m.code, m.requestId]).toEqual(['bad_message', 'q4']);
    expect(m.type === 'error' && m.message).toMatch(/version 2 .*supported: 1/);
  });

  it('refuses a malformed message without an id with requestId null', () => {
    const { handle, sent } = host(() => fakeRun('ok'));
    handle('hello');
    expect(sent).toHaveLength(1);
    expect(sent[0].type === 'error' && [sent[0].code, sent[0].requestId]).toEqual(['bad_message', null]);
  });
});

describe('createEngineHost, long runs', () => {
  const settings = { target: 'Pin', from: 100, to: 300, steps: 3, indicator: 'Chl' };
  const cycle = { format: 'lakeledger.run/1', status: 'ok', units: { Chl: 'ug/L' }, series: { Chl: [1, 2], P: [3, 4] } } as unknown as RunDoc;

  it('answers a sweep with one progress message per long run and the document', () => {
    const sent: FromWorker[] = [];
    let signal: unknown;
    const handle = createEngineHost({
      simulate: () => fakeRun('ok'),
      post: (m) => sent.push(m),
      sweep: (_m, o) => {
        signal = o.settle?.signal;
        for (let k = 1; k <= 3; k++) o.onProgress?.({ done: k, total: 3 });
        return { format: 'lakeledger.sweep/1', target: o.target, values: [o.from, o.to] } as never;
      }
    });
    handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's1', model, settings });
    expect(sent.every(isFromWorker)).toBe(true);
    expect(sent.map((m) => (m.type === 'sweepProgress' ? m.done : m.type))).toEqual([1, 2, 3, 'sweepResult']);
    const last = sent.at(-1)!;
    expect(last.type === 'sweepResult' && 'sweep' in last && last.sweep.values).toEqual([100, 300]);
    expect(signal).toBeInstanceOf(AbortSignal);
  });

  it('turns an input error with a code into a sweepResult problem, and any other exception into engine_exception', () => {
    const sent: FromWorker[] = [];
    let fail: Error = Object.assign(new Error("no parameter or forcing 'X'"), { code: 'unknown_target' });
    const handle = createEngineHost({ simulate: () => fakeRun('ok'), post: (m) => sent.push(m), sweep: () => { throw fail; } });
    handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's2', model, settings });
    fail = new Error('boom');
    handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's3', model, settings });
    expect(sent).toEqual([
      { v: PROTOCOL_VERSION, type: 'sweepResult', requestId: 's2', problem: { code: 'unknown_target', message: "no parameter or forcing 'X'" } },
      { v: PROTOCOL_VERSION, type: 'error', requestId: 's3', code: 'engine_exception', message: 'boom' }
    ]);
  });

  it('answers a settle with the outcome and each series\' season mean; refuses long runs it has no engine for', () => {
    const sent: FromWorker[] = [];
    const handle = createEngineHost({
      simulate: () => fakeRun('ok'),
      post: (m) => sent.push(m),
      settle: (_m, o) => ({ outcome: 'settled', cycles: 7, lastChange: 1e-7, state: { P: o.parameters?.Pin ?? 0 }, cycle, message: 'settled after 7 cycles' }),
      cycleMean: (c, id) => c.series[id][1] * 10
    });
    handle({ v: PROTOCOL_VERSION, type: 'settle', requestId: 't1', model, parameters: { Pin: 90 } });
    expect(sent).toEqual([
      {
        v: PROTOCOL_VERSION,
        type: 'settleResult',
        requestId: 't1',
        result: { outcome: 'settled', cycles: 7, lastChange: 1e-7, state: { P: 90 }, message: 'settled after 7 cycles', seasonMeans: { Chl: 20, P: 40 }, units: { Chl: 'ug/L' } }
      }
    ]);
    const bare = host(() => fakeRun('ok'));
    bare.handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's4', model, settings });
    expect(bare.sent[0].type === 'error' && bare.sent[0].code).toBe('bad_message');
  });
});
