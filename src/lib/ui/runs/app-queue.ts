/**
 * The page's one run queue over the worker pool and the library's run store, made on
 * first use so that nothing starts a worker before a screen asks for a run.
 */
import { getLibrary } from '$lib/storage';
import { WorkerPool } from '$lib/worker/pool';
import { RunQueue } from './run-queue.svelte';

let queue: RunQueue | null = null;
let pool: WorkerPool | null = null;

export function getWorkerPool(): WorkerPool {
  return (pool ??= new WorkerPool());
}

export function getRunQueue(): RunQueue {
  if (!queue) {
    const library = getLibrary();
    const workers = getWorkerPool();
    queue = new RunQueue({
      run: (model, scenario, options) => workers.run(model, scenario, options),
      save: (run, provenance, title) => library.runs.save(run, provenance, title),
      load: (id) => library.runs.load(id)
    });
  }
  return queue;
}
