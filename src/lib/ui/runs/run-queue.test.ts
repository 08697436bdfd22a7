import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import { RunQueue, endState, type RunPlan, type RunQueueDeps } from './run-queue.svelte';

const model = { format: 'lakeledger.model/1', id: 'lake', states: [{ id: 'A' }, { id: 'B' }] } as unknown as ModelDoc;
const scenario = (initialState?: string) =>
  ({ format: 'lakeledger.scenario/1', id: 's', model: 'lake', period: { start: '2027-01-01', end: '2028-01-01' }, ...(initialState ? { initialState } : {}) }) as ScenarioDoc;
const plan = (s = scenario()): RunPlan => ({ model, scenario: s, title: 'S', modelKey: 'm', modelRevision: 1, scenarioKey: 'k', scenarioRevision: 2 });
const runDoc = (id: string, status: RunDoc['status'] = 'ok') =>
  ({ id, status, error: status === 'failed' ? { message: 'rate of flow up is not finite' } : null, closure: { ok: true }, series: { A: [1, 2], B: [3, 4] } }) as unknown as RunDoc;

type Call = { scenario: ScenarioDoc; options: Parameters<RunQueueDeps['run']>[2]; resolve: (r: RunDoc) => void; reject: (e: unknown) => void };

function fakes() {
  const calls: Call[] = [];
  const saved: { id: string; revision: number }[] = [];
  const stored = new Map<string, RunDoc>();
  const deps: RunQueueDeps = {
    run: (_m, sc, options) =>
      new Promise<RunDoc>((resolve, reject) => {
        calls.push({ scenario: sc, options, resolve, reject });
        options.signal.addEventListener('abort', () => reject(new DOMException('x', 'AbortError')));
      }),
    save: async (run, prov) => {
      saved.push({ id: run.id, revision: prov.scenarioRevision });
      return { summary: { id: run.id } as never, added: true };
    },
    load: async (id) => stored.get(id)
  };
  return { calls, saved, stored, queue: new RunQueue(deps) };
}

const tick = () => new Promise((r) => setTimeout(r, 0));

describe('RunQueue', () => {
  it('a job waits, runs when a worker takes it, shows progress, and is stored when finished', async () => {
    const { calls, saved, queue } = fakes();
    const stored: string[] = [];
    queue.onStored((s) => stored.push(s.id));
    const id = queue.enqueue(plan());
    await tick();
    const job = () => queue.jobs.find((j) => j.id === id)!;
    expect(job().phase).toBe('waiting');
    expect(job().totalDays).toBe(365);
    calls[0].options.onStart();
    calls[0].options.onProgress({ fraction: 0.4, day: 146 });
    expect(job()).toMatchObject({ phase: 'running', fraction: 0.4, day: 146 });
    calls[0].resolve(runDoc('run_a'));
    await tick();
    expect(job()).toMatchObject({ phase: 'finished', fraction: 1, runId: 'run_a', error: null });
    expect(saved).toEqual([{ id: 'run_a', revision: 2 }]);
    expect(stored).toEqual(['run_a']);
  });

  it('the runner gets the plan\'s own documents (a reactive proxy cannot be sent to a worker)', async () => {
    const { calls, queue } = fakes();
    const p = plan();
    queue.enqueue(p);
    await tick();
    expect(calls[0].scenario).toBe(p.scenario);
    expect(() => structuredClone(calls[0].scenario)).not.toThrow();
  });

  it('a failed run is stored and marked failed with the engine\'s message', async () => {
    const { calls, saved, queue } = fakes();
    const id = queue.enqueue(plan());
    await tick();
    calls[0].resolve(runDoc('run_f', 'failed'));
    await tick();
    expect(queue.jobs.find((j) => j.id === id)).toMatchObject({ phase: 'failed', error: 'rate of flow up is not finite', runId: 'run_f' });
    expect(saved).toHaveLength(1);
  });

  it('cancel marks the job cancelled and stores nothing; rerun runs it again as the same job', async () => {
    const { calls, saved, queue } = fakes();
    const id = queue.enqueue(plan());
    await tick();
    queue.cancel(id);
    await tick();
    expect(queue.jobs[0].phase).toBe('cancelled');
    expect(saved).toHaveLength(0);
    queue.rerun(id);
    await tick();
    expect(queue.jobs).toHaveLength(1);
    expect(calls).toHaveLength(2);
    calls[1].resolve(runDoc('run_b'));
    await tick();
    expect(queue.jobs[0]).toMatchObject({ phase: 'finished', runId: 'run_b' });
  });

  it('a spin-up scenario starts from the stored run\'s end state; a missing run fails the job, naming it', async () => {
    const { calls, stored, queue } = fakes();
    stored.set('run_0123456789abcdef', runDoc('run_0123456789abcdef'));
    queue.enqueue(plan(scenario('run_0123456789abcdef')));
    await tick();
    expect(calls[0].options.initial).toEqual({ A: 2, B: 4 });
    const id = queue.enqueue(plan(scenario('run_ffffffffffffffff')));
    await tick();
    expect(calls).toHaveLength(1);
    expect(queue.jobs.find((j) => j.id === id)).toMatchObject({ phase: 'failed' });
    expect(queue.jobs.find((j) => j.id === id)!.error).toMatch(/run_ffffffffffffffff.*not stored/);
  });

  it('clearDone forgets finished jobs of one model and keeps running ones', async () => {
    const { calls, queue } = fakes();
    queue.enqueue(plan());
    queue.enqueue(plan());
    await tick();
    calls[0].resolve(runDoc('r1'));
    await tick();
    queue.clearDone('m');
    expect(queue.jobs.map((j) => j.phase)).toEqual(['waiting']);
    expect(queue.busy).toBe(true);
  });

  it('endState(model, run) takes the last value of every state and refuses a run without one', () => {
    expect(endState(model, runDoc('r'))).toEqual({ A: 2, B: 4 });
    expect(() => endState(model, { ...runDoc('r'), series: { A: [1] } } as unknown as RunDoc)).toThrow(/state 'B'/);
  });
});
