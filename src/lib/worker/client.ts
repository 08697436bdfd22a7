/**
 * The page's side of the engine worker: one run as a Promise, with an AbortSignal and
 * progress. Each run gets its own worker, terminated when the run settles, so that a
 * cancelled run stops at once even though the engine itself is synchronous.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import {
  PROTOCOL_VERSION,
  isErrorMessage,
  isProgressMessage,
  isResultMessage,
  type ToWorker,
  type WorkerErrorCode
} from './protocol';

/** What the client needs of a Worker; tests pass a fake. */
export interface WorkerLike {
  postMessage(message: ToWorker): void;
  terminate(): void;
  addEventListener(type: 'message' | 'messageerror' | 'error', listener: (event: Event) => void): void;
}

export interface RunInWorkerOptions {
  /** Aborting rejects the Promise with the signal's reason (an `AbortError`). */
  signal?: AbortSignal;
  /** Called with the worker's (throttled) progress. */
  onProgress?: (progress: { fraction: number; day: number }) => void;
  /** Makes the worker. Default: the engine worker. */
  createWorker?: () => WorkerLike;
}

/** The worker could not run the request (it never does this for a bad model: see ResultMessage). */
export class WorkerRunError extends Error {
  readonly code: WorkerErrorCode | 'worker_failed';
  constructor(code: WorkerErrorCode | 'worker_failed', message: string) {
    super(message);
    this.name = 'WorkerRunError';
    this.code = code;
  }
}

export function createEngineWorker(): WorkerLike {
  return new Worker(new URL('./engine.worker.ts', import.meta.url), {
    type: 'module',
    name: 'lake-ledger-engine'
  });
}

/** True for the rejection of an aborted run. */
export function isAbortError(err: unknown): boolean {
  return err instanceof Error && err.name === 'AbortError';
}

let counter = 0;
function nextRequestId(): string {
  counter += 1;
  return `req_${Date.now().toString(36)}_${counter}`;
}

function abortReason(signal: AbortSignal): unknown {
  return signal.reason ?? new DOMException('The run was cancelled.', 'AbortError');
}

/** Runs `model` under `scenario` in a worker; resolves with the run document. */
export function runInWorker(
  model: ModelDoc,
  scenario: ScenarioDoc | undefined,
  options: RunInWorkerOptions = {}
): Promise<RunDoc> {
  const { signal, onProgress } = options;
  if (signal?.aborted) return Promise.reject(abortReason(signal));

  return new Promise<RunDoc>((resolve, reject) => {
    const requestId = nextRequestId();
    const worker = (options.createWorker ?? createEngineWorker)();
    let settled = false;

    const settle = (done: () => void) => {
      if (settled) return;
      settled = true;
      signal?.removeEventListener('abort', onAbort);
      worker.terminate();
      done();
    };

    function onAbort() {
      // A courtesy to a worker that can still listen; terminate() below is what stops it.
      worker.postMessage({ v: PROTOCOL_VERSION, type: 'cancel', requestId });
      settle(() => reject(abortReason(signal!)));
    }

    worker.addEventListener('message', (event) => {
      const data: unknown = (event as MessageEvent).data;
      if (isProgressMessage(data)) {
        if (data.requestId === requestId && !settled) onProgress?.({ fraction: data.fraction, day: data.day });
      } else if (isResultMessage(data)) {
        if (data.requestId === requestId) settle(() => resolve(data.run));
      } else if (isErrorMessage(data)) {
        if (data.requestId === requestId || data.requestId === null) {
          settle(() => reject(new WorkerRunError(data.code, data.message)));
        }
      } else {
        settle(() => reject(new WorkerRunError('bad_message', 'engine worker sent a message this page does not understand')));
      }
    });
    worker.addEventListener('messageerror', () => {
      settle(() => reject(new WorkerRunError('worker_failed', 'a message from the engine worker could not be read')));
    });
    worker.addEventListener('error', (event) => {
      // Handled here: keep it from also surfacing as an uncaught page error.
      event.preventDefault();
      const detail = (event as ErrorEvent).message;
      settle(() =>
        reject(new WorkerRunError('worker_failed', `the engine worker failed${detail ? `: ${detail}` : ' to start'}`))
      );
    });

    signal?.addEventListener('abort', onAbort, { once: true });
    worker.postMessage({ v: PROTOCOL_VERSION, type: 'run', requestId, model, scenario });
  });
}
