/**
 * The page's side of the calibration worker: one calibration as a Promise, with an
 * AbortSignal and progress. Each calibration gets its own worker, terminated when it
 * settles.
 *
 * Aborting asks the worker to stop (a `cancel` message and the revocation of the request's
 * cancel token, see fit-protocol.ts); the worker then answers with a result marked
 * `cancelled` that holds the best point so far, and the Promise resolves with it. A worker
 * that does not answer within `graceMs` is terminated and the Promise rejects with the
 * signal's reason (an `AbortError`): then nothing of the fit is kept.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { CalibrationResult } from '$lib/engine/fit/calibrate';
import {
  CANCEL_TOKEN_TEXT,
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

/** A cancel token: a URL the worker can read until `revoke` is called (null: none). */
export interface CancelToken {
  url: string | null;
  revoke(): void;
}

/** How long a cancelled calibration may take to answer with its best point (ms). */
export const CANCEL_GRACE_MS = 5000;

export interface CalibrateInWorkerOptions {
  signal?: AbortSignal;
  onProgress?: (p: FitProgress) => void;
  /** Makes the worker. Default: fit.worker.ts. */
  createWorker?: () => FitWorkerLike;
  /** Makes the cancel token. Default: an object URL of a Blob holding CANCEL_TOKEN_TEXT. */
  createCancelToken?: () => CancelToken;
  /** Wait this long for the answer to a cancel before terminating the worker (default CANCEL_GRACE_MS). */
  graceMs?: number;
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

export function blobCancelToken(): CancelToken {
  if (typeof Blob === 'undefined' || typeof URL.createObjectURL !== 'function') return { url: null, revoke() {} };
  const url = URL.createObjectURL(new Blob([CANCEL_TOKEN_TEXT], { type: 'text/plain' }));
  let revoked = false;
  return {
    url,
    revoke() {
      if (revoked) return;
      revoked = true;
      URL.revokeObjectURL(url);
    }
  };
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
  const graceMs = options.graceMs ?? CANCEL_GRACE_MS;
  const reason = () => signal?.reason ?? new DOMException('The calibration was cancelled.', 'AbortError');
  if (signal?.aborted) return Promise.reject(reason());
  return new Promise((resolve, reject) => {
    counter += 1;
    const requestId = `fit_${Date.now().toString(36)}_${counter}`;
    const worker = (options.createWorker ?? createFitWorker)();
    const token = (options.createCancelToken ?? blobCancelToken)();
    let settled = false;
    let cancelling = false;
    let hardStop: ReturnType<typeof setTimeout> | null = null;
    const settle = (done: () => void) => {
      if (settled) return;
      settled = true;
      signal?.removeEventListener('abort', onAbort);
      if (hardStop !== null) clearTimeout(hardStop);
      token.revoke();
      worker.terminate();
      done();
    };
    function onAbort() {
      if (settled || cancelling) return;
      cancelling = true;
      worker.postMessage({ v: FIT_PROTOCOL_VERSION, type: 'cancel', requestId });
      token.revoke();
      // the worker answers with its best point; one that does not is stopped hard
      hardStop = setTimeout(() => settle(() => reject(reason())), graceMs);
    }
    worker.addEventListener('message', (event) => {
      const data: unknown = (event as MessageEvent).data;
      if (isFitProgressMessage(data)) {
        if (data.requestId === requestId && !settled && !cancelling) onProgress?.({ iteration: data.iteration, evaluations: data.evaluations, objective: data.objective });
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
    worker.postMessage({ v: FIT_PROTOCOL_VERSION, type: 'calibrate', requestId, model, scenario, observations, settings, cancelUrl: token.url });
  });
}
