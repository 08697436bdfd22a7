/**
 * What the engine worker does with each message, apart from the worker global so it can
 * be tested in Node: the engine, the way out and the clock come in as arguments.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { SettleOptions, SettleResult } from '$lib/engine/longrun/settle';
import type { SweepDoc, SweepOptions } from '$lib/engine/longrun/sweep';
import {
  PROTOCOL_VERSION,
  isCancelRequest,
  isRunRequest,
  isSettleRequest,
  isSweepRequest,
  requestIdOf,
  type FromWorker,
  type RunRequest,
  type SettleRequest,
  type SettleSummary,
  type SweepRequest
} from './protocol';
import { createProgressThrottle } from './progress-throttle';

/** The part of the engine's `simulate` the worker uses. */
export type SimulateFn = (
  model: ModelDoc,
  scenario: ScenarioDoc | undefined,
  options: {
    signal: AbortSignal;
    onProgress: (p: { fraction: number; day: number }) => void;
    initial?: Record<string, number>;
  }
) => RunDoc;

/** The engine's `settle`, and the mean of a series over a settled cycle's growing season. */
export type SettleFn = (model: ModelDoc, options: SettleOptions) => SettleResult;
export type CycleMeanFn = (cycle: RunDoc, id: string) => number;
/** The engine's `sweep`; it throws an error with a `code` for bad input (SweepInputError). */
export type SweepFn = (model: ModelDoc, options: SweepOptions) => SweepDoc;

export interface EngineHostOptions {
  simulate: SimulateFn;
  /** Needed for `settle` requests; without it they are refused as bad messages. */
  settle?: SettleFn;
  cycleMean?: CycleMeanFn;
  /** Needed for `sweep` requests. */
  sweep?: SweepFn;
  post: (message: FromWorker) => void;
  /** Clock for progress throttling, milliseconds. Default `performance.now`. */
  now?: () => number;
  /** Least time between two progress messages, milliseconds. Default 100. */
  progressIntervalMs?: number;
}

/** Returns the handler for each message the worker receives. */
export function createEngineHost(options: EngineHostOptions): (data: unknown) => void {
  const { simulate, post } = options;
  const running = new Map<string, AbortController>();

  function run(request: RunRequest): void {
    const { requestId } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    const shouldSend = createProgressThrottle({
      minIntervalMs: options.progressIntervalMs,
      now: options.now
    });
    try {
      const result = simulate(request.model, request.scenario, {
        signal: controller.signal,
        ...(request.initial ? { initial: request.initial } : {}),
        onProgress: ({ fraction, day }) => {
          if (shouldSend(fraction)) {
            post({ v: PROTOCOL_VERSION, type: 'progress', requestId, fraction, day });
          }
        }
      });
      post({ v: PROTOCOL_VERSION, type: 'result', requestId, run: result });
    } catch (err) {
      // The engine reports bad models as failed runs; an exception here is a bug in it.
      post({
        v: PROTOCOL_VERSION,
        type: 'error',
        requestId,
        code: 'engine_exception',
        message: err instanceof Error ? err.message : String(err)
      });
    } finally {
      running.delete(requestId);
    }
  }

  function exception(requestId: string, err: unknown): void {
    post({
      v: PROTOCOL_VERSION,
      type: 'error',
      requestId,
      code: 'engine_exception',
      message: err instanceof Error ? err.message : String(err)
    });
  }

  function settleOne(request: SettleRequest, settleFn: SettleFn): void {
    const { requestId } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    try {
      const r = settleFn(request.model, {
        signal: controller.signal,
        ...(request.parameters ? { parameters: request.parameters } : {}),
        ...(request.initial ? { initial: request.initial } : {}),
        ...(request.forcingScale ? { forcingScale: request.forcingScale } : {}),
        ...(request.maxCycles ? { maxCycles: request.maxCycles } : {})
      });
      const seasonMeans: Record<string, number> = {};
      if (r.outcome === 'settled' && r.cycle && options.cycleMean) {
        for (const id of Object.keys(r.cycle.series)) {
          const m = options.cycleMean(r.cycle, id);
          if (Number.isFinite(m)) seasonMeans[id] = m;
        }
      }
      const result: SettleSummary = {
        outcome: r.outcome,
        cycles: r.cycles,
        lastChange: r.lastChange,
        state: r.state,
        message: r.message,
        seasonMeans,
        units: r.cycle ? { ...r.cycle.units } : {}
      };
      post({ v: PROTOCOL_VERSION, type: 'settleResult', requestId, result });
    } catch (err) {
      exception(requestId, err);
    } finally {
      running.delete(requestId);
    }
  }

  function sweepOne(request: SweepRequest, sweepFn: SweepFn): void {
    const { requestId } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    try {
      const doc = sweepFn(request.model, {
        ...request.settings,
        settle: { signal: controller.signal },
        // one message per long run: a sweep has tens of them, each taking a second or more
        onProgress: ({ done, total }) => post({ v: PROTOCOL_VERSION, type: 'sweepProgress', requestId, done, total })
      });
      post({ v: PROTOCOL_VERSION, type: 'sweepResult', requestId, sweep: doc });
    } catch (err) {
      const code = (err as { code?: unknown }).code;
      if (err instanceof Error && typeof code === 'string') {
        // bad input (unknown target, bad range): the user's to fix, not a defect
        post({ v: PROTOCOL_VERSION, type: 'sweepResult', requestId, problem: { code, message: err.message } });
      } else {
        exception(requestId, err);
      }
    } finally {
      running.delete(requestId);
    }
  }

  return (data) => {
    if (isRunRequest(data)) return run(data);
    if (isSettleRequest(data) && options.settle) return settleOne(data, options.settle);
    if (isSweepRequest(data) && options.sweep) return sweepOne(data, options.sweep);
    if (isCancelRequest(data)) {
      running.get(data.requestId)?.abort();
      return;
    }
    const version = typeof data === 'object' && data !== null ? (data as { v?: unknown }).v : undefined;
    post({
      v: PROTOCOL_VERSION,
      type: 'error',
      requestId: requestIdOf(data),
      code: 'bad_message',
      message:
        version !== PROTOCOL_VERSION
          ? `engine worker: unsupported protocol version ${JSON.stringify(version)} (supported: ${PROTOCOL_VERSION})`
          : 'engine worker: message is not a well-formed run, settle, sweep or cancel request'
    });
  };
}
