/**
 * Latin hypercube sampling (McKay, Beckman & Conover 1979) and the inverse CDFs of the
 * range distributions. Quantiles are computed by hand from the CDFs written here (from
 * memory: uniform F = (x − a)/(b − a); log-uniform F = ln(x/a)/ln(b/a); triangular
 * F = (x − a)²/((b − a)(c − a)) on [a, c], 1 − (b − x)²/((b − a)(b − c)) on [c, b]).
 */
import { describe, expect, it } from 'vitest';
import { latinHypercube, sampleModel } from '../../../src/lib/engine/uncertainty/lhs';
import { logUniformQuantile, triangularQuantile, uniformQuantile } from '../../../src/lib/engine/uncertainty/distributions';
import { UncertaintyInputError } from '../../../src/lib/engine/uncertainty/errors';
import { mulberry32 } from '../../../src/lib/engine/balance/identity';
import type { ModelDoc } from '../../../src/lib/engine/index';

// CDFs written independently of the code under test, for the stratum check
const cdf = {
  uniform: (x: number, a: number, b: number) => (x - a) / (b - a),
  loguniform: (x: number, a: number, b: number) => Math.log(x / a) / Math.log(b / a),
  triangular: (x: number, a: number, b: number, c: number) => (x <= c ? ((x - a) ** 2) / ((b - a) * (c - a)) : 1 - ((b - x) ** 2) / ((b - a) * (b - c)))
};

const model: ModelDoc = {
  format: 'lakeledger.model/1',
  id: 'three_ranges',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'k', value: 0.1, unit: '1/d', range: { min: 0.05, max: 0.2, distribution: 'uniform' } },
    { id: 'kl', value: 0.01, unit: '1/d', range: { min: 0.001, max: 0.1, distribution: 'loguniform' } },
    { id: 'kt', value: 1, unit: '1/d', range: { min: 0, max: 4, distribution: 'triangular' } }
  ],
  states: [{ id: 'P', unit: 'mg/m^3', initial: 10, size: 'V', initialRange: { min: 5, max: 20 } }],
  flows: [{ id: 'loss', from: 'P', rate: 'k * P + kl * P + kt * P' }]
};

describe('inverse CDFs against hand-computed quantiles', () => {
  it('uniform', () => {
    expect(uniformQuantile(0.25, 2, 6)).toBe(3);
    expect(uniformQuantile(0, 2, 6)).toBe(2);
  });
  it('log-uniform on [1, 100]: the median is 10, the quartiles 10^0.5 and 10^1.5', () => {
    expect(logUniformQuantile(0.5, 1, 100)).toBeCloseTo(10, 12);
    expect(logUniformQuantile(0.25, 1, 100)).toBeCloseTo(Math.sqrt(10), 12);
    expect(logUniformQuantile(0.75, 1, 100)).toBeCloseTo(10 ** 1.5, 10);
  });
  it('triangular (min 0, mode 1, max 4): F(mode) = 1/4', () => {
    // u = 1/4 is the mode; u = 1/8: x² / (4·1) = 1/8 → x = √0.5; u = 5/8: (4 − x)²/(4·3) = 3/8 → x = 4 − √4.5
    expect(triangularQuantile(0.25, 0, 1, 4)).toBeCloseTo(1, 14);
    expect(triangularQuantile(0.125, 0, 1, 4)).toBeCloseTo(Math.SQRT1_2, 14);
    expect(triangularQuantile(0.625, 0, 1, 4)).toBeCloseTo(4 - Math.sqrt(4.5), 14);
    // the median of a symmetric triangle (0, 2, 4) is its mode
    expect(triangularQuantile(0.5, 0, 2, 4)).toBeCloseTo(2, 14);
  });
});

describe('Latin hypercube', () => {
  it('hits each of the N strata exactly once per input (unit cube)', () => {
    const n = 37;
    const pts = latinHypercube(n, 5, mulberry32(3));
    for (let i = 0; i < 5; i++) {
      const strata = pts.map((p) => Math.floor(p[i] * n)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: n }, (_, j) => j));
    }
  });

  it('hits each stratum of each parameter and initial range exactly once, in the model units', () => {
    const n = 50;
    const s = sampleModel(model, n, 11);
    expect(s.inputs.map((i) => i.id)).toEqual(['k', 'kl', 'kt', 'P']);
    const check = (xs: number[], F: (x: number) => number) => {
      const strata = xs.map((x) => Math.floor(F(x) * n + 1e-9)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: n }, (_, j) => j));
    };
    check(s.members.map((m) => m.parameters.k), (x) => cdf.uniform(x, 0.05, 0.2));
    check(s.members.map((m) => m.parameters.kl), (x) => cdf.loguniform(x, 0.001, 0.1));
    check(s.members.map((m) => m.parameters.kt), (x) => cdf.triangular(x, 0, 4, 1));
    check(s.members.map((m) => m.initial.P), (x) => cdf.uniform(x, 5, 20));
    expect(s.members.every((m) => !('V' in m.parameters))).toBe(true);
  });

  it('the same seed gives identical draws; another seed different ones', () => {
    const a = sampleModel(model, 20, 42).members;
    const b = sampleModel(model, 20, 42).members;
    const c = sampleModel(model, 20, 43).members;
    expect(b).toEqual(a);
    expect(c).not.toEqual(a);
    expect(c.map((m) => m.parameters.k)).not.toEqual(a.map((m) => m.parameters.k));
  });

  it('refuses a bad size, a bad seed, a model with nothing to sample and a bad range, with codes', () => {
    const code = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return (e as UncertaintyInputError).code;
      }
      return 'none';
    };
    expect(code(() => sampleModel(model, 0, 1))).toBe('invalid_ensemble_size');
    expect(code(() => sampleModel(model, 2.5, 1))).toBe('invalid_ensemble_size');
    expect(code(() => sampleModel(model, 5, -1))).toBe('invalid_seed');
    const bare = { ...model, parameters: model.parameters.map(({ range: _r, ...p }) => p), states: model.states.map(({ initialRange: _r, ...s }) => s) };
    expect(code(() => sampleModel(bare, 5, 1))).toBe('nothing_to_sample');
    const badLog = { ...model, parameters: [{ id: 'k', value: 1, unit: '1/d', range: { min: 0, max: 2, distribution: 'loguniform' as const } }] };
    expect(code(() => sampleModel(badLog, 5, 1))).toBe('invalid_range');
    const badMode = { ...model, parameters: [{ id: 'k', value: 5, unit: '1/d', range: { min: 0, max: 2, distribution: 'triangular' as const } }] };
    expect(code(() => sampleModel(badMode, 5, 1))).toBe('invalid_range');
  });
});
