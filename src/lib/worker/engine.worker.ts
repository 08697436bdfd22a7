/// <reference lib="webworker" />
/**
 * The engine worker: runs `simulate` off the page's thread. All logic is in
 * engine-host.ts; this file only connects it to the worker global.
 */
import { simulate, settle, sweep, cycleSeasonMean } from '$lib/engine';
import { createEngineHost } from './engine-host';

const scope = self as unknown as DedicatedWorkerGlobalScope;

const handle = createEngineHost({
  simulate: (model, scenario, options) => simulate(model, scenario, options),
  settle: (model, options) => settle(model, options),
  cycleMean: (cycle, id) => cycleSeasonMean(cycle, id),
  sweep: (model, options) => sweep(model, options),
  post: (message) => scope.postMessage(message)
});

scope.addEventListener('message', (event: MessageEvent) => handle(event.data));
