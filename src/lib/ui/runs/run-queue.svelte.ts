/**
 * The runs of this page session, as runes: each queued scenario run with its phase,
 * progress and outcome. The queue hands runs to the worker pool, stores every finished
 * (ok or failed) run with the revisions it used, and lets a run be cancelled or run again.
 * It lives as long as the page (not one screen), so runs go on while the user looks at
 * another screen. The runner and the store come in as arguments (fakes in tests).
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { RunProvenance, StoredRunSummary } from '$lib/storage/types';

export type JobPhase = 'waiting' | 'running' | 'finished' | 'failed' | 'cancelled';

/** One scenario run, planned from saved revisions. */
export interface RunPlan extends RunProvenance {
  model: ModelDoc;
  scenario: ScenarioDoc;
  /** The scenario's title, for lists. */
  title: string;
}

export interface QueueJob {
  id: string;
  plan: RunPlan;
  phase: JobPhase;
  /** Share of the period done, 0 to 1. */
  fraction: number;
  /** Day reached since the period's start. */
  day: number;
  /** Length of the period in days. */
  totalDays: number;
  /** The engine's message, or why the run could not start. */
  error: string | null;
  /** The stored run, once finished or failed. */
  runId: string | null;
  closure: RunDoc['closure'] | null;
}

export interface RunQueueDeps {
  run: (
    model: ModelDoc,
    scenario: ScenarioDoc,
    options: {
      signal: AbortSignal;
      onProgress: (p: { fraction: number; day: number }) => void;
      onStart: () => void;
      initial?: Record<string, number>;
    }
  ) => Promise<RunDoc>;
  save: (run: RunDoc, provenance: RunProvenance, title: string) => Promise<{ summary: StoredRunSummary; added: boolean }>;
  /** A stored run, for scenarios that start from one (spin-up). */
  load: (id: string) => Promise<RunDoc | undefined>;
}

function days(start: string, end: string): number {
  return Math.round((Date.parse(`${end}T00:00:00Z`) - Date.parse(`${start}T00:00:00Z`)) / 86400000);
}

/** The end state of a stored run, by state id: where a spin-up scenario starts. */
export function endState(model: ModelDoc, run: RunDoc): Record<string, number> {
  const out: Record<string, number> = {};
  for (const s of model.states) {
    const series = run.series[s.id];
    if (!series || series.length === 0) throw new Error(`run ${run.id} has no series for state '${s.id}' to start from`);
    out[s.id] = series[series.length - 1];
  }
  return out;
}

let counter = 0;

export class RunQueue {
  jobs = $state<QueueJob[]>([]);
  #deps: RunQueueDeps;
  #aborts = new Map<string, AbortController>();
  /** The plans as given: the jobs' copies are reactive proxies, which a worker cannot be sent. */
  #plans = new Map<string, RunPlan>();
  #listeners = new Set<(summary: StoredRunSummary) => void>();

  constructor(deps: RunQueueDeps) {
    this.#deps = deps;
  }

  /** Called with each stored run (so lists can refresh). Returns the unsubscribe. */
  onStored(listener: (summary: StoredRunSummary) => void): () => void {
    this.#listeners.add(listener);
    return () => this.#listeners.delete(listener);
  }

  /** Jobs of one model, newest first. */
  jobsOf(modelKey: string): QueueJob[] {
    return this.jobs.filter((j) => j.plan.modelKey === modelKey).reverse();
  }

  get busy(): boolean {
    return this.jobs.some((j) => j.phase === 'waiting' || j.phase === 'running');
  }

  /** Queues a run; returns the job's id. */
  enqueue(plan: RunPlan): string {
    counter += 1;
    const id = `job_${counter}`;
    this.#plans.set(id, plan);
    this.jobs.push({
      id,
      plan,
      phase: 'waiting',
      fraction: 0,
      day: 0,
      totalDays: days(plan.scenario.period.start, plan.scenario.period.end),
      error: null,
      runId: null,
      closure: null
    });
    void this.#start(id);
    return id;
  }

  cancel(jobId: string): void {
    this.#aborts.get(jobId)?.abort();
  }

  /** Runs a cancelled or failed job again (as the same job). */
  rerun(jobId: string): void {
    const job = this.#job(jobId);
    if (!job || job.phase === 'waiting' || job.phase === 'running') return;
    Object.assign(job, { phase: 'waiting', fraction: 0, day: 0, error: null, runId: null, closure: null });
    void this.#start(jobId);
  }

  /** Forgets finished, failed and cancelled jobs of a model (stored runs stay stored). */
  clearDone(modelKey: string): void {
    this.jobs = this.jobs.filter((j) => j.plan.modelKey !== modelKey || j.phase === 'waiting' || j.phase === 'running');
    for (const id of [...this.#plans.keys()]) if (!this.#job(id)) this.#plans.delete(id);
  }

  #job(id: string): QueueJob | undefined {
    return this.jobs.find((j) => j.id === id);
  }

  async #start(jobId: string): Promise<void> {
    const abort = new AbortController();
    this.#aborts.set(jobId, abort);
    const job = () => this.#job(jobId);
    const plan = this.#plans.get(jobId)!;
    try {
      let initial: Record<string, number> | undefined;
      const from = plan.scenario.initialState;
      if (from && from !== 'model') {
        const stored = await this.#deps.load(from);
        if (!stored) throw new Error(`the scenario starts from the end of run ${from}, which is not stored (it may have been deleted)`);
        if (stored.status !== 'ok') throw new Error(`the scenario starts from the end of run ${from}, which failed`);
        initial = endState(plan.model, stored);
      }
      if (abort.signal.aborted) throw abort.signal.reason;
      const run = await this.#deps.run(plan.model, plan.scenario, {
        signal: abort.signal,
        initial,
        onStart: () => {
          const j = job();
          if (j && this.#aborts.get(jobId) === abort) j.phase = 'running';
        },
        onProgress: ({ fraction, day }) => {
          const j = job();
          if (!j || this.#aborts.get(jobId) !== abort) return;
          j.fraction = fraction;
          j.day = day;
        }
      });
      if (this.#aborts.get(jobId) !== abort) return;
      const j = job();
      if (!j) return;
      if (run.status === 'cancelled') {
        j.phase = 'cancelled';
        return;
      }
      const { summary } = await this.#deps.save(run, plan, plan.title);
      j.runId = run.id;
      j.closure = run.closure;
      j.phase = run.status === 'ok' ? 'finished' : 'failed';
      if (run.status === 'ok') j.fraction = 1;
      else j.error = run.error?.message ?? `the run ended with status ${run.status}`;
      for (const l of this.#listeners) l(summary);
    } catch (err) {
      if (this.#aborts.get(jobId) !== abort) return;
      const j = job();
      if (!j) return;
      if (abort.signal.aborted) j.phase = 'cancelled';
      else {
        j.phase = 'failed';
        j.error = err instanceof Error ? err.message : String(err);
      }
    } finally {
      if (this.#aborts.get(jobId) === abort) this.#aborts.delete(jobId);
    }
  }
}
