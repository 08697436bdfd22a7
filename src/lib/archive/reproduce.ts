/**
 * Reproduce an archived run from its stored inputs and compare: bitwise identical when the
 * engine version and the runtime match; otherwise the series must agree within 10 × rtol
 * (relative to each series' largest magnitude), and the report says what differed.
 */
import { simulate, type SimulateOptions } from '../engine/simulate';
import { digestOf } from '../engine/document/digest';
import type { RunDoc } from '../engine/document/types';
import type { Bundle } from './bundle';

export interface Reproduction {
  identical: boolean;
  /** Within 10 × rtol where not identical. */
  withinTolerance: boolean;
  tolerance: number;
  differences: string[];
  /** The fresh run. */
  run: RunDoc | null;
}

export function reproduceRun(bundle: Bundle, runId: string, runtime: { engine: string; options?: SimulateOptions }): Reproduction {
  const original = bundle.runs.find((r) => r.id === runId);
  const fail = (msg: string): Reproduction => ({ identical: false, withinTolerance: false, tolerance: 0, differences: [msg], run: null });
  if (!original) return fail(`no run '${runId}' in the bundle (runs: ${bundle.runs.map((r) => r.id).join(', ') || 'none'})`);
  const model = bundle.models.find((m) => digestOf(m) === original.modelDigest);
  const scenario = bundle.scenarios.find((s) => digestOf(s) === original.scenarioDigest);
  if (!model) return fail(`the model the run used (${original.modelDigest}) is not in the bundle`);
  if (!scenario) return fail(`the scenario the run used (${original.scenarioDigest}) is not in the bundle`);
  // A spin-up run carries the end state it started from, so it reruns without that run.
  const initial = original.initialState?.values;
  const fresh = simulate(model, scenario, initial ? { ...runtime.options, initial } : runtime.options);
  return compareReproduction(original, fresh);
}

/**
 * A fresh run against the archived one: identical (bitwise, NaN equal to NaN) or within
 * 10 × the archived run's rtol of each series' range, with every difference in words
 * (engine version, status, output times, series, closure).
 */
export function compareReproduction(original: RunDoc, fresh: RunDoc): Reproduction {
  const tolerance = 10 * original.solver.rtol;
  const differences: string[] = [];
  if (original.engine !== fresh.engine) differences.push(`engine version: archived ${original.engine}, now ${fresh.engine}`);
  if (original.status !== fresh.status) differences.push(`status: archived ${original.status}, now ${fresh.status}`);
  if (original.times.length !== fresh.times.length) differences.push(`output times: archived ${original.times.length}, now ${fresh.times.length}`);
  let identical = differences.length === 0;
  let within = original.status === fresh.status && original.times.length === fresh.times.length;
  for (const id of Object.keys(original.series)) {
    const a = original.series[id];
    const b = fresh.series[id];
    if (!b) {
      differences.push(`series ${id}: missing in the new run`);
      identical = within = false;
      continue;
    }
    let maxAbs = 0;
    let scale = 0;
    let firstDiff = -1;
    for (let k = 0; k < a.length; k++) {
      scale = Math.max(scale, Math.abs(a[k]));
      const d = Math.abs(a[k] - b[k]);
      if (!(a[k] === b[k] || (Number.isNaN(a[k]) && Number.isNaN(b[k])))) {
        if (firstDiff < 0) firstDiff = k;
        if (d > maxAbs || Number.isNaN(d)) maxAbs = d;
      }
    }
    if (firstDiff >= 0) {
      identical = false;
      const rel = scale > 0 ? maxAbs / scale : maxAbs;
      if (!(rel <= tolerance)) within = false;
      differences.push(`series ${id}: differs from day ${original.times[firstDiff]} on, largest difference ${maxAbs.toExponential(3)} (${rel.toExponential(2)} of its range; tolerance ${tolerance.toExponential(1)})`);
    }
  }
  if (original.closure.ok !== fresh.closure.ok) {
    identical = within = false;
    differences.push(`closure: archived ${original.closure.ok ? 'closed' : 'not closed'}, now ${fresh.closure.ok ? 'closed' : 'not closed'}`);
  }
  return { identical, withinTolerance: identical || within, tolerance, differences, run: fresh };
}

