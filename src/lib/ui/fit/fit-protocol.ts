/**
 * Messages between the Fit screen and its calibration worker (`fit.worker.ts`): a small
 * versioned union of its own, apart from the engine worker's protocol.
 *   page → worker: `calibrate` | `cancel`
 *   worker → page: `progress` | `result` | `error`
 * Every message carries `v` (FIT_PROTOCOL_VERSION) and the request's id; a message of
 * another version or shape is refused by the guards below, never half-read.
 *
 * Cancel (version 2): the engine's `calibrate` is synchronous, so the worker cannot read a
 * `cancel` message while it computes. The page therefore hands the worker a cancel token
 * with the request: `cancelUrl`, an object URL of a small Blob (text CANCEL_TOKEN_TEXT).
 * To cancel, the page posts `cancel` and revokes the URL; the worker reads the URL
 * (synchronous XHR, at most every CANCEL_POLL_MS) through the engine's abort signal, and
 * once it is gone the engine stops and the worker answers with a `result` whose status is
 * `cancelled`: the best point so far, its path and the run there. (SharedArrayBuffer would
 * do this without polling but needs a cross-origin isolated page, which static hosts do
 * not give.) A worker that does not answer within the page's grace time is terminated.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { CalibrationResult, FitParameter, FitVariable } from '$lib/engine/fit/calibrate';

export const FIT_PROTOCOL_VERSION = 2;

/** The text of the cancel token's Blob: the worker reads it back to tell "still there" from "revoked". */
export const CANCEL_TOKEN_TEXT = 'lakeledger-fit-running';
/** How often the worker reads the cancel token while the engine computes (ms). */
export const CANCEL_POLL_MS = 200;

export interface CalibrateSettings {
  parameters: FitParameter[];
  variables: FitVariable[];
  /** Default 30 (the engine's). */
  maxIterations?: number;
}

export interface CalibrateMessage {
  v: typeof FIT_PROTOCOL_VERSION;
  type: 'calibrate';
  requestId: string;
  model: ModelDoc;
  scenario: ScenarioDoc;
  observations: ObservationSet;
  settings: CalibrateSettings;
  /** The cancel token (see above): revoked means cancelled. Null: cancel only by terminating. */
  cancelUrl?: string | null;
}

export interface CancelFitMessage {
  v: typeof FIT_PROTOCOL_VERSION;
  type: 'cancel';
  requestId: string;
}

export interface FitProgressMessage {
  v: typeof FIT_PROTOCOL_VERSION;
  type: 'progress';
  requestId: string;
  iteration: number;
  evaluations: number;
  /** Best objective so far. */
  objective: number;
}

export interface FitResultMessage {
  v: typeof FIT_PROTOCOL_VERSION;
  type: 'result';
  requestId: string;
  /**
   * The engine's result. After a cancel: status `cancelled`, `parameters` and
   * `objective.after` at the best point so far (objective.after is Infinity when no run had
   * finished), `path` ending at that point, and `run` the run there (null when none).
   */
  result: CalibrationResult;
}

/** `invalid_request` (a message the worker cannot read), `input` (a FitInputError: its code in `inputCode`), `failed` (anything else). */
export type FitWorkerErrorCode = 'invalid_request' | 'input' | 'failed';

export interface FitErrorMessage {
  v: typeof FIT_PROTOCOL_VERSION;
  type: 'error';
  requestId: string | null;
  code: FitWorkerErrorCode;
  inputCode?: string;
  message: string;
}

export type ToFitWorker = CalibrateMessage | CancelFitMessage;
export type FromFitWorker = FitProgressMessage | FitResultMessage | FitErrorMessage;

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null;
}

function base(x: unknown, type: string): x is Record<string, unknown> {
  return isObject(x) && x.v === FIT_PROTOCOL_VERSION && x.type === type;
}

const isId = (x: unknown): x is string => typeof x === 'string' && x.length > 0;

export function isCalibrateMessage(x: unknown): x is CalibrateMessage {
  if (!base(x, 'calibrate') || !isId(x.requestId)) return false;
  if (!isObject(x.model) || !isObject(x.scenario) || !isObject(x.observations)) return false;
  const s = x.settings;
  if (!isObject(s) || !Array.isArray(s.parameters) || !Array.isArray(s.variables)) return false;
  if (!s.parameters.every((p) => isObject(p) && isId(p.id))) return false;
  if (x.cancelUrl !== undefined && x.cancelUrl !== null && typeof x.cancelUrl !== 'string') return false;
  if (!s.variables.every((v) => isObject(v) && isId(v.id))) return false;
  return s.maxIterations === undefined || (Number.isInteger(s.maxIterations) && (s.maxIterations as number) >= 1);
}

export function isCancelFitMessage(x: unknown): x is CancelFitMessage {
  return base(x, 'cancel') && isId(x.requestId);
}

export function isFitProgressMessage(x: unknown): x is FitProgressMessage {
  return base(x, 'progress') && isId(x.requestId) && typeof x.iteration === 'number' && typeof x.evaluations === 'number' && typeof x.objective === 'number';
}

export function isFitResultMessage(x: unknown): x is FitResultMessage {
  return base(x, 'result') && isId(x.requestId) && isObject(x.result) && typeof (x.result as Record<string, unknown>).status === 'string' && Array.isArray((x.result as Record<string, unknown>).path);
}

export function isFitErrorMessage(x: unknown): x is FitErrorMessage {
  return (
    base(x, 'error') &&
    (x.requestId === null || isId(x.requestId)) &&
    (x.code === 'invalid_request' || x.code === 'input' || x.code === 'failed') &&
    typeof x.message === 'string'
  );
}
