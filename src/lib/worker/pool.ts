/**
 * A pool of engine workers: one per spare core (the page keeps one), made on first use and
 * kept between runs so a queue of runs does not pay a worker's start-up each time. Runs
 * wait in order for a free worker. Cancelling a waiting run takes it out of the queue;
 * cancelling a running one terminates its worker (the engine is synchronous, so a message
 * would be read only once the run is over) and a fresh worker takes its place when needed.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { SweepDoc } from '$lib/engine/longrun/sweep';
import { createEngineWorker, WorkerRunError, type WorkerLike } from './client';
import {
  PROTOCOL_VERSION,
  isErrorMessage,
  isFromWorker,
  isProgressMessage,
  isResultMessage,
  isSettleResultMessage,
  isSweepProgressMessage,
  isSweepResultMessage,
  isEnsembleMemberMessage,
  isEnsembleResultMessage,
  isMorrisResultMessage,
  isMorrisTrajectoryMessage,
  type MorrisRequest,
  type MorrisTrajectoryMessage,
  type EnsembleMemberMessage,
  type EnsembleRequest,
  type SettleRequest,
  type SettleSummary,
  type SweepSettings,
  type ToWorker
} from './protocol';

/** Workers for a machine with `cores` logical cores: all but one, at least one. */
export function poolSizeFor(cores: number | undefined): number {
  const n = Number.isFinite(cores) && (cores as number) > 0 ? Math.floor(cores as number) : 2;
  return Math.max(1, n - 1);
}

export interface PoolRunOptions {
  /** Aborting rejects with an `AbortError`, whether the run waits or runs. */
  signal?: AbortSignal;
  onProgress?: (progress: { fraction: number; day: number }) => void;
  /** Called when a worker takes the run up (it stops waiting). */
  onStart?: () => void;
  /** Start values by state id (spin-up). */
  initial?: Record<string, number>;
}

export interface PoolOptions {
  /** Number of workers. Default: poolSizeFor(navigator.hardwareConcurrency). */
  size?: number;
  /** Makes a worker. Default: the engine worker. */
  createWorker?: () => WorkerLike;
}

export interface PoolJobOptions {
  signal?: AbortSignal;
  onStart?: () => void;
}

export interface PoolSweepOptions extends PoolJobOptions {
  /** After each long run of the sweep: long runs done and in all. */
  onProgress?: (progress: { done: number; total: number }) => void;
}

/** What the settle request carries besides the model (see SettleRequest). */
export type PoolSettleSettings = Omit<SettleRequest, 'v' | 'type' | 'requestId' | 'model'>;

/** A sweep that stopped at its input (unknown target, bad range): the engine's code and words. */
export class SweepProblemError extends Error {
  readonly code: string;
  constructor(code: string, message: string) {
    super(message);
    this.name = 'SweepProblemError';
    this.code = code;
  }
}

/** What an ensemble request carries besides the model and scenarios (see EnsembleRequest). */
export type PoolEnsembleSettings = Pick<EnsembleRequest, 'n' | 'seed' | 'members' | 'gridDays'>;

export interface PoolEnsembleOptions extends PoolJobOptions {
  /** After each member: its runs under every scenario. Members that came before a cancel are kept by the caller. */
  onMember?: (member: Omit<EnsembleMemberMessage, 'v' | 'type' | 'requestId'>) => void;
}

/** An ensemble that stopped at its input (e.g. nothing to sample): the engine's code and words. */
export class EnsembleProblemError extends Error {
  readonly code: string;
  constructor(code: string, message: string) {
    super(message);
    this.name = 'EnsembleProblemError';
    this.code = code;
  }
}

/** What a morris request carries besides the model and scenario (see MorrisRequest). */
export type PoolMorrisSettings = Pick<MorrisRequest, 'indicator' | 'r' | 'p' | 'seed' | 'trajectories'>;

export interface PoolMorrisOptions extends PoolJobOptions {
  onTrajectory?: (t: Omit<MorrisTrajectoryMessage, 'v' | 'type' | 'requestId'>) => void;
}

interface Job {
  requestId: string;
  /** The message that starts the job on a worker. */
  message: ToWorker;
  options: PoolJobOptions;
  /** Takes a message of this job's worker; true when it settled the job. */
  take: (data: unknown) => boolean;
  resolve: (value: never) => void;
  reject: (err: unknown) => void;
  onAbort: () => void;
}

interface Slot {
  worker: WorkerLike;
  job: Job | null;
}

function abortError(signal?: AbortSignal): unknown {
  return signal?.reason ?? new DOMException('The run was cancelled.', 'AbortError');
}

let counter = 0;

export class WorkerPool {
  readonly size: number;
  #create: () => WorkerLike;
  #slots: (Slot | null)[];
  #queue: Job[] = [];
  #closed = false;

  constructor(options: PoolOptions = {}) {
    const cores = typeof navigator !== 'undefined' ? navigator.hardwareConcurrency : undefined;
    this.size = Math.max(1, Math.floor(options.size ?? poolSizeFor(cores)));
    this.#create = options.createWorker ?? createEngineWorker;
    this.#slots = Array.from({ length: this.size }, () => null);
  }

  /** Runs waiting for a worker. */
  get waiting(): number {
    return this.#queue.length;
  }

  /** Runs on a worker now. */
  get running(): number {
    return this.#slots.filter((s) => s?.job).length;
  }

  /** Queues a run; resolves with its run document (a bad model is a run with status failed). */
  run(model: ModelDoc, scenario: ScenarioDoc | undefined, options: PoolRunOptions = {}): Promise<RunDoc> {
    return this.#enqueue<RunDoc>(
      (requestId) => ({
        v: PROTOCOL_VERSION,
        type: 'run',
        requestId,
        model,
        scenario,
        ...(options.initial ? { initial: options.initial } : {})
      }),
      options,
      (data, resolve) => {
        if (isProgressMessage(data)) {
          options.onProgress?.({ fraction: data.fraction, day: data.day });
          return false;
        }
        if (isResultMessage(data)) return resolve(data.run), true;
        return false;
      }
    );
  }

  /** Queues a long-run state (`settle`); resolves with its outcome. */
  settle(model: ModelDoc, settings: PoolSettleSettings = {}, options: PoolJobOptions = {}): Promise<SettleSummary> {
    return this.#enqueue<SettleSummary>(
      (requestId) => ({ v: PROTOCOL_VERSION, type: 'settle', requestId, model, ...settings }),
      options,
      (data, resolve) => (isSettleResultMessage(data) ? (resolve(data.result), true) : false)
    );
  }

  /**
   * Queues a sweep; resolves with its `lakeledger.sweep/1` document, rejects with a
   * SweepProblemError when the engine refuses the settings.
   */
  sweep(model: ModelDoc, settings: SweepSettings, options: PoolSweepOptions = {}): Promise<SweepDoc> {
    return this.#enqueue<SweepDoc>(
      (requestId) => ({ v: PROTOCOL_VERSION, type: 'sweep', requestId, model, settings }),
      options,
      (data, resolve, reject) => {
        if (isSweepProgressMessage(data)) {
          options.onProgress?.({ done: data.done, total: data.total });
          return false;
        }
        if (!isSweepResultMessage(data)) return false;
        if ('sweep' in data) resolve(data.sweep);
        else reject(new SweepProblemError(data.problem.code, data.problem.message));
        return true;
      }
    );
  }

  /**
   * Queues one ensemble job (the members named in `settings.members`, every one under each
   * scenario); resolves with the count done and the sampled inputs, rejects with an
   * EnsembleProblemError when the engine refuses the input. A caller that wants several
   * workers queues several jobs with different members of one design.
   */
  ensemble(
    model: ModelDoc,
    scenarios: ScenarioDoc[],
    settings: PoolEnsembleSettings,
    options: PoolEnsembleOptions = {}
  ): Promise<{ done: number; asked: number; sampled: { parameters: string[]; states: string[] } }> {
    return this.#enqueue(
      (requestId) => ({ v: PROTOCOL_VERSION, type: 'ensemble', requestId, model, scenarios, ...settings }),
      options,
      (data, resolve, reject) => {
        if (isEnsembleMemberMessage(data)) {
          const { member, runs, columns, roles, gridDays } = data;
          options.onMember?.({ member, runs, columns, roles, gridDays });
          return false;
        }
        if (!isEnsembleResultMessage(data)) return false;
        if ('problem' in data) reject(new EnsembleProblemError(data.problem.code, data.problem.message));
        else resolve({ done: data.done, asked: data.asked, sampled: data.sampled });
        return true;
      }
    );
  }

  /**
   * Queues Morris trajectories of one design; resolves with the count done, Δ and the
   * inputs (in the order of each trajectory's effects), rejects with an EnsembleProblemError
   * when the engine refuses the input.
   */
  morris(
    model: ModelDoc,
    scenario: ScenarioDoc,
    settings: PoolMorrisSettings,
    options: PoolMorrisOptions = {}
  ): Promise<{ done: number; asked: number; delta: number; inputs: { kind: 'parameter' | 'state'; id: string }[] }> {
    return this.#enqueue(
      (requestId) => ({ v: PROTOCOL_VERSION, type: 'morris', requestId, model, scenario, ...settings }),
      options,
      (data, resolve, reject) => {
        if (isMorrisTrajectoryMessage(data)) {
          const { trajectory, effects, failed, evaluations } = data;
          options.onTrajectory?.({ trajectory, effects, failed, evaluations });
          return false;
        }
        if (!isMorrisResultMessage(data)) return false;
        if ('problem' in data) reject(new EnsembleProblemError(data.problem.code, data.problem.message));
        else resolve({ done: data.done, asked: data.asked, delta: data.delta, inputs: data.inputs });
        return true;
      }
    );
  }

  #enqueue<T>(
    message: (requestId: string) => ToWorker,
    options: PoolJobOptions,
    take: (data: { requestId: string }, resolve: (value: T) => void, reject: (err: unknown) => void) => boolean
  ): Promise<T> {
    if (this.#closed) return Promise.reject(new WorkerRunError('worker_failed', 'the engine workers were shut down'));
    if (options.signal?.aborted) return Promise.reject(abortError(options.signal));
    return new Promise<T>((resolve, reject) => {
      counter += 1;
      const requestId = `pool_${Date.now().toString(36)}_${counter}`;
      const job: Job = {
        requestId,
        message: message(requestId),
        options,
        take: (data) => take(data as { requestId: string }, resolve, reject),
        resolve: resolve as (value: never) => void,
        reject,
        onAbort: () => this.#abort(job)
      };
      options.signal?.addEventListener('abort', job.onAbort, { once: true });
      this.#queue.push(job);
      this.#dispatch();
    });
  }

  /** Terminates every worker and rejects what waits or runs. */
  close(): void {
    this.#closed = true;
    for (const job of this.#queue.splice(0)) this.#settle(job, () => job.reject(abortError(job.options.signal)));
    this.#slots.forEach((slot, i) => {
      if (!slot) return;
      slot.worker.terminate();
      if (slot.job) {
        const job = slot.job;
        this.#settle(job, () => job.reject(abortError(job.options.signal)));
      }
      this.#slots[i] = null;
    });
  }

  #settle(job: Job, done: () => void): void {
    job.options.signal?.removeEventListener('abort', job.onAbort);
    done();
  }

  #abort(job: Job): void {
    const queued = this.#queue.indexOf(job);
    if (queued >= 0) {
      this.#queue.splice(queued, 1);
      this.#settle(job, () => job.reject(abortError(job.options.signal)));
      return;
    }
    const i = this.#slots.findIndex((s) => s?.job === job);
    if (i < 0) return;
    const slot = this.#slots[i]!;
    // A courtesy to a worker that can still listen; terminate() is what stops it.
    slot.worker.postMessage({ v: PROTOCOL_VERSION, type: 'cancel', requestId: job.requestId });
    slot.worker.terminate();
    this.#slots[i] = null;
    this.#settle(job, () => job.reject(abortError(job.options.signal)));
    this.#dispatch();
  }

  /** The worker of slot `i` failed or spoke nonsense: its job fails, the worker is replaced. */
  #fail(slot: Slot, err: WorkerRunError): void {
    const i = this.#slots.indexOf(slot);
    slot.worker.terminate();
    if (i >= 0) this.#slots[i] = null;
    const job = slot.job;
    slot.job = null;
    if (job) this.#settle(job, () => job.reject(err));
    this.#dispatch();
  }

  #newSlot(): Slot {
    const slot: Slot = { worker: this.#create(), job: null };
    slot.worker.addEventListener('message', (event) => {
      const data: unknown = (event as MessageEvent).data;
      const job = slot.job;
      if (isErrorMessage(data)) {
        if (job && (data.requestId === job.requestId || data.requestId === null)) {
          slot.job = null;
          this.#settle(job, () => job.reject(new WorkerRunError(data.code, data.message)));
          this.#dispatch();
        }
      } else if (isFromWorker(data)) {
        if (!job || data.requestId !== job.requestId) return;
        // the job's own parser takes its progress, or its result and settles it
        if (job.take(data)) {
          job.options.signal?.removeEventListener('abort', job.onAbort);
          slot.job = null;
          this.#dispatch();
        }
      } else {
        this.#fail(slot, new WorkerRunError('bad_message', 'engine worker sent a message this page does not understand'));
      }
    });
    slot.worker.addEventListener('messageerror', () => {
      this.#fail(slot, new WorkerRunError('worker_failed', 'a message from the engine worker could not be read'));
    });
    slot.worker.addEventListener('error', (event) => {
      event.preventDefault();
      const detail = (event as ErrorEvent).message;
      this.#fail(slot, new WorkerRunError('worker_failed', `the engine worker failed${detail ? `: ${detail}` : ' to start'}`));
    });
    return slot;
  }

  #dispatch(): void {
    while (this.#queue.length) {
      let i = this.#slots.findIndex((s) => s !== null && s.job === null);
      if (i < 0) i = this.#slots.findIndex((s) => s === null);
      if (i < 0) return;
      const slot = this.#slots[i] ?? (this.#slots[i] = this.#newSlot());
      const job = this.#queue.shift()!;
      slot.job = job;
      job.options.onStart?.();
      slot.worker.postMessage(job.message);
    }
  }
}
