/**
 * The stiff segment solver: the Rosenbrock method RODAS4 of Hairer & Wanner, order 4 with an
 * embedded order-3 solution for step-size control and an order-3 dense output
 * (Hairer & Wanner 1996, Solving ODEs II, 2nd ed., Sect. IV.7; coefficients of their
 * Fortran code RODAS, version of 18 Sept. 1995, subroutine ROCOE with METH = 1).
 *
 * Each step solves six linear systems with the one matrix E = I/(h·γ) − J, J = df/dy at the
 * step's start: linearly implicit, so no Newton iteration. The method is L-stable and stiffly
 * accurate, and keeps linear invariants (mass in a closed compartment model) to round-off.
 *
 * Known limit of the dense output: its order 3 holds for non-stiff components. On stiff
 * components that follow a slowly moving quasi-steady state (Prothero–Robinson type) the
 * step-end values stay accurate while the interpolant between them can be far worse, because
 * the step-size control only sees step ends; measured on y' = −λ(y − cos t) − sin t, rtol
 * 1e-6: λ = 1e3 gives 4e-6 at step ends and 6e-5 between them, λ = 1e6 gives 4e-7 and 0.13
 * (steps near 1). A cubic Hermite interpolant does no better there (f carries λ × the error).
 * Cap `maxStep` to the time scale of the forcing, as the engine does anyway.
 *
 * Contract details (see types.ts):
 * - `evaluations` counts every call of `sys.rhs`: the stages, the start-of-step derivative,
 *   the finite-difference time derivative, the finite-difference Jacobian columns (when
 *   `sys.jacobian` is absent) and the starting-step heuristic. Calls of `sys.jacobian`
 *   are not counted.
 * - A trial step with a singular matrix or any non-finite stage or result is rejected and
 *   shrunk; it is never accepted. When the step falls below 1e-14 of the segment's largest
 *   time (the resolution of a double-precision time), `StepUnderflowError` is thrown.
 * - Status `maxSteps` means only that accepted + rejected steps reached `maxSteps`.
 * - `stopped`: `t` and `y` are the end of the step in which the callback returned false
 *   (as in the odex wrapper), not the output time itself.
 * - Components outside `denseComponents` are NaN in the output array.
 * - `collapse` is for the non-stiff solver and is ignored here.
 * - `lastStep` is the step the controller proposed next (before clipping to t1).
 * - The step that ends a segment may exceed `maxStep` by at most 0.01 % (it is stretched to
 *   t1 rather than leave a sliver, as RODAS does).
 */
import { luDecompose, luSolve } from './linear-algebra';
import type {
  OdeSystem,
  OutputCallback,
  SegmentOptions,
  SegmentResult,
  SegmentSolver
} from './types';

/** A Rosenbrock method in transformed variables; see RODAS4 for the meaning of each field. */
export interface RosenbrockTableau {
  readonly gamma: number;
  readonly alpha: readonly number[];
  readonly gammaSum: readonly number[];
  readonly a: readonly (readonly number[])[];
  readonly c: readonly (readonly number[])[];
  readonly m: readonly number[];
  readonly mHat: readonly number[];
  readonly dense2: readonly number[];
  readonly dense3: readonly number[];
}

/**
 * RODAS4 in Hairer & Wanner's transformed variables u_i = Σ_j γ_ij k_j (Solving ODEs II,
 * Sect. IV.7, eq. (7.4')–(7.5)): stage i solves
 *   E u_i = f(t + α_i h, y + Σ_{j<i} a_ij u_j) + γ_i h f_t + Σ_{j<i} (c_ij / h) u_j.
 * Values copied digit for digit from RODAS's ROCOE (METH = 1). The solution is
 * y1 = y + Σ m_j u_j with m = (a51, a52, a53, a54, 1, 1) (stiffly accurate: the last two
 * stages' arguments are the embedded and the final solution), the embedded order-3 solution
 * drops u6, so u6 is the error estimate. Dense output (RODAS's CONTRO), s = (t − t_n)/h:
 *   y(t) ≈ y_n (1 − s) + s (y_{n+1} + (1 − s)(Σ d2_j u_j + s Σ d3_j u_j)).
 * The test file checks these numbers against the order conditions.
 */
export const RODAS4: RosenbrockTableau = {
  gamma: 0.25,
  /** Stage times α_i as fractions of the step. */
  alpha: [0, 0.386, 0.21, 0.63, 1, 1],
  /** γ_i = Σ_j γ_ij, the weight of h·df/dt in stage i (RODAS's D1..D4; zero for 5 and 6). */
  gammaSum: [0.25, -0.1043, 0.1035, -0.3620000000000023e-1, 0, 0],
  /** a_ij, j < i: stage arguments. Rows 5 and 6 differ only by u5 (stiff accuracy). */
  a: [
    [],
    [0.1544e1],
    [0.9466785280815826, 0.2557011698983284],
    [0.3314825187068521e1, 0.2896124015972201e1, 0.9986419139977817],
    [0.1221224509226641e1, 0.6019134481288629e1, 0.1253708332932087e2, -0.687886036105895],
    [0.1221224509226641e1, 0.6019134481288629e1, 0.1253708332932087e2, -0.687886036105895, 1]
  ],
  /** c_ij, j < i: weights of u_j / h in stage i's right-hand side. */
  c: [
    [],
    [-0.56688e1],
    [-0.2430093356833875e1, -0.2063599157091915],
    [-0.1073529058151375, -0.9594562251023355e1, -0.2047028614809616e2],
    [0.7496443313967647e1, -0.1024680431464352e2, -0.3399990352819905e2, 0.117089089320616e2],
    [
      0.8083246795921522e1, -0.7981132988064893e1, -0.3152159432874371e2, 0.1631930543123136e2,
      -0.6058818238834054e1
    ]
  ],
  /** m_j: the order-4 solution y1 = y + Σ m_j u_j. */
  m: [0.1221224509226641e1, 0.6019134481288629e1, 0.1253708332932087e2, -0.687886036105895, 1, 1],
  /** m̂_j: the embedded order-3 solution. */
  mHat: [
    0.1221224509226641e1, 0.6019134481288629e1, 0.1253708332932087e2, -0.687886036105895, 1, 0
  ],
  /** Dense-output weights (RODAS's D21..D25 and D31..D35). */
  dense2: [
    0.1012623508344586e2, -0.7487995877610167e1, -0.3480091861555747e2, -0.7992771707568823e1,
    0.1025137723295662e1
  ],
  dense3: [
    -0.6762803392801253, 0.6087714651680015e1, 0.1643084320892478e2, 0.2476722511418386e2,
    -0.6594389125716872e1
  ]
};

/**
 * Step-size controller constants, those of RODAS's defaults (Hairer & Wanner 1996, Sect. IV.8
 * and the RODAS documentation): safety factor 0.9, new/old step ratio within [0.2, 6].
 */
const CONTROL = {
  safety: 0.9,
  minRatio: 0.2,
  maxRatio: 6,
  /** Shrink factor after a non-finite or singular trial (our choice: faster than RODAS's 0.5). */
  nonFiniteShrink: 0.25,
  /** A step ending within this fraction of h before t1 is stretched to t1 (as RODAS). */
  stretch: 1e-4,
  /** Smallest step, relative to the segment's largest |time|. */
  underflow: 1e-14
} as const;

const EPS = Number.EPSILON;

/** Thrown when the step size underflows: the solver can make no progress from `t`. */
export class StepUnderflowError extends Error {
  readonly code = 'step_underflow';
  constructor(
    /** Time reached. */
    readonly t: number,
    /** The step size that was too small. */
    readonly h: number,
    /** Work done in the segment before it gave up. */
    readonly stats: { steps: number; rejected: number; evaluations: number } = { steps: 0, rejected: 0, evaluations: 0 }
  ) {
    super(`step size underflow at t = ${t} (h = ${h}): the solver cannot make progress`);
    this.name = 'StepUnderflowError';
  }
}

function allFinite(v: Float64Array, n: number): boolean {
  for (let i = 0; i < n; i++) if (!Number.isFinite(v[i])) return false;
  return true;
}

export const rosenbrockSegment: SegmentSolver = (
  sys: OdeSystem,
  t0: number,
  y0: Float64Array,
  t1: number,
  outputTimes: ArrayLike<number>,
  onOutput: OutputCallback,
  options: SegmentOptions
): SegmentResult => {
  const n = sys.n;
  if (!(t1 >= t0) || !Number.isFinite(t0) || !Number.isFinite(t1)) {
    throw new RangeError(`invalid segment [${t0}, ${t1}]: need finite t0 <= t1`);
  }
  if (y0.length < n) throw new RangeError(`invalid y0: length ${y0.length}, need ${n}`);
  const { rtol, maxStep, maxSteps } = options;
  const atolIn = options.atol;
  const atol = new Float64Array(n);
  if (typeof atolIn === 'number') atol.fill(atolIn);
  else {
    if (atolIn.length < n) throw new RangeError(`invalid atol: length ${atolIn.length}, need ${n}`);
    atol.set(atolIn.subarray(0, n));
  }
  const denseIdx = Int32Array.from(
    options.denseComponents ?? Array.from({ length: n }, (_, i) => i)
  );
  const nDense = denseIdx.length;
  for (const c of denseIdx) {
    if (c < 0 || c >= n) {
      throw new RangeError(`invalid denseComponents: ${c} (components: 0..${n - 1})`);
    }
  }

  // Work arrays, allocated once per call.
  let y = Float64Array.from(y0.subarray(0, n));
  let yNew = new Float64Array(n);
  let yOld = new Float64Array(n);
  const f0 = new Float64Array(n);
  const fx = new Float64Array(n);
  const fTmp = new Float64Array(n);
  const yStage = new Float64Array(n);
  const u1 = new Float64Array(n);
  const u2 = new Float64Array(n);
  const u3 = new Float64Array(n);
  const u4 = new Float64Array(n);
  const u5 = new Float64Array(n);
  const u6 = new Float64Array(n);
  const cont2 = new Float64Array(n);
  const cont3 = new Float64Array(n);
  const yOut = new Float64Array(n).fill(NaN);
  const jac = new Float64Array(n * n);
  const lu = new Float64Array(n * n);
  const pivots = new Int32Array(n);

  let evaluations = 0;
  let steps = 0;
  let rejected = 0;
  const rhs = (t: number, yy: Float64Array, out: Float64Array): void => {
    evaluations++;
    sys.rhs(t, yy, out);
  };

  let t = t0;
  const span = t1 - t0;
  const result = (status: SegmentResult['status'], lastStep: number): SegmentResult => ({
    status,
    t,
    y: Float64Array.from(y),
    steps,
    rejected,
    evaluations,
    lastStep
  });
  if (span === 0) return result('ok', options.initialStep ?? 0);

  let next = 0;
  const nOut = outputTimes.length;
  while (next < nOut && !(outputTimes[next] > t0)) next++;

  const minStep = CONTROL.underflow * Math.max(Math.abs(t0), Math.abs(t1));
  const hMax = Math.min(maxStep, span);

  rhs(t, y, f0);
  let h =
    options.initialStep !== undefined && options.initialStep > 0
      ? Math.min(options.initialStep, hMax)
      : startingStep();

  const {
    gamma,
    alpha: [, al2, al3, al4],
    gammaSum: [g1, g2, g3, g4],
    a: [, [a21], [a31, a32], [a41, a42, a43], [a51, a52, a53, a54]],
    c: [, [c21], [c31, c32], [c41, c42, c43], [c51, c52, c53, c54], [c61, c62, c63, c64, c65]],
    dense2: [d21, d22, d23, d24, d25],
    dense3: [d31, d32, d33, d34, d35]
  } = RODAS4;

  let jacobianCurrent = false;
  let lastRejected = false;
  let hAcc = 0;
  let errAcc = 0;

  for (;;) {
    if (steps + rejected >= maxSteps) return result('maxSteps', h);
    if (h < minStep) throw new StepUnderflowError(t, h, { steps, rejected, evaluations });

    let last = false;
    const remaining = t1 - t;
    if ((1 + CONTROL.stretch) * h >= remaining) {
      // Stretch to t1 rather than leave a sliver (as RODAS); halve the rest instead when that
      // would exceed maxStep by more than the same small fraction.
      if (remaining <= (1 + CONTROL.stretch) * maxStep) {
        h = remaining;
        last = true;
      } else h = 0.5 * remaining;
    }

    if (!jacobianCurrent) {
      computeJacobian();
      jacobianCurrent = true;
    }

    const ok = attemptStep(h);
    const err = ok ? errorNorm() : NaN;
    if (!Number.isFinite(err)) {
      rejected++;
      lastRejected = true;
      h *= CONTROL.nonFiniteShrink;
      continue;
    }

    // Elementary controller, exponent 1/4 = 1/(order of the embedded solution + 1).
    let fac = clamp(Math.pow(err, 0.25) / CONTROL.safety);
    if (err > 1) {
      rejected++;
      lastRejected = true;
      h /= fac;
      continue;
    }

    steps++;
    if (steps > 1) {
      // Predictive controller of Gustafsson (1994, ACM TOMS 20), as in RODAS (Hairer & Wanner
      // 1996, Sect. IV.8): also uses the previous accepted step's error.
      const facPred = clamp(((hAcc / h) * Math.pow((err * err) / errAcc, 0.25)) / CONTROL.safety);
      fac = Math.max(fac, facPred);
    }
    hAcc = h;
    errAcc = Math.max(0.01, err);
    let hNew = Math.min(h / fac, maxStep);
    if (lastRejected) hNew = Math.min(hNew, h);
    lastRejected = false;

    const tOld = t;
    t = last ? t1 : t + h;
    const swap = yOld;
    yOld = y;
    y = yNew;
    yNew = swap;

    if (emitOutputs(tOld, h)) return result('stopped', hNew);
    if (last) return result('ok', hNew);

    h = hNew;
    rhs(t, y, f0);
    jacobianCurrent = false;
  }

  function clamp(fac: number): number {
    return Math.max(1 / CONTROL.maxRatio, Math.min(1 / CONTROL.minRatio, fac));
  }

  /**
   * Starting step of Hairer, Nørsett & Wanner (1993, Solving ODEs I, Sect. II.4, the
   * algorithm for the initial step) with the method's order p = 4, capped by maxStep.
   * Falls back to 1e-6 of the segment when the derivatives are not finite (the step loop
   * then rejects and shrinks).
   */
  function startingStep(): number {
    let d0 = 0;
    let d1 = 0;
    for (let i = 0; i < n; i++) {
      const sc = atol[i] + rtol * Math.abs(y[i]);
      d0 += (y[i] / sc) ** 2;
      d1 += (f0[i] / sc) ** 2;
    }
    d0 = Math.sqrt(d0 / n);
    d1 = Math.sqrt(d1 / n);
    let h0 = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : 0.01 * (d0 / d1);
    h0 = Math.min(h0, hMax);
    for (let i = 0; i < n; i++) yStage[i] = y[i] + h0 * f0[i];
    rhs(t + h0, yStage, fTmp);
    let d2 = 0;
    for (let i = 0; i < n; i++) {
      const sc = atol[i] + rtol * Math.abs(y[i]);
      d2 += ((fTmp[i] - f0[i]) / sc) ** 2;
    }
    d2 = Math.sqrt(d2 / n) / h0;
    const dMax = Math.max(d1, d2);
    const h1 = dMax <= 1e-15 ? Math.max(1e-6, h0 * 1e-3) : Math.pow(0.01 / dMax, 0.25);
    const hStart = Math.min(100 * h0, h1, hMax);
    return Number.isFinite(hStart) && hStart > 0 ? hStart : Math.min(hMax, 1e-6 * span);
  }

  /**
   * J = df/dy at (t, y), analytic when the system has one, else forward differences column by
   * column with RODAS's increment sqrt(eps·max(1e-5, |y_j|)); f_t by a forward difference
   * with increment sqrt(eps·max(1e-5, |t|)) (backward near t1, so that f is never evaluated
   * past the segment, where a discontinuity may lie). Uses f0 = f(t, y).
   */
  function computeJacobian(): void {
    if (sys.jacobian) sys.jacobian(t, y, jac);
    else {
      for (let j = 0; j < n; j++) {
        const yj = y[j];
        y[j] = yj + Math.sqrt(EPS * Math.max(1e-5, Math.abs(yj)));
        // The increment actually represented, not the one asked for.
        const delta = y[j] - yj;
        rhs(t, y, fTmp);
        y[j] = yj;
        for (let i = 0; i < n; i++) jac[i * n + j] = (fTmp[i] - f0[i]) / delta;
      }
    }
    const dt = Math.sqrt(EPS * Math.max(1e-5, Math.abs(t)));
    let tShift = t + dt;
    if (tShift > t1) tShift = t - dt;
    const delta = tShift - t;
    rhs(tShift, y, fTmp);
    for (let i = 0; i < n; i++) fx[i] = (fTmp[i] - f0[i]) / delta;
  }

  /** One RODAS4 trial step of size hh from (t, y) into yNew; false when it went non-finite. */
  function attemptStep(hh: number): boolean {
    const diag = 1 / (hh * gamma);
    for (let k = 0; k < n * n; k++) lu[k] = -jac[k];
    for (let i = 0; i < n; i++) lu[i * n + i] += diag;
    if (!luDecompose(lu, n, pivots)) return false;
    const inv = 1 / hh;

    for (let i = 0; i < n; i++) u1[i] = f0[i] + hh * g1 * fx[i];
    luSolve(lu, n, pivots, u1);
    if (!allFinite(u1, n)) return false;

    for (let i = 0; i < n; i++) yStage[i] = y[i] + a21 * u1[i];
    rhs(t + al2 * hh, yStage, fTmp);
    for (let i = 0; i < n; i++) u2[i] = fTmp[i] + hh * g2 * fx[i] + inv * (c21 * u1[i]);
    luSolve(lu, n, pivots, u2);
    if (!allFinite(u2, n)) return false;

    for (let i = 0; i < n; i++) yStage[i] = y[i] + a31 * u1[i] + a32 * u2[i];
    rhs(t + al3 * hh, yStage, fTmp);
    for (let i = 0; i < n; i++) {
      u3[i] = fTmp[i] + hh * g3 * fx[i] + inv * (c31 * u1[i] + c32 * u2[i]);
    }
    luSolve(lu, n, pivots, u3);
    if (!allFinite(u3, n)) return false;

    for (let i = 0; i < n; i++) yStage[i] = y[i] + a41 * u1[i] + a42 * u2[i] + a43 * u3[i];
    rhs(t + al4 * hh, yStage, fTmp);
    for (let i = 0; i < n; i++) {
      u4[i] = fTmp[i] + hh * g4 * fx[i] + inv * (c41 * u1[i] + c42 * u2[i] + c43 * u3[i]);
    }
    luSolve(lu, n, pivots, u4);
    if (!allFinite(u4, n)) return false;

    // Stages 5 and 6 sit at t + h with γ_5 = γ_6 = 0: no f_t term.
    const tEnd = t + hh;
    for (let i = 0; i < n; i++) {
      yStage[i] = y[i] + a51 * u1[i] + a52 * u2[i] + a53 * u3[i] + a54 * u4[i];
    }
    rhs(tEnd, yStage, fTmp);
    for (let i = 0; i < n; i++) {
      u5[i] = fTmp[i] + inv * (c51 * u1[i] + c52 * u2[i] + c53 * u3[i] + c54 * u4[i]);
    }
    luSolve(lu, n, pivots, u5);
    if (!allFinite(u5, n)) return false;

    for (let i = 0; i < n; i++) yStage[i] += u5[i];
    rhs(tEnd, yStage, fTmp);
    for (let i = 0; i < n; i++) {
      u6[i] =
        fTmp[i] + inv * (c61 * u1[i] + c62 * u2[i] + c63 * u3[i] + c64 * u4[i] + c65 * u5[i]);
    }
    luSolve(lu, n, pivots, u6);
    if (!allFinite(u6, n)) return false;

    for (let i = 0; i < n; i++) yNew[i] = yStage[i] + u6[i];
    return allFinite(yNew, n);
  }

  /** RMS norm of the error estimate u6 scaled by atol + rtol·max(|y0|, |y1|) (Hairer & Wanner). */
  function errorNorm(): number {
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const sc = atol[i] + rtol * Math.max(Math.abs(y[i]), Math.abs(yNew[i]));
      const r = u6[i] / sc;
      sum += r * r;
    }
    return Math.sqrt(sum / n);
  }

  /**
   * Reports every output time in (tOld, t] after an accepted step from yOld to y; true when
   * the callback asked to stop. The dense-output coefficients are formed only when an output
   * falls strictly inside the step.
   */
  function emitOutputs(tOld: number, hh: number): boolean {
    let prepared = false;
    while (next < nOut) {
      const tk = outputTimes[next];
      if (tk > t) return false;
      if (tk === t) {
        for (let q = 0; q < nDense; q++) yOut[denseIdx[q]] = y[denseIdx[q]];
      } else {
        if (!prepared) {
          for (let q = 0; q < nDense; q++) {
            const c = denseIdx[q];
            cont2[c] = d21 * u1[c] + d22 * u2[c] + d23 * u3[c] + d24 * u4[c] + d25 * u5[c];
            cont3[c] = d31 * u1[c] + d32 * u2[c] + d33 * u3[c] + d34 * u4[c] + d35 * u5[c];
          }
          prepared = true;
        }
        const s = (tk - tOld) / hh;
        const s1 = 1 - s;
        for (let q = 0; q < nDense; q++) {
          const c = denseIdx[q];
          yOut[c] = yOld[c] * s1 + s * (y[c] + s1 * (cont2[c] + s * cont3[c]));
        }
      }
      next++;
      if (onOutput(tk, yOut) === false) return true;
    }
    return false;
  }
};
