/**
 * The calibration worker's logic, apart from the worker global so it can be tested: reads a
 * `calibrate` message, runs the engine's `calibrate` with an abort signal and posts
 * progress, then the result or an error.
 *
 * The signal is aborted by a `cancel` message for the running request (seen only when the
 * host is entered again while the engine computes, as in tests) or when the request's
 * cancel token can no longer be read (fit-protocol.ts: the page revoked it). The token is
 * read at most every CANCEL_POLL_MS, and only when it could be read at the start, so a
 * token the worker cannot read at all (a stricter policy) never reads as a cancel. On
 * cancel the engine returns its best point so far; the host adds the run at that point,
 * ends the path there, and posts it as a `result` with status `cancelled`.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { CalibrateOptions, CalibrationResult } from '$lib/engine/fit/calibrate';
import { CANCEL_POLL_MS, FIT_PROTOCOL_VERSION, isCalibrateMessage, isCancelFitMessage, type FromFitWorker } from './fit-protocol';

export interface FitHostDeps {
  calibrate: (model: ModelDoc, scenario: ScenarioDoc, set: ObservationSet, options: CalibrateOptions) => CalibrationResult;
  post: (message: FromFitWorker) => void;
  /** One run of the model at these parameter values: the run at a cancelled fit's best point. Without it, a cancelled result has no run. */
  simulate?: (model: ModelDoc, scenario: ScenarioDoc, parameters: Record<string, number>) => RunDoc;
  /** Whether the cancel token can still be read (the worker: a synchronous XHR). Without it, tokens are ignored. */
  readToken?: (url: string) => boolean;
  /** Monotonic milliseconds (default: performance.now). */
  clock?: () => number;
}

export function createFitHost(deps: FitHostDeps): (data: unknown) => void {
  const v = FIT_PROTOCOL_VERSION;
  const clock = deps.clock ?? (() => performance.now());
  /** The request the engine is computing, and whether it was asked to stop. */
  let active: { requestId: string; cancelled: boolean } | null = null;

  /** The engine's signal for one request: a cancel message, or the token gone. */
  function signalFor(request: { requestId: string; cancelled: boolean }, url: string | null | undefined): NonNullable<CalibrateOptions['signal']> {
    const read = deps.readToken;
    const watched = !!url && !!read && read(url);
    let lastRead = clock();
    return {
      get aborted() {
        if (!request.cancelled && watched && clock() - lastRead >= CANCEL_POLL_MS) {
          lastRead = clock();
          if (!read!(url!)) request.cancelled = true;
        }
        return request.cancelled;
      }
    };
  }

  return (data) => {
    if (isCancelFitMessage(data)) {
      if (active && active.requestId === data.requestId) active.cancelled = true;
      return;
    }
    if (!isCalibrateMessage(data)) {
      const requestId = typeof (data as { requestId?: unknown } | null)?.requestId === 'string' ? (data as { requestId: string }).requestId : null;
      deps.post({ v, type: 'error', requestId, code: 'invalid_request', message: 'the calibration worker received a message it cannot read (another version?)' });
      return;
    }
    const { requestId, settings } = data;
    const request = { requestId, cancelled: false };
    active = request;
    try {
      const result = deps.calibrate(data.model, data.scenario, data.observations, {
        parameters: settings.parameters,
        variables: settings.variables,
        maxIterations: settings.maxIterations,
        signal: signalFor(request, data.cancelUrl),
        onProgress: (p) => deps.post({ v, type: 'progress', requestId, iteration: p.iteration, evaluations: p.evaluations, objective: p.objective })
      });
      if (result.status === 'cancelled') keepBestPoint(result, data.model, data.scenario, deps.simulate);
      deps.post({ v, type: 'result', requestId, result });
    } catch (err) {
      const e = err as { name?: string; code?: string; message?: string };
      if (e?.name === 'FitInputError') deps.post({ v, type: 'error', requestId, code: 'input', inputCode: e.code, message: e.message ?? 'bad input' });
      else deps.post({ v, type: 'error', requestId, code: 'failed', message: `the calibration failed: ${e?.message ?? String(err)}` });
    } finally {
      if (active === request) active = null;
    }
  };
}

/**
 * A cancelled result as the page shows it: the path ends at the best point (the engine
 * stops mid-iteration, where a better point than the last path entry may have been seen)
 * and the run at that point is attached. Nothing is added when no run had finished.
 */
function keepBestPoint(result: CalibrationResult, model: ModelDoc, scenario: ScenarioDoc, simulate: FitHostDeps['simulate']): void {
  const best = result.objective.after;
  if (!Number.isFinite(best)) return;
  if (result.path[result.path.length - 1] !== best) result.path.push(best);
  if (!result.run && simulate) {
    const run = simulate(model, scenario, result.parameters);
    if (run.status === 'ok') result.run = run;
  }
}
