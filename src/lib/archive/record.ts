/**
 * The digest of a run record: SHA-256 over the canonical JSON (RFC 8785) of its inputs
 * (model and scenario digests, solver settings, engine version, parameter and initial
 * overrides) and a digest of its outputs (times, series, closure, budget, status). The
 * run document's `id` is built from the same digest (engine/simulate.ts, runDigest).
 */
import { digestOf } from '../engine/document/digest';
import type { RunDoc } from '../engine/document/types';

export interface RunInputs {
  model: string;
  scenario: string;
  modelDigest: string;
  scenarioDigest: string;
  engine: string;
  /** The solver settings asked for (what the solver then did is an output). */
  solver: { rtol: number; atol: number; maxStep: number; maxSteps?: number };
  /** A spin-up run: the stored run it started from and the end state taken from it. */
  initialState?: RunDoc['initialState'];
}

export function runInputs(run: RunDoc): RunInputs {
  return {
    model: run.model,
    scenario: run.scenario,
    modelDigest: run.modelDigest,
    scenarioDigest: run.scenarioDigest,
    engine: run.engine,
    solver: { rtol: run.solver.rtol, atol: run.solver.atol, maxStep: run.solver.maxStep, maxSteps: run.solver.maxSteps },
    // Only when there is one, so the records of runs from the model's own start keep their digests.
    ...(run.initialState ? { initialState: run.initialState } : {})
  };
}

export function outputsDigest(run: RunDoc): string {
  return digestOf({
    status: run.status,
    error: run.error,
    start: run.start,
    times: run.times,
    units: run.units,
    series: run.series,
    closure: run.closure,
    budget: run.budget,
    solver: run.solver,
    warnings: run.warnings
  });
}

export function recordDigest(run: RunDoc): string {
  return digestOf({ inputs: runInputs(run), outputs: outputsDigest(run) });
}
