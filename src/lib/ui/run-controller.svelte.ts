/**
 * The state of one run on a page, as runes: phase, progress, the run document, the error.
 * The runner comes in as an argument (the worker client in the app, a fake in tests).
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';

/** What the page shows; `finished` is a run with status `ok`. */
export type RunPhase = 'idle' | 'running' | 'finished' | 'failed' | 'cancelled';

export type Runner = (
  model: ModelDoc,
  scenario: ScenarioDoc | undefined,
  options: { signal: AbortSignal; onProgress: (p: { fraction: number; day: number }) => void }
) => Promise<RunDoc>;

const PHASE_OF_STATUS: Record<RunDoc['status'], RunPhase> = {
  ok: 'finished',
  failed: 'failed',
  cancelled: 'cancelled'
};

export class RunController {
  phase = $state<RunPhase>('idle');
  /** Share of the period done, 0 to 1. */
  fraction = $state(0);
  /** Day reached since the scenario's start. */
  day = $state(0);
  /** The last run document; raw, since its series are large and never edited. */
  run = $state.raw<RunDoc | null>(null);
  /** Why the run failed, in words; null unless `phase` is `failed`. */
  error = $state<string | null>(null);

  #runner: Runner;
  #abort: AbortController | null = null;

  constructor(runner: Runner) {
    this.#runner = runner;
  }

  get running(): boolean {
    return this.phase === 'running';
  }

  /** Starts a run, cancelling one still going. Resolves when it has settled. */
  async start(model: ModelDoc, scenario?: ScenarioDoc): Promise<void> {
    this.#abort?.abort();
    const abort = new AbortController();
    this.#abort = abort;
    this.phase = 'running';
    this.fraction = 0;
    this.day = 0;
    this.run = null;
    this.error = null;
    try {
      const run = await this.#runner(model, scenario, {
        signal: abort.signal,
        onProgress: ({ fraction, day }) => {
          if (this.#abort !== abort) return;
          this.fraction = fraction;
          this.day = day;
        }
      });
      if (this.#abort !== abort) return;
      this.run = run;
      this.phase = PHASE_OF_STATUS[run.status] ?? 'failed';
      if (run.status === 'ok') this.fraction = 1;
      if (this.phase === 'failed') this.error = run.error?.message ?? `run ended with status ${run.status}`;
    } catch (err) {
      if (this.#abort !== abort) return;
      if (abort.signal.aborted) {
        this.phase = 'cancelled';
      } else {
        this.phase = 'failed';
        this.error = err instanceof Error ? err.message : String(err);
      }
    } finally {
      if (this.#abort === abort) this.#abort = null;
    }
  }

  /** Stops the run in progress, if any. */
  cancel(): void {
    this.#abort?.abort();
  }
}
