/**
 * The project's own explicit Runge–Kutta solver: the Dormand–Prince 5(4) pair (Dormand &
 * Prince 1980, "A family of embedded Runge–Kutta formulae", J. Comput. Appl. Math. 6,
 * 19–26, Table 2), with
 * - local extrapolation (the 5th-order solution is propagated) and FSAL (the last stage of
 *   a step is the first of the next);
 * - the error norm, the PI step-size control with β = 0.04 and the first-step guess of
 *   Hairer, Nørsett & Wanner (1993), Solving ODEs I, Sect. II.4 (eq. 4.11, 4.13) and IV.2
 *   (eq. 2.43c), as in their DOPRI5 code;
 * - the 4th-order continuous extension of Shampine (1986, Math. Comp. 46, 135–150) in the
 *   form of Hairer et al. (1993), Sect. II.6, eq. (6.12) with DOPRI5's coefficients d_i,
 *   computed only for the components the caller reads.
 *
 * It meets the SegmentSolver contract like the odex wrapper, which stays the reference the
 * tests compare it with (test/engine/dopri5.test.ts). Method name in documents: `dp54`.
 *
 * Quadratures (options.quadratureFrom): f does not read those components, so their stage
 * values are never formed; only their end-of-step values and dense output are. The error norm
 * is the root mean square over the components whose absolute tolerance is below 1e100 (the
 * engine leaves its accumulators out of step-size control with a tolerance of 1e300), so it
 * is Hairer et al.'s norm over the states alone.
 *
 * Guards: a stage with a non-finite derivative makes the step's error infinite, so the
 * step is rejected and shortened (never accepted); after NON_FINITE_LIMIT such rejections
 * in a row the segment gives up with NonFiniteError. A step below 16 ulp of t gives
 * StepUnderflowError.
 */
import { NonFiniteError, NON_FINITE_LIMIT } from './odex-segment';
import { StepUnderflowError } from './rosenbrock';
import type { OdeSystem, OutputCallback, SegmentOptions, SegmentResult, SegmentSolver } from './types';

// Nodes and coefficients, Dormand & Prince (1980), Table 2 (RK5(4)7M).
const C2 = 1 / 5, C3 = 3 / 10, C4 = 4 / 5, C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
// 5th-order weights (= the 7th stage's row: FSAL).
const A71 = 35 / 384, A73 = 500 / 1113, A74 = 125 / 192, A75 = -2187 / 6784, A76 = 11 / 84;
// Error weights: 5th-order minus 4th-order weights (b - b̂).
const E1 = 71 / 57600, E3 = -71 / 16695, E4 = 71 / 1920, E5 = -17253 / 339200, E6 = 22 / 525, E7 = -1 / 40;
// Dense output, Hairer et al. (1993) Sect. II.6 / DOPRI5 (Shampine 1986).
const D1 = -12715105075 / 11282082432, D3 = 87487479700 / 32700410799, D4 = -10690763975 / 1880347072;
const D5 = 701980252875 / 199316789632, D6 = -1453857185 / 822651844, D7 = 69997945 / 29380423;

/** The exported coefficients, for the tests that check the pair's order conditions. */
export const DOPRI5_TABLEAU = {
  c: [0, C2, C3, C4, C5, 1, 1],
  a: [
    [],
    [A21],
    [A31, A32],
    [A41, A42, A43],
    [A51, A52, A53, A54],
    [A61, A62, A63, A64, A65],
    [A71, 0, A73, A74, A75, A76]
  ],
  b: [A71, 0, A73, A74, A75, A76, 0],
  e: [E1, 0, E3, E4, E5, E6, E7],
  d: [D1, 0, D3, D4, D5, D6, D7]
} as const;

// Step-size control, Hairer et al. (1993) DOPRI5 defaults.
const SAFE = 0.9;
const FAC_MIN = 0.2; // h_new >= 0.2 h
const FAC_MAX = 10; // h_new <= 10 h
const BETA = 0.04;
const EXPO = 0.2 - BETA * 0.75;

export const dopri5Segment: SegmentSolver = (
  sys: OdeSystem,
  t0: number,
  y0: Float64Array,
  t1: number,
  outputTimes: ArrayLike<number>,
  onOutput: OutputCallback,
  options: SegmentOptions
): SegmentResult => {
  const n = sys.n;
  const rtol = options.rtol;
  const atol = typeof options.atol === 'number' ? new Float64Array(n).fill(options.atol) : options.atol;
  // Components with stage values (f may read them) and components under error control.
  const nq = Math.max(0, Math.min(n, options.quadratureFrom ?? n));
  const ctrlList: number[] = [];
  for (let i = 0; i < n; i++) if (atol[i] < 1e100) ctrlList.push(i);
  const ctrl = Int32Array.from(ctrlList);
  const nc = ctrl.length;
  const hmax = Math.min(options.maxStep, t1 - t0);
  const comps = options.denseComponents && options.denseComponents.length < n ? Int32Array.from(options.denseComponents) : null;
  const collapse = options.collapse;

  const y = Float64Array.from(y0);
  const y1 = new Float64Array(n);
  // Stage values; quadrature components keep y0's values (f does not read them).
  const ys = Float64Array.from(y0);
  const k1 = new Float64Array(n);
  const k2 = new Float64Array(n);
  const k3 = new Float64Array(n);
  const k4 = new Float64Array(n);
  const k5 = new Float64Array(n);
  const k6 = new Float64Array(n);
  const k7 = new Float64Array(n);
  const yOut = new Float64Array(n);
  // Continuous extension coefficients of the last accepted step.
  const r1 = new Float64Array(n);
  const r2 = new Float64Array(n);
  const r3 = new Float64Array(n);
  const r4 = new Float64Array(n);
  const r5 = new Float64Array(n);

  let evaluations = 0;
  /** The first evaluation and the first-step guess check every component. */
  const fChecked = (t: number, yy: Float64Array, out: Float64Array): boolean => {
    evaluations++;
    sys.rhs(t, yy, out);
    let z = 0;
    // x * 0 is 0 for finite x and NaN otherwise: one sum tests NaN and both infinities.
    for (let i = 0; i < n; i++) z += out[i] * 0;
    return z === 0;
  };
  // Inside a step the stages are not checked one by one: a non-finite stage reaches the
  // error estimate (every state stage has a non-zero weight in it or feeds a later stage)
  // or the new values, and both are checked once per step.
  const f = (t: number, yy: Float64Array, out: Float64Array): void => {
    evaluations++;
    sys.rhs(t, yy, out);
  };
  const sk = (i: number, a: number, b: number): number => atol[i] + rtol * Math.max(Math.abs(a), Math.abs(b));

  let steps = 0;
  let rejected = 0;
  let t = t0;
  let k = 0;
  while (k < outputTimes.length && outputTimes[k] <= t0) k++;

  const result = (status: SegmentResult['status'], lastStep: number): SegmentResult => ({
    status,
    t,
    y: Float64Array.from(y),
    steps,
    rejected,
    evaluations,
    lastStep
  });

  if (!fChecked(t, y, k1)) throw new NonFiniteError(t, Float64Array.from(y), { steps, rejected, evaluations });

  // First step: the caller's, or Hairer et al.'s guess (1993, Sect. II.4).
  let h: number;
  if (options.initialStep !== undefined && options.initialStep > 0) h = Math.min(options.initialStep, hmax);
  else {
    let dnf = 0;
    let dny = 0;
    for (let q = 0; q < nc; q++) {
      const i = ctrl[q];
      const s = sk(i, y[i], y[i]);
      dnf += (k1[i] / s) ** 2;
      dny += (y[i] / s) ** 2;
    }
    h = dnf <= 1e-10 || dny <= 1e-10 ? 1e-6 : Math.sqrt(dny / dnf) * 0.01;
    h = Math.min(h, hmax);
    for (let i = 0; i < n; i++) ys[i] = y[i] + h * k1[i];
    let der2 = 0;
    if (fChecked(t + h, ys, k2)) {
      for (let q = 0; q < nc; q++) {
        const i = ctrl[q];
        der2 += ((k2[i] - k1[i]) / sk(i, y[i], y[i])) ** 2;
      }
      der2 = Math.sqrt(der2) / h;
    } else der2 = Infinity;
    const der12 = Math.max(Math.abs(der2), Math.sqrt(dnf));
    const h1 = der12 <= 1e-15 ? Math.max(1e-6, h * 1e-3) : Math.pow(0.01 / der12, 0.2);
    h = Math.min(100 * h, h1, hmax);
    if (!(h > 0)) h = Math.min(1e-6, hmax);
  }

  let facOld = 1e-4;
  let lastRejected = false;
  let nonFiniteRun = 0;
  let shortRun = 0;
  let lastStep = h;

  for (;;) {
    if (steps + rejected >= options.maxSteps) return result('maxSteps', lastStep);
    const remaining = t1 - t;
    let last = false;
    // the last step takes what is left, also when a rounding sliver would be left otherwise
    if (h >= remaining * (1 - 1e-12) || remaining - h <= 64 * Number.EPSILON * Math.max(1, Math.abs(t1))) {
      h = remaining;
      last = true;
    }
    if (!last && h < 16 * Number.EPSILON * Math.max(1, Math.abs(t))) throw new StepUnderflowError(t, h, { steps, rejected, evaluations });

    // Stages 2–7.
    for (let i = 0; i < nq; i++) ys[i] = y[i] + h * A21 * k1[i];
    f(t + C2 * h, ys, k2);
    for (let i = 0; i < nq; i++) ys[i] = y[i] + h * (A31 * k1[i] + A32 * k2[i]);
    f(t + C3 * h, ys, k3);
    for (let i = 0; i < nq; i++) ys[i] = y[i] + h * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
    f(t + C4 * h, ys, k4);
    for (let i = 0; i < nq; i++) ys[i] = y[i] + h * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
    f(t + C5 * h, ys, k5);
    for (let i = 0; i < nq; i++) ys[i] = y[i] + h * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
    f(t + h, ys, k6);
    for (let i = 0; i < n; i++) y1[i] = y[i] + h * (A71 * k1[i] + A73 * k3[i] + A74 * k4[i] + A75 * k5[i] + A76 * k6[i]);
    f(t + h, y1, k7);
    // The new values and the last stage (the next step's first, and in the dense output).
    let z = 0;
    for (let i = 0; i < n; i++) z += y1[i] * 0 + k7[i] * 0;
    let err = 0;
    for (let q = 0; q < nc; q++) {
      const i = ctrl[q];
      const e = h * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
      const r = e / (atol[i] + rtol * Math.max(Math.abs(y[i]), Math.abs(y1[i])));
      err += r * r;
    }
    err = nc > 0 ? Math.sqrt(err / nc) : 0;
    const finite = z === 0 && err - err === 0;
    if (!finite) err = Infinity;

    if (!finite) {
      if (++nonFiniteRun >= NON_FINITE_LIMIT) throw new NonFiniteError(t, Float64Array.from(y), { steps, rejected, evaluations });
    } else nonFiniteRun = 0;

    if (err <= 1) {
      // Accepted.
      const fac11 = Math.pow(err, EXPO);
      let fac = fac11 / Math.pow(facOld, BETA);
      fac = Math.max(1 / FAC_MAX, Math.min(1 / FAC_MIN, fac / SAFE));
      let hNew = h / fac;
      facOld = Math.max(err, 1e-4);
      steps++;
      lastStep = h;
      const tNew = last ? t1 : t + h;
      // Output times in (t, tNew]: interpolate with the continuous extension.
      if (k < outputTimes.length && outputTimes[k] <= tNew) {
        const idx = comps ?? null;
        const m = idx ? idx.length : n;
        for (let q = 0; q < m; q++) {
          const i = idx ? idx[q] : q;
          const dy = y1[i] - y[i];
          const bspl = h * k1[i] - dy;
          r1[i] = y[i];
          r2[i] = dy;
          r3[i] = bspl;
          r4[i] = dy - h * k7[i] - bspl;
          r5[i] = h * (D1 * k1[i] + D3 * k3[i] + D4 * k4[i] + D5 * k5[i] + D6 * k6[i] + D7 * k7[i]);
        }
        while (k < outputTimes.length && outputTimes[k] <= tNew) {
          const tk = outputTimes[k];
          if (tk === tNew) yOut.set(y1);
          else {
            const s = (tk - t) / h;
            const s1 = 1 - s;
            for (let q = 0; q < m; q++) {
              const i = idx ? idx[q] : q;
              yOut[i] = r1[i] + s * (r2[i] + s1 * (r3[i] + s * (r4[i] + s1 * r5[i])));
            }
          }
          k++;
          if (onOutput(tk, yOut) === false) {
            t = tNew;
            y.set(y1);
            return result('stopped', lastStep);
          }
        }
      }
      t = tNew;
      y.set(y1);
      k1.set(k7);
      if (last) return result('ok', lastStep);
      if (collapse) {
        shortRun = h < collapse.minStep ? shortRun + 1 : 0;
        if (shortRun >= collapse.window) return result('collapsed', lastStep);
      }
      if (lastRejected) hNew = Math.min(hNew, h);
      lastRejected = false;
      h = Math.min(hNew, hmax);
    } else {
      // Rejected: shrink (by the largest factor for a non-finite stage).
      rejected++;
      lastRejected = true;
      h = err === Infinity ? h * FAC_MIN : h / Math.min(1 / FAC_MIN, Math.pow(err, EXPO) / SAFE);
    }
  }
};
