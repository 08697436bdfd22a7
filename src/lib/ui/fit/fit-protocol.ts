/**
 * Messages between the Fit screen and its calibration worker (`fit.worker.ts`): a small
 * versioned union of its own, apart from the engine worker's protocol.
 *   page → worker: `calibrate` | `cancel`
 *   worker → page: `progress` | `result` | `error`
 * Every message carries `v` (FIT_PROTOCOL_VERSION) and the request's id; a message of
 * another version or shape is refused by the guards below, never half-read.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { CalibrationResult, FitParameter, FitVariable } from '$lib/engine/fit/calibrate';

export const FIT_PROTOCOL_VERSION = 1;

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
