import { describe, expect, it } from 'vitest';
import {
  RODAS4,
  rosenbrockSegment,
  StepUnderflowError
} from '../../../src/lib/engine/solve/rosenbrock';
import type { OdeSystem, SegmentOptions } from '../../../src/lib/engine/solve/types';

const noOutput = (): void => {};

/** Robertson (1966) kinetics; the standard stiff test of Hairer & Wanner (1996, Sect. IV.1). */
const robertsonRhs = (_t: number, y: Float64Array, out: Float64Array): void => {
  out[0] = -0.04 * y[0] + 1e4 * y[1] * y[2];
  out[2] = 3e7 * y[1] * y[1];
  out[1] = 0.04 * y[0] - 1e4 * y[1] * y[2] - 3e7 * y[1] * y[1];
};
const robertsonJacobian = (_t: number, y: Float64Array, jac: Float64Array): void => {
  jac[0] = -0.04;
  jac[1] = 1e4 * y[2];
  jac[2] = 1e4 * y[1];
  jac[3] = 0.04;
  jac[4] = -1e4 * y[2] - 6e7 * y[1];
  jac[5] = -1e4 * y[1];
  jac[6] = 0;
  jac[7] = 6e7 * y[1];
  jac[8] = 0;
};

/**
 * Reference values: check-values.md sect. 9 (SciPy Radau at rtol 1e-12, atol 1e-16; agreeing
 * with Hairer & Wanner 1996 as printed there).
 */
const robertsonReference: [number, [number, number, number]][] = [
  [40, [7.158270687194e-1, 9.185534764558e-6, 2.841637457458e-1]],
  [400, [4.505186684712e-1, 3.222901441675e-6, 5.494781086274e-1]],
  [4000, [1.832022577770e-1, 8.942371252781e-7, 8.167968479859e-1]]
];

/** Bateman (1910) chain A → B → C (check-values.md sect. 6.4), as a compartment model. */
function batemanChain(kA: number, kB: number, analyticJacobian: boolean): OdeSystem {
  return {
    n: 3,
    rhs(_t, y, out) {
      out[0] = -kA * y[0];
      out[1] = kA * y[0] - kB * y[1];
      out[2] = kB * y[1];
    },
    jacobian: analyticJacobian
      ? (_t, _y, jac) => {
          jac.set([-kA, 0, 0, kA, -kB, 0, 0, kB, 0]);
        }
      : undefined
  };
}

/** Step-end and dense-output errors with a fixed step h (tolerances too loose to reject). */
function fixedStepOptions(h: number): SegmentOptions {
  return { rtol: 1e6, atol: 1e6, maxStep: h, initialStep: h, maxSteps: 100_000 };
}

describe('RODAS4 coefficients', () => {
  // Back from the transformed variables (Hairer & Wanner 1996, Sect. IV.7): with C the
  // strictly lower c_ij, Γ^-1 = I/γ − C, α = a·Γ and b^T = m^T·Γ.
  const s = 6;
  const g = RODAS4.gamma;
  const gammaInv = Array.from({ length: s }, (_, i) =>
    Array.from({ length: s }, (_, j) => (i === j ? 1 / g : j < i ? -RODAS4.c[i][j] : 0))
  );
  const big = Array.from({ length: s }, () => new Array<number>(s).fill(0));
  for (let j = 0; j < s; j++) {
    for (let i = j; i < s; i++) {
      let v = i === j ? 1 : 0;
      for (let k = j; k < i; k++) v -= gammaInv[i][k] * big[k][j];
      big[i][j] = v / gammaInv[i][i];
    }
  }
  const aT = Array.from({ length: s }, (_, i) =>
    Array.from({ length: s }, (_, j) => (j < i ? RODAS4.a[i][j] : 0))
  );
  const alpha = aT.map((row) =>
    Array.from({ length: s }, (_, j) => row.reduce((acc, v, k) => acc + v * big[k][j], 0))
  );
  const weights = (m: readonly number[]): number[] =>
    Array.from({ length: s }, (_, j) => m.reduce((acc, v, k) => acc + v * big[k][j], 0));
  const sum = (f: (i: number) => number): number => {
    let acc = 0;
    for (let i = 0; i < s; i++) acc += f(i);
    return acc;
  };
  const nodes = alpha.map((row) => row.reduce((x, v) => x + v, 0));
  const beta = alpha.map((row, i) => row.map((v, j) => (j < i ? v + big[i][j] : 0)));
  const betaSum = beta.map((row) => row.reduce((x, v) => x + v, 0));

  // Rosenbrock order conditions up to order 4 (Hairer & Wanner 1996, Sect. IV.7, Table 7.1,
  // table number from memory), as residuals.
  const order3 = (b: number[]): number[] => [
    sum((i) => b[i]) - 1,
    sum((i) => b[i] * betaSum[i]) - (0.5 - g),
    sum((i) => b[i] * nodes[i] ** 2) - 1 / 3,
    sum((i) => b[i] * sum((j) => beta[i][j] * betaSum[j])) - (1 / 6 - g + g * g)
  ];
  const order4 = (b: number[]): number[] => [
    sum((i) => b[i] * nodes[i] ** 3) - 1 / 4,
    sum((i) => b[i] * nodes[i] * sum((j) => alpha[i][j] * betaSum[j])) - (1 / 8 - g / 3),
    sum((i) => b[i] * sum((j) => beta[i][j] * nodes[j] ** 2)) - (1 / 12 - g / 3),
    sum((i) => b[i] * sum((j) => beta[i][j] * sum((k) => beta[j][k] * betaSum[k]))) -
      (1 / 24 - g / 2 + 1.5 * g * g - g ** 3)
  ];

  it('RODAS4.a and .c give the stage times alpha and the f_t weights gammaSum', () => {
    for (let i = 0; i < s; i++) {
      expect(nodes[i]).toBeCloseTo(RODAS4.alpha[i], 13);
      expect(sum((j) => big[i][j])).toBeCloseTo(RODAS4.gammaSum[i], 13);
    }
  });

  it('RODAS4.m satisfies the order conditions up to order 4', () => {
    for (const r of [...order3(weights(RODAS4.m)), ...order4(weights(RODAS4.m))]) {
      expect(Math.abs(r)).toBeLessThan(1e-13);
    }
  });

  it('RODAS4.mHat is of order 3 exactly (not 4), as an error estimator must be', () => {
    const bHat = weights(RODAS4.mHat);
    for (const r of order3(bHat)) expect(Math.abs(r)).toBeLessThan(1e-13);
    expect(Math.max(...order4(bHat).map(Math.abs))).toBeGreaterThan(1e-3);
  });
});

describe('rosenbrockSegment on Robertson kinetics', () => {
  const options: SegmentOptions = { rtol: 1e-8, atol: 1e-14, maxStep: 1e6, maxSteps: 100_000 };
  const cases = [
    { name: 'analytic Jacobian', sys: { n: 3, rhs: robertsonRhs, jacobian: robertsonJacobian } },
    { name: 'finite-difference Jacobian', sys: { n: 3, rhs: robertsonRhs } }
  ];

  for (const { name, sys } of cases) {
    it(`rosenbrockSegment(robertson, ${name}) matches the reference at t = 40, 400, 4000`, () => {
      const seen = new Map<number, Float64Array>();
      const times = robertsonReference.map(([t]) => t);
      const r = rosenbrockSegment(sys, 0, new Float64Array([1, 0, 0]), 4000, times, (t, y) => {
        seen.set(t, Float64Array.from(y));
      }, options);
      expect(r.status).toBe('ok');
      expect(r.t).toBe(4000);
      // A sanity bound on work, not a timing: stiff methods need a few hundred steps here.
      expect(r.steps).toBeLessThan(5000);
      expect([...seen.keys()]).toEqual(times);
      for (const [t, ref] of robertsonReference) {
        const y = t === 4000 ? r.y : seen.get(t)!;
        expect(Math.abs(y[0] - ref[0]) / ref[0]).toBeLessThan(1e-6);
        expect(Math.abs(y[1] - ref[1]) / ref[1]).toBeLessThan(1e-4);
        expect(Math.abs(y[2] - ref[2]) / ref[2]).toBeLessThan(1e-6);
      }
    });

    it(`rosenbrockSegment(robertson, ${name}) keeps y1 + y2 + y3 = 1 to round-off`, () => {
      // Linear invariants survive Rosenbrock steps (Hairer, Lubich & Wanner 2006, GNI Ch. IV;
      // check-values.md sect. 7.3), at step ends and in the dense output alike.
      const sums: number[] = [];
      const times = Array.from({ length: 50 }, (_, i) => 10 ** (-4 + (i * 7.6) / 49));
      const r = rosenbrockSegment(sys, 0, new Float64Array([1, 0, 0]), 4000, times, (_t, y) => {
        sums.push(y[0] + y[1] + y[2]);
      }, options);
      sums.push(r.y[0] + r.y[1] + r.y[2]);
      expect(sums.length).toBe(times.filter((t) => t <= 4000).length + 1);
      for (const total of sums) expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    });
  }

  it('rosenbrockSegment(robertson) with maxSteps 20 stops with status maxSteps before t1', () => {
    const sys: OdeSystem = { n: 3, rhs: robertsonRhs };
    const y0 = new Float64Array([1, 0, 0]);
    const r = rosenbrockSegment(sys, 0, y0, 4000, [], noOutput, { ...options, maxSteps: 20 });
    expect(r.status).toBe('maxSteps');
    expect(r.steps + r.rejected).toBe(20);
    expect(r.t).toBeGreaterThan(0);
    expect(r.t).toBeLessThan(4000);
    expect(r.y.every(Number.isFinite)).toBe(true);
  });
});

describe('rosenbrockSegment on linear problems with exact solutions', () => {
  // check-values.md sect. 6.4, A0 = 1, B0 = C0 = 0.
  const table: [number, number, number, [number, number, number]][] = [
    [1, 0.5, 0.5, [0.606530659713, 0.344540246718, 0.04892909357]],
    [1, 0.5, 1, [0.367879441171, 0.477302437082, 0.154818121746]],
    [1, 0.5, 2, [0.135335283237, 0.46508831587, 0.399576400894]],
    [1, 0.5, 5, [0.006737946999, 0.15069410325, 0.842567949751]],
    [1, 0.5, 10, [0.00004539993, 0.013385094139, 0.986569505932]],
    [0.3, 2, 5, [0.223130160148, 0.039367898862, 0.737501940989]]
  ];
  const options: SegmentOptions = { rtol: 1e-10, atol: 1e-13, maxStep: 100, maxSteps: 100_000 };

  for (const analytic of [true, false]) {
    const jacobian = analytic ? 'analytic' : 'FD';
    it(`rosenbrockSegment(bateman, ${jacobian} Jacobian) matches check-values 6.4`, () => {
      for (const [kA, kB, t, ref] of table) {
        let got: Float64Array | undefined;
        const keep = (_t: number, y: Float64Array): void => {
          got = Float64Array.from(y);
        };
        // The output lies strictly inside [0, 12], so it comes from the dense output.
        const sys = batemanChain(kA, kB, analytic);
        rosenbrockSegment(sys, 0, new Float64Array([1, 0, 0]), 12, [t], keep, options);
        expect(got).toBeDefined();
        for (let i = 0; i < 3; i++) expect(Math.abs(got![i] - ref[i])).toBeLessThan(1e-9);
      }
    });
  }

  it('rosenbrockSegment(prothero-robinson) follows y = cos t at steps and between them', () => {
    // y' = -1000 (y - cos t) - sin t, y(0) = 1, exact y = cos t (Prothero & Robinson 1974, from
    // memory). Non-autonomous: exercises the f_t terms.
    const lambda = 1000;
    const sys: OdeSystem = {
      n: 1,
      rhs: (t, y, out) => {
        out[0] = -lambda * (y[0] - Math.cos(t)) - Math.sin(t);
      }
    };
    const grid = Array.from({ length: 2000 }, (_, i) => (i + 1) * 1e-3);
    let worst = 0;
    let count = 0;
    const r = rosenbrockSegment(sys, 0, new Float64Array([1]), 2, grid, (t, y) => {
      count++;
      worst = Math.max(worst, Math.abs(y[0] - Math.cos(t)));
    }, { rtol: 1e-8, atol: 1e-10, maxStep: 10, maxSteps: 100_000 });
    expect(r.status).toBe('ok');
    expect(count).toBe(grid.length);
    // More outputs than steps: by pigeonhole most outputs fall strictly inside a step.
    expect(r.steps).toBeLessThan(grid.length);
    expect(Math.abs(r.y[0] - Math.cos(2))).toBeLessThan(1e-8);
    // Global error of a few tens of rtol is the usual allowance (common practice).
    expect(worst).toBeLessThan(1e-7);
  });
});

describe('rosenbrockSegment convergence order with fixed steps', () => {
  // Smooth non-stiff problems with exact solutions: y' = y cos t, y = exp(sin t) (non-autonomous,
  // common practice) and the logistic N' = N (1 - N/10), N(0) = 1 (check-values.md sect. 6.3).
  const problems: { name: string; sys: OdeSystem; exact: (t: number) => number }[] = [
    {
      name: "y' = y cos t",
      sys: {
        n: 1,
        rhs: (t, y, out) => {
          out[0] = y[0] * Math.cos(t);
        },
        jacobian: (t, _y, jac) => {
          jac[0] = Math.cos(t);
        }
      },
      exact: (t) => Math.exp(Math.sin(t))
    },
    {
      name: 'logistic',
      sys: {
        n: 1,
        rhs: (_t, y, out) => {
          out[0] = y[0] * (1 - y[0] / 10);
        },
        jacobian: (_t, y, jac) => {
          jac[0] = 1 - y[0] / 5;
        }
      },
      exact: (t) => 10 / (1 + 9 * Math.exp(-t))
    }
  ];
  const tEnd = 4;
  const steps = [0.2, 0.1, 0.05];

  for (const { name, sys, exact } of problems) {
    it(`rosenbrockSegment(${name}) converges with order ~4 at step ends and in dense output`, () => {
      const knotErrors: number[] = [];
      const denseErrors: number[] = [];
      for (const h of steps) {
        // Knots at multiples of 0.4 are step ends for every h; 0.3 h and 0.7 h into each step
        // are inside steps.
        const knots = Array.from({ length: 10 }, (_, i) => (i + 1) * 0.4);
        let knotErr = 0;
        const r = rosenbrockSegment(sys, 0, new Float64Array([1]), tEnd, knots, (t, y) => {
          knotErr = Math.max(knotErr, Math.abs(y[0] - exact(t)));
        }, fixedStepOptions(h));
        expect(r.steps).toBe(Math.round(tEnd / h));
        expect(r.rejected).toBe(0);
        const inside: number[] = [];
        for (let k = 0; k < Math.round(tEnd / h); k++) inside.push((k + 0.3) * h, (k + 0.7) * h);
        let denseErr = 0;
        rosenbrockSegment(sys, 0, new Float64Array([1]), tEnd, inside, (t, y) => {
          denseErr = Math.max(denseErr, Math.abs(y[0] - exact(t)));
        }, fixedStepOptions(h));
        knotErrors.push(knotErr);
        denseErrors.push(denseErr);
      }
      for (let k = 1; k < steps.length; k++) {
        // Order 4 at step ends (Hairer & Wanner 1996, Sect. IV.7); the dense output is of
        // order 3, so its local error, and here its observed global error, shrink at least
        // like h^3.
        expect(Math.log2(knotErrors[k - 1] / knotErrors[k])).toBeGreaterThan(3.5);
        expect(Math.log2(denseErrors[k - 1] / denseErrors[k])).toBeGreaterThan(3);
      }
    });
  }
});

describe('rosenbrockSegment step control and callbacks', () => {
  it('rosenbrockSegment rejects and shrinks a trial that leaves the domain (NaN)', () => {
    // y' = -sqrt(y), y(0) = 1, exact y = (1 - t/2)^2 (separable, common practice); sqrt of a
    // negative trial value is NaN. A first step over the whole interval overshoots below zero.
    let negativeCalls = 0;
    const sys: OdeSystem = {
      n: 1,
      rhs: (_t, y, out) => {
        if (y[0] < 0) negativeCalls++;
        out[0] = -Math.sqrt(y[0]);
      }
    };
    const outputs: number[] = [];
    const r = rosenbrockSegment(sys, 0, new Float64Array([1]), 1.9, [0.5, 1, 1.5, 1.9], (_t, y) => {
      outputs.push(y[0]);
    }, { rtol: 1e-8, atol: 1e-10, maxStep: 10, initialStep: 1.9, maxSteps: 10_000 });
    expect(negativeCalls).toBeGreaterThan(0);
    expect(r.rejected).toBeGreaterThan(0);
    expect(r.status).toBe('ok');
    expect(outputs.length).toBe(4);
    expect(outputs.every(Number.isFinite)).toBe(true);
    expect(Math.abs(r.y[0] - 0.0025) / 0.0025).toBeLessThan(1e-6);
  });

  it('rosenbrockSegment throws StepUnderflowError when every trial is non-finite', () => {
    const sys: OdeSystem = {
      n: 2,
      rhs: (_t, _y, out) => {
        out[0] = NaN;
        out[1] = 1;
      }
    };
    let caught: unknown;
    try {
      rosenbrockSegment(sys, 0, new Float64Array([1, 1]), 1, [], noOutput, {
        rtol: 1e-6,
        atol: 1e-9,
        maxStep: 1,
        maxSteps: 10_000
      });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(StepUnderflowError);
    expect((caught as StepUnderflowError).code).toBe('step_underflow');
    expect((caught as StepUnderflowError).t).toBe(0);
  });

  it('rosenbrockSegment honours maxStep even when the error would allow longer steps', () => {
    // y' = 1 is integrated exactly, so only maxStep limits the step.
    const sys: OdeSystem = {
      n: 1,
      rhs: (_t, _y, out) => {
        out[0] = 1;
      }
    };
    const r = rosenbrockSegment(sys, 0, new Float64Array([0]), 10, [], noOutput, {
      rtol: 1e-6,
      atol: 1e-9,
      maxStep: 0.1,
      maxSteps: 10_000
    });
    expect(r.status).toBe('ok');
    expect(r.steps).toBeGreaterThanOrEqual(100);
    expect(Math.abs(r.y[0] - 10)).toBeLessThan(1e-12);
  });

  it('rosenbrockSegment takes initialStep as its first step', () => {
    const sys = batemanChain(1, 0.5, true);
    const r = rosenbrockSegment(sys, 0, new Float64Array([1, 0, 0]), 10, [], noOutput, {
      rtol: 1e-3,
      atol: 1e-6,
      maxStep: 1,
      initialStep: 0.01,
      maxSteps: 1
    });
    expect(r.status).toBe('maxSteps');
    expect(r.steps).toBe(1);
    expect(r.t).toBe(0.01);
  });

  it('rosenbrockSegment stops when onOutput returns false and reports the state it reached', () => {
    const calls: number[] = [];
    const times = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    const stopAtThird = (t: number): boolean => {
      calls.push(t);
      return calls.length < 3;
    };
    const sys = batemanChain(1, 0.5, true);
    const r = rosenbrockSegment(sys, 0, new Float64Array([1, 0, 0]), 10, times, stopAtThird, {
      rtol: 1e-10,
      atol: 1e-13,
      maxStep: 100,
      maxSteps: 100_000
    });
    expect(r.status).toBe('stopped');
    expect(calls).toEqual([1, 2, 3]);
    // The end of the step that contained t = 3: exact there (check-values.md sect. 6.4 formulas).
    expect(r.t).toBeGreaterThanOrEqual(3);
    expect(r.t).toBeLessThan(4);
    expect(Math.abs(r.y[0] - Math.exp(-r.t))).toBeLessThan(1e-9);
    expect(Math.abs(r.y[1] - 2 * (Math.exp(-0.5 * r.t) - Math.exp(-r.t)))).toBeLessThan(1e-9);
  });

  it('rosenbrockSegment ignores outputs outside (t0, t1] and fills only denseComponents', () => {
    const seen: [number, number, number, number][] = [];
    // Restarted at t = 1 from the check-values.md sect. 6.4 state there.
    const y1 = new Float64Array([0.367879441171, 0.477302437082, 0.154818121746]);
    const keep = (t: number, y: Float64Array): void => {
      seen.push([t, y[0], y[1], y[2]]);
    };
    const r = rosenbrockSegment(batemanChain(1, 0.5, true), 1, y1, 5, [0, 1, 2, 5, 6], keep, {
      rtol: 1e-10,
      atol: 1e-13,
      maxStep: 100,
      maxSteps: 100_000,
      denseComponents: [1]
    });
    expect(r.status).toBe('ok');
    expect(seen.map(([t]) => t)).toEqual([2, 5]);
    // check-values.md sect. 6.4: B(2) and B(5) for kA = 1, kB = 0.5.
    expect(Math.abs(seen[0][2] - 0.46508831587)).toBeLessThan(1e-9);
    expect(Math.abs(seen[1][2] - 0.15069410325)).toBeLessThan(1e-9);
    for (const [, a, , c] of seen) {
      expect(a).toBeNaN();
      expect(c).toBeNaN();
    }
    // The returned state is complete.
    expect(Math.abs(r.y[0] - 0.006737946999)).toBeLessThan(1e-9);
  });
});
