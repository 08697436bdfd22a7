/**
 * What the engine worker does with each message, apart from the worker global so it can
 * be tested in Node: the engine, the way out and the clock come in as arguments.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import {
  PROTOCOL_VERSION,
  isCancelRequest,
  isRunRequest,
  requestIdOf,
  type FromWorker,
  type RunRequest
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

export interface EngineHostOptions {
  simulate: SimulateFn;
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

  return (data) => {
    if (isRunRequest(data)) return run(data);
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
          : 'engine worker: message is neither a well-formed run nor a cancel request'
    });
  };
}
