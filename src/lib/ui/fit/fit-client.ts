/**
 * The page's side of the calibration worker: one calibration as a Promise, with an
 * AbortSignal and progress. Each calibration gets its own worker, terminated when it
 * settles; aborting terminates it at once (the engine cannot listen while it computes)
 * and rejects with the signal's reason (an `AbortError`).
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { CalibrationResult } from '$lib/engine/fit/calibrate';
import {
  FIT_PROTOCOL_VERSION,
  isFitErrorMessage,
  isFitProgressMessage,
  isFitResultMessage,
  type CalibrateSettings,
  type ToFitWorker
} from './fit-protocol';

export interface FitWorkerLike {
  postMessage(message: ToFitWorker): void;
  terminate(): void;
  addEventListener(type: 'message' | 'messageerror' | 'error', listener: (event: Event) => void): void;
}

export interface FitProgress {
  iteration: number;
  evaluations: number;
  objective: number;
}

export interface CalibrateInWorkerOptions {
  signal?: AbortSignal;
  onProgress?: (p: FitProgress) => void;
  /** Makes the worker. Default: fit.worker.ts. */
  createWorker?: () => FitWorkerLike;
}

export class FitWorkerError extends Error {
  constructor(
    readonly code: string,
    message: string
  ) {
    super(message);
    this.name = 'FitWorkerError';
  }
}

export function createFitWorker(): FitWorkerLike {
  return new Worker(new URL('./fit.worker.ts', import.meta.url), { type: 'module', name: 'lake-ledger-fit' });
}

let counter = 0;

export function calibrateInWorker(
  model: ModelDoc,
  scenario: ScenarioDoc,
  observations: ObservationSet,
  settings: CalibrateSettings,
  options: CalibrateInWorkerOptions = {}
): Promise<CalibrationResult> {
  const { signal, onProgress } = options;
  const reason = () => signal?.reason ?? new DOMException('The calibration was cancelled.', 'AbortError');
  if (signal?.aborted) return Promise.reject(reason());
  return new Promise((resolve, reject) => {
    counter += 1;
    const requestId = `fit_${Date.now().toString(36)}_${counter}`;
    const worker = (options.createWorker ?? createFitWorker)();
    let settled = false;
    const settle = (done: () => void) => {
      if (settled) return;
      settled = true;
      signal?.removeEventListener('abort', onAbort);
      worker.terminate();
      done();
    };
    function onAbort() {
      worker.postMessage({ v: FIT_PROTOCOL_VERSION, type: 'cancel', requestId });
      settle(() => reject(reason()));
    }
    worker.addEventListener('message', (event) => {
      const data: unknown = (event as MessageEvent).data;
      if (isFitProgressMessage(data)) {
        if (data.requestId === requestId && !settled) onProgress?.({ iteration: data.iteration, evaluations: data.evaluations, objective: data.objective });
      } else if (isFitResultMessage(data)) {
        if (data.requestId === requestId) settle(() => resolve(data.result));
      } else if (isFitErrorMessage(data)) {
        if (data.requestId === requestId || data.requestId === null) settle(() => reject(new FitWorkerError(data.inputCode ?? data.code, data.message)));
      } else {
        settle(() => reject(new FitWorkerError('bad_message', 'the calibration worker sent a message this page does not understand')));
      }
    });
    worker.addEventListener('messageerror', () => settle(() => reject(new FitWorkerError('worker_failed', 'a message from the calibration worker could not be read'))));
    worker.addEventListener('error', (event) => {
      event.preventDefault();
      const detail = (event as ErrorEvent).message;
      settle(() => reject(new FitWorkerError('worker_failed', `the calibration worker failed${detail ? `: ${detail}` : ' to start'}`)));
    });
    signal?.addEventListener('abort', onAbort, { once: true });
    worker.postMessage({ v: FIT_PROTOCOL_VERSION, type: 'calibrate', requestId, model, scenario, observations, settings });
  });
}
