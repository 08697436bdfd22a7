/// <reference lib="webworker" />
/**
 * The engine worker: runs `simulate` off the page's thread. All logic is in
 * engine-host.ts; this file only connects it to the worker global.
 */
import { simulate } from '$lib/engine';
import { createEngineHost } from './engine-host';

const scope = self as unknown as DedicatedWorkerGlobalScope;

const handle = createEngineHost({
  simulate: (model, scenario, options) => simulate(model, scenario, options),
  post: (message) => scope.postMessage(message)
});

scope.addEventListener('message', (event: MessageEvent) => handle(event.data));
