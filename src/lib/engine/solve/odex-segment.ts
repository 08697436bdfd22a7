/**
 * The non-stiff segment solver: Hairer & Wanner's ODEX extrapolation method through the
 * `odex` package (Hairer, Nørsett & Wanner 1993, Solving ODEs I, Sect. II.9), wrapped to
 * the SegmentSolver contract.
 *
 * Guards the wrapper adds (shared/design/engine-notes.md):
 * - a non-finite derivative is replaced by a huge finite value, so that odex's error test
 *   (`err > 1`, false for NaN) rejects the step and halves it instead of accepting NaN;
 * - the maximum step is always set (odex's default is the whole interval);
 * - `outcome` is checked: running out of steps becomes status `maxSteps`.
 */
import { Solver } from 'odex';
import type { OdeSystem, OutputCallback, SegmentOptions, SegmentResult, SegmentSolver } from './types';

/**
 * Scale of what a non-finite derivative component is replaced by: large enough to fail
 * any error test. The stand-in varies from call to call (a hash of the call count and
 * component), because a constant one would make every stage of a step alike, and
 * extrapolation would then see no error and accept the step.
 */
export const NON_FINITE_STAND_IN = 1e300;

function standIn(call: number, i: number): number {
  const h = (Math.imul(call, 2654435761) ^ Math.imul(i + 1, 40503)) >>> 0;
  return NON_FINITE_STAND_IN * (h / 4294967296 - 0.5 || 0.25);
}

/**
 * Consecutive non-finite evaluations after which the segment gives up: by then odex has
 * halved its step some hundreds of times, so the state itself has no finite derivative.
 */
export const NON_FINITE_LIMIT = 5000;

/** No model quantity reaches this: an accepted value above it came from a stand-in. */
const ABSURD = 1e200;

/** The right-hand side stayed non-finite while the step shrank: the run cannot go on. */
export class NonFiniteError extends Error {
  readonly code = 'non_finite';
  constructor(
    readonly t: number,
    readonly y: Float64Array,
    readonly stats: { steps: number; rejected: number; evaluations: number } = { steps: 0, rejected: 0, evaluations: 0 }
  ) {
    super(`the right-hand side is not finite near t = ${t}, even for the smallest steps`);
    this.name = 'NonFiniteError';
  }
}

/** odex's Outcome enum, as numbers (the package's enum is not type-exported at run time). */
const CONVERGED = 0;
const MAX_STEPS = 1;

export const odexSegment: SegmentSolver = (
  sys: OdeSystem,
  t0: number,
  y0: Float64Array,
  t1: number,
  outputTimes: ArrayLike<number>,
  onOutput: OutputCallback,
  options: SegmentOptions
): SegmentResult => {
  const n = sys.n;
  const yIn = new Float64Array(n);
  const dyOut = new Float64Array(n);
  let evaluations = 0;
  let nonFiniteRun = 0;
  const f = (t: number, y: number[]): number[] => {
    evaluations++;
    for (let i = 0; i < n; i++) yIn[i] = y[i];
    sys.rhs(t, yIn, dyOut);
    const out = new Array<number>(n);
    let bad = false;
    for (let i = 0; i < n; i++) {
      const v = dyOut[i];
      // v - v is 0 for finite v and NaN otherwise: one test for NaN and both infinities.
      if (v - v === 0) out[i] = v;
      else {
        out[i] = standIn(evaluations, i);
        bad = true;
      }
    }
    if (bad) {
      if (++nonFiniteRun >= NON_FINITE_LIMIT) throw new NonFiniteError(t, Float64Array.from(y), { steps: accepted, rejected: 0, evaluations });
    } else nonFiniteRun = 0;
    return out;
  };

  const solver = new Solver(n);
  solver.maxStepSize = options.maxStep;
  solver.maxSteps = options.maxSteps;
  solver.relativeTolerance = options.rtol;
  solver.absoluteTolerance =
    typeof options.atol === 'number' ? options.atol : Array.from(options.atol);
  if (options.initialStep !== undefined && options.initialStep > 0) {
    solver.initialStepSize = Math.min(options.initialStep, options.maxStep);
  }
  solver.denseOutput = true;
  const dense = options.denseComponents ?? null;
  if (dense && dense.length < n) solver.denseComponents = dense;

  // Output times strictly inside (t0, t1]; odex interpolates between accepted steps.
  let k = 0;
  while (k < outputTimes.length && outputTimes[k] <= t0) k++;
  const yOut = new Float64Array(n);
  const comps = dense && dense.length < n ? dense : null;
  let stoppedByCaller = false;
  let lastX = t0;
  let lastStep = options.initialStep ?? 0;
  let accepted = 0;
  const prevY = Float64Array.from(y0);
  let shortRun = 0;
  let collapsed = false;
  const collapse = options.collapse;

  const solOut = (
    nr: number,
    xOld: number,
    x: number,
    y: number[],
    interp?: (c: number, x: number) => number
  ): boolean | void => {
    // An accepted state beyond any physical size means a non-finite stage slipped through;
    // report the last good state.
    for (let i = 0; i < n; i++) {
      const v = y[i];
      if (!(v - v === 0) || Math.abs(v) > ABSURD) throw new NonFiniteError(xOld, Float64Array.from(prevY), { steps: accepted, rejected: 0, evaluations });
    }
    for (let i = 0; i < n; i++) prevY[i] = y[i];
    if (nr > 1) {
      accepted++;
      const h = x - xOld;
      lastStep = h;
      if (collapse) {
        shortRun = h < collapse.minStep ? shortRun + 1 : 0;
      }
    }
    lastX = x;
    while (k < outputTimes.length && outputTimes[k] <= x && outputTimes[k] <= t1) {
      const tk = outputTimes[k];
      if (tk === x || !interp) {
        for (let i = 0; i < n; i++) yOut[i] = y[i];
      } else if (comps) {
        for (const c of comps) yOut[c] = interp(c, tk);
      } else {
        for (let i = 0; i < n; i++) yOut[i] = interp(i, tk);
      }
      k++;
      if (onOutput(tk, yOut) === false) {
        stoppedByCaller = true;
        return false;
      }
    }
    if (collapse && shortRun >= collapse.window) {
      collapsed = true;
      return false;
    }
  };

  const result = solver.solve(f, t0, Array.from(y0), t1, solOut);
  const y = Float64Array.from(result.y);
  const base = {
    y,
    steps: result.nAccept,
    rejected: result.nReject,
    evaluations,
    lastStep
  };
  if (result.outcome === CONVERGED) return { status: 'ok', t: t1, ...base };
  if (result.outcome === MAX_STEPS) return { status: 'maxSteps', t: lastX, ...base };
  return { status: stoppedByCaller ? 'stopped' : collapsed ? 'collapsed' : 'stopped', t: lastX, ...base };
};
