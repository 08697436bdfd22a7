import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';
import { RunController, type Runner } from './run-controller.svelte';

const model = { format: 'lakeledger.model/1', id: 'tiny' } as unknown as ModelDoc;
const runOf = (status: RunDoc['status'], error: RunDoc['error'] = null) =>
  ({ format: 'lakeledger.run/1', id: 'r', status, error }) as unknown as RunDoc;

/** A runner the test settles by hand. */
function manualRunner() {
  const calls: Array<{
    signal: AbortSignal;
    progress: (p: { fraction: number; day: number }) => void;
    resolve: (r: RunDoc) => void;
    reject: (e: unknown) => void;
  }> = [];
  const runner: Runner = (_m, _s, { signal, onProgress }) =>
    new Promise<RunDoc>((resolve, reject) => {
      calls.push({ signal, progress: onProgress, resolve, reject });
      signal.addEventListener('abort', () => reject(new DOMException('cancelled', 'AbortError')));
    });
  return { runner, calls };
}

describe('RunController', () => {
  it('goes running → finished with progress and the run', async () => {
    const { runner, calls } = manualRunner();
    const c = new RunController(runner);
    expect(c.phase).toBe('idle');
    const done = c.start(model);
    expect(c.phase).toBe('running');
    calls[0].progress({ fraction: 0.4, day: 2922 });
    expect([c.fraction, c.day]).toEqual([0.4, 2922]);
    const run = runOf('ok');
    calls[0].resolve(run);
    await done;
    expect([c.phase, c.run, c.error, c.fraction]).toEqual(['finished', run, null, 1]);
  });

  it('shows a failed run with its error message', async () => {
    const { runner, calls } = manualRunner();
    const c = new RunController(runner);
    const done = c.start(model);
    calls[0].resolve(runOf('failed', { code: 'solver_max_steps', message: 'odex ran out of steps at day 135' }));
    await done;
    expect([c.phase, c.error]).toEqual(['failed', 'odex ran out of steps at day 135']);
  });

  it('shows a worker failure as failed with its message', async () => {
    const { runner, calls } = manualRunner();
    const c = new RunController(runner);
    const done = c.start(model);
    calls[0].reject(new Error('the engine worker failed to start'));
    await done;
    expect([c.phase, c.error, c.run]).toEqual(['failed', 'the engine worker failed to start', null]);
  });

  it('cancel() aborts the runner and ends cancelled', async () => {
    const { runner, calls } = manualRunner();
    const c = new RunController(runner);
    const done = c.start(model);
    c.cancel();
    await done;
    expect(calls[0].signal.aborted).toBe(true);
    expect([c.phase, c.error]).toEqual(['cancelled', null]);
  });

  it('a second start cancels the first, whose late progress and result are ignored', async () => {
    const { runner, calls } = manualRunner();
    const c = new RunController(runner);
    const first = c.start(model);
    const second = c.start(model);
    await first;
    expect(calls[0].signal.aborted).toBe(true);
    expect(c.phase).toBe('running');
    calls[0].progress({ fraction: 0.9, day: 1 });
    expect(c.fraction).toBe(0);
    const run = runOf('ok');
    calls[1].resolve(run);
    await second;
    expect([c.phase, c.run]).toEqual(['finished', run]);
  });
});
