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
