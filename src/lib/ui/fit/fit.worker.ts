/// <reference lib="webworker" />
/**
 * The calibration worker: runs the engine's `calibrate` off the page's thread. The logic is
 * in fit-host.ts; this file only connects it to the worker global.
 */
import { calibrate } from '$lib/engine/fit/calibrate';
import { createFitHost } from './fit-host';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const handle = createFitHost({ calibrate, post: (m) => scope.postMessage(m) });
scope.addEventListener('message', (event: MessageEvent) => handle(event.data));
