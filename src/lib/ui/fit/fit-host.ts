/**
 * The calibration worker's logic, apart from the worker global so it can be tested: reads a
 * `calibrate` message, runs the engine's `calibrate` and posts progress, then the result or
 * an error. The engine is synchronous, so a `cancel` cannot arrive while it runs; the client
 * stops a calibration by terminating the worker.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { CalibrateOptions, CalibrationResult } from '$lib/engine/fit/calibrate';
import { FIT_PROTOCOL_VERSION, isCalibrateMessage, isCancelFitMessage, type FromFitWorker } from './fit-protocol';

export interface FitHostDeps {
  calibrate: (model: ModelDoc, scenario: ScenarioDoc, set: ObservationSet, options: CalibrateOptions) => CalibrationResult;
  post: (message: FromFitWorker) => void;
}

export function createFitHost(deps: FitHostDeps): (data: unknown) => void {
  const v = FIT_PROTOCOL_VERSION;
  return (data) => {
    if (isCancelFitMessage(data)) return;
    if (!isCalibrateMessage(data)) {
      const requestId = typeof (data as { requestId?: unknown } | null)?.requestId === 'string' ? (data as { requestId: string }).requestId : null;
      deps.post({ v, type: 'error', requestId, code: 'invalid_request', message: 'the calibration worker received a message it cannot read (another version?)' });
      return;
    }
    const { requestId, settings } = data;
    try {
      const result = deps.calibrate(data.model, data.scenario, data.observations, {
        parameters: settings.parameters,
        variables: settings.variables,
        maxIterations: settings.maxIterations,
        onProgress: (p) => deps.post({ v, type: 'progress', requestId, iteration: p.iteration, evaluations: p.evaluations, objective: p.objective })
      });
      deps.post({ v, type: 'result', requestId, result });
    } catch (err) {
      const e = err as { name?: string; code?: string; message?: string };
      if (e?.name === 'FitInputError') deps.post({ v, type: 'error', requestId, code: 'input', inputCode: e.code, message: e.message ?? 'bad input' });
      else deps.post({ v, type: 'error', requestId, code: 'failed', message: `the calibration failed: ${e?.message ?? String(err)}` });
    }
  };
}
