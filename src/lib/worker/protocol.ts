/**
 * The messages between the page and the engine worker: versioned discriminated unions.
 *
 * Page → worker: `run`, `cancel`. Worker → page: `progress`, `result`, `error`.
 * Every message carries `v` (the protocol version) and the `requestId` of the run it
 * belongs to, so that a late message of an earlier run is never taken for the current one.
 * A message with another `v` is refused by the guards below, not half-understood.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';

export const PROTOCOL_VERSION = 1;

/** Ask the worker to simulate `model` under `scenario` (the engine's default period when absent). */
export interface RunRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'run';
  requestId: string;
  model: ModelDoc;
  scenario?: ScenarioDoc;
  /** Start values by state id (a spin-up from a stored run's end state). */
  initial?: Record<string, number>;
}

/**
 * Ask the worker to stop the run `requestId`. The worker aborts the signal it gave the
 * engine; a run that sees it comes back as a `result` with status `cancelled`. The engine
 * runs synchronously, so a worker busy in a run reads this only once the run is over:
 * the client therefore also terminates the worker (client.ts).
 */
export interface CancelRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'cancel';
  requestId: string;
}

export type ToWorker = RunRequest | CancelRequest;

/** How far the run has come. Throttled by the worker (see progress-throttle.ts). */
export interface ProgressMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'progress';
  requestId: string;
  /** Share of the period done, 0 to 1. */
  fraction: number;
  /** Day reached, since the scenario's start. */
  day: number;
}

/**
 * The run document. A model the engine could not run still comes back here,
 * as a run with status `failed` and its `error`.
 */
export interface ResultMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'result';
  requestId: string;
  run: RunDoc;
}

/** The worker itself could not do what was asked (a malformed request, an exception). */
export interface ErrorMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'error';
  /** Null when the request was too malformed to carry an id. */
  requestId: string | null;
  /** Stable code: `bad_message`, `engine_exception`. */
  code: WorkerErrorCode;
  message: string;
}

export type WorkerErrorCode = 'bad_message' | 'engine_exception';

export type FromWorker = ProgressMessage | ResultMessage | ErrorMessage;

type Loose = Record<string, unknown>;

function isRecord(x: unknown): x is Loose {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

function hasEnvelope(x: unknown): x is Loose {
  return isRecord(x) && x.v === PROTOCOL_VERSION && typeof x.type === 'string';
}

function isRequestId(x: unknown): x is string {
  return typeof x === 'string' && x.length > 0;
}

function isFraction(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x >= 0 && x <= 1;
}

/**
 * The guards check the envelope and the shape of each field, not the documents inside:
 * the engine validates models and scenarios itself and reports every problem.
 */
export function isRunRequest(x: unknown): x is RunRequest {
  return (
    hasEnvelope(x) &&
    x.type === 'run' &&
    isRequestId(x.requestId) &&
    isRecord(x.model) &&
    (x.scenario === undefined || isRecord(x.scenario)) &&
    (x.initial === undefined || isRecord(x.initial))
  );
}

export function isCancelRequest(x: unknown): x is CancelRequest {
  return hasEnvelope(x) && x.type === 'cancel' && isRequestId(x.requestId);
}

export function isToWorker(x: unknown): x is ToWorker {
  return isRunRequest(x) || isCancelRequest(x);
}

export function isProgressMessage(x: unknown): x is ProgressMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'progress' &&
    isRequestId(x.requestId) &&
    isFraction(x.fraction) &&
    typeof x.day === 'number' &&
    Number.isFinite(x.day)
  );
}

export function isResultMessage(x: unknown): x is ResultMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'result' &&
    isRequestId(x.requestId) &&
    isRecord(x.run) &&
    typeof x.run.status === 'string'
  );
}

export function isErrorMessage(x: unknown): x is ErrorMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'error' &&
    (x.requestId === null || isRequestId(x.requestId)) &&
    (x.code === 'bad_message' || x.code === 'engine_exception') &&
    typeof x.message === 'string'
  );
}

export function isFromWorker(x: unknown): x is FromWorker {
  return isProgressMessage(x) || isResultMessage(x) || isErrorMessage(x);
}

/** The request id of anything that looks like a message, for replying to a malformed one. */
export function requestIdOf(x: unknown): string | null {
  return isRecord(x) && isRequestId(x.requestId) ? x.requestId : null;
}
