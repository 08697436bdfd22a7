/**
 * The contract between the engine and its ODE solvers (odex wrapper, Rosenbrock).
 * A solver integrates one smooth segment [t0, t1]; events and measures split a run
 * into segments elsewhere (solve/segments.ts), so solvers never see a discontinuity.
 */

/** A first-order system y' = f(t, y) of dimension n. */
export interface OdeSystem {
  /** Number of components. */
  readonly n: number;
  /** Writes f(t, y) into `out` (length n). Must not keep references to y or out. */
  rhs(t: number, y: Float64Array, out: Float64Array): void;
  /**
   * Optional analytic Jacobian df/dy, row-major: J[i * n + j] = d f_i / d y_j.
   * Solvers that need one fall back to finite differences when it is absent.
   */
  jacobian?(t: number, y: Float64Array, J: Float64Array): void;
}

/** Settings for one segment. Times in the system's own unit (days for lake models). */
export interface SegmentOptions {
  /** Relative tolerance, per component. */
  rtol: number;
  /** Absolute tolerance, per component (scalar, or one per component). */
  atol: number | Float64Array;
  /** Largest step allowed (> 0). */
  maxStep: number;
  /** Most steps (accepted + rejected) the segment may take before it gives up. */
  maxSteps: number;
  /** First trial step; the solver chooses one when absent. */
  initialStep?: number;
  /**
   * Components the caller needs interpolated at output times (default: all).
   * Solvers may interpolate more; they must interpolate at least these.
   */
  denseComponents?: number[];
  /**
   * Step-collapse detector for method `auto`: when set, the solver stops early with
   * status `collapsed` once this many consecutive accepted steps were each shorter than
   * `collapse.minStep` (the signature of stiffness: tiny steps, hardly any rejections).
   */
  collapse?: { minStep: number; window: number };
  /**
   * Components from this index on are quadratures: f does not read them (the engine's flow,
   * import and export accumulators, which integrate rates of the states). A solver may skip
   * their stage values. Default n (none). odex ignores it.
   */
  quadratureFrom?: number;
}

/** Why a segment stopped. */
export type SegmentStatus =
  | 'ok' // reached t1
  | 'maxSteps' // ran out of steps before t1
  | 'collapsed' // stopped by the collapse detector (auto switches method)
  | 'stopped'; // the output callback asked to stop

export interface SegmentResult {
  status: SegmentStatus;
  /** Time reached (t1 when ok). */
  t: number;
  /** State at `t` (a fresh array). */
  y: Float64Array;
  /** Accepted steps. */
  steps: number;
  /** Rejected steps. */
  rejected: number;
  /** Right-hand-side evaluations (Jacobian evaluations not included). */
  evaluations: number;
  /** Last step size tried, for the next segment's first step. */
  lastStep: number;
}

/**
 * Called for each requested output time, in increasing order, with the interpolated
 * state (only `denseComponents` are guaranteed to be filled). The array is reused:
 * copy what you keep. Return false to stop the segment (status `stopped`).
 */
export type OutputCallback = (t: number, y: Float64Array) => boolean | void;

/**
 * One segment solver: integrate `sys` from (t0, y0) to t1 and report the state at every
 * time of `outputTimes` that lies in (t0, t1] (sorted ascending; times outside are ignored).
 */
export type SegmentSolver = (
  sys: OdeSystem,
  t0: number,
  y0: Float64Array,
  t1: number,
  outputTimes: ArrayLike<number>,
  onOutput: OutputCallback,
  options: SegmentOptions
) => SegmentResult;
