/// <reference lib="webworker" />
/**
 * The calibration worker: runs the engine's `calibrate` off the page's thread. The logic is
 * in fit-host.ts; this file only connects it to the worker global, the engine's `simulate`
 * (the run at a cancelled fit's best point) and the reading of the cancel token.
 */
import { calibrate } from '$lib/engine/fit/calibrate';
import { simulate } from '$lib/engine/simulate';
import { createFitHost } from './fit-host';
import { CANCEL_TOKEN_TEXT } from './fit-protocol';

/** Whether the page's cancel token (an object URL) can still be read: a synchronous XHR, allowed in workers; a revoked URL fails. */
function readToken(url: string): boolean {
  try {
    const xhr = new XMLHttpRequest();
    xhr.open('GET', url, false);
    xhr.send();
    return xhr.responseText === CANCEL_TOKEN_TEXT;
  } catch {
    return false;
  }
}

const scope = self as unknown as DedicatedWorkerGlobalScope;
const handle = createFitHost({
  calibrate,
  simulate: (model, scenario, parameters) => simulate(model, scenario, { parameters, skipRunId: true }),
  readToken,
  post: (m) => scope.postMessage(m)
});
scope.addEventListener('message', (event: MessageEvent) => handle(event.data));
