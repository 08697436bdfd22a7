/// <reference lib="webworker" />
/**
 * The engine worker: runs `simulate` off the page's thread. All logic is in
 * engine-host.ts; this file only connects it to the worker global.
 */
import { simulate, settle, sweep, cycleSeasonMean, sampleModel, prepareRuns, ENSEMBLE_AUTO_START } from '$lib/engine';
import { createEngineHost } from './engine-host';

const scope = self as unknown as DedicatedWorkerGlobalScope;

const handle = createEngineHost({
  simulate: (model, scenario, options) => simulate(model, scenario, options),
  settle: (model, options) => settle(model, options),
  cycleMean: (cycle, id) => cycleSeasonMean(cycle, id),
  sweep: (model, options) => sweep(model, options),
  ensemble: {
    sample: (model, n, seed) => {
      const s = sampleModel(model, n, seed);
      return {
        members: s.members,
        sampled: {
          parameters: s.inputs.filter((i) => i.kind === 'parameter').map((i) => i.id),
          states: s.inputs.filter((i) => i.kind === 'state').map((i) => i.id)
        }
      };
    },
    prepare: (model, scenario) => {
      const p = prepareRuns(model, scenario);
      if (!p.ok) return { ok: false, code: p.run.error?.code ?? 'failed', message: p.run.error?.message ?? 'the scenario could not be prepared' };
      // members carry no run id: they are summarised, never stored one by one
      // auto scenarios start with the ensemble's explicit method, as on the command line
      return { ok: true, run: (draw, signal) => p.runner.run(draw, { skipRunId: true, signal, autoStart: ENSEMBLE_AUTO_START }) };
    }
  },
  post: (message) => scope.postMessage(message)
});

scope.addEventListener('message', (event: MessageEvent) => handle(event.data));
